import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { NOTICE_STATUSES, type NoticeStatus, type NoticeSummary } from '@shared/notices';
import { Auth } from '../../core/auth/auth';
import { NoticeApi } from '../notice-api';
import { NOTICE_KIND_LABELS, NOTICE_STATUS_LABELS, noticeDate } from '../notice-labels';
import { NoticeStatusBadge } from '../notice-status-badge';
import { DateTimePipe } from '../../ui/date-time.pipe';
import { SkeletonRows } from '../../ui/skeleton-rows';
import { ScrollFrame } from '../../ui/scroll-frame';
import { loadErrorMessage } from '../../ui/load-error';

/** /notices — a vendor's letters, or for the other roles the notices of the tenders they may see. */
@Component({
  selector: 'app-notice-list',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    SkeletonRows, DateTimePipe, ScrollFrame,
    RouterLink,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatProgressBarModule,
    MatSelectModule,
    MatTableModule,
    NoticeStatusBadge,
  ],
  templateUrl: './notice-list.html',
  styleUrl: './notice-list.scss',
})
export class NoticeList {
  private readonly api = inject(NoticeApi);
  private readonly auth = inject(Auth);

  /** null shows every state. */
  protected readonly status = signal<NoticeStatus | null>(null);
  protected readonly notices = rxResource({
    params: () => ({ status: this.status() }),
    stream: ({ params }) => this.api.list(params),
  });

  protected readonly isVendor = computed(() => this.auth.user()?.role === 'vendor');
  /** A vendor's letters are all addressed to it, so the recipient column would only repeat its name. */
  protected readonly columns = computed(() =>
    this.isVendor() ? ['date', 'subject', 'tender', 'kind', 'status'] : ['date', 'subject', 'tender', 'vendor', 'kind', 'status'],
  );
  protected readonly statuses = NOTICE_STATUSES;
  protected readonly statusLabel = NOTICE_STATUS_LABELS;
  protected readonly date = noticeDate;

  /** Table rows come untyped from mat-table, hence a typed accessor rather than an index in the template. */
  protected kindOf(notice: NoticeSummary): string {
    return NOTICE_KIND_LABELS[notice.kind];
  }

  protected problem(): string {
    return loadErrorMessage(this.notices.error(), 'The notices could not be loaded.') ?? '';
  }
}
