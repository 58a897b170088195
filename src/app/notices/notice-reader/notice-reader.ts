import { DOCUMENT } from '@angular/common';
import { formatInZone } from '@shared/time-zone';
import type { NoticeSummary } from '@shared/notices';
import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { Auth } from '../../core/auth/auth';
import { LetterFrame } from '../letter-frame/letter-frame';
import { LetterPrint } from '../letter-print/letter-print';
import { NoticeApi } from '../notice-api';
import { NOTICE_KIND_LABELS } from '../notice-labels';
import { NoticeStatusBadge } from '../notice-status-badge';
import { apiProblem, loadErrorMessage } from '../../ui/load-error';

/**
 * /notices/:noticeId — one letter. On screen it sits in a sandboxed frame; on paper LetterPrint
 * gives a sanitised copy of it and hides everything else (see there why not the frame).
 */
@Component({
  selector: 'app-notice-reader',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [RouterLink, MatButtonModule, MatIconModule, MatProgressBarModule, LetterFrame, LetterPrint, NoticeStatusBadge],
  templateUrl: './notice-reader.html',
  styleUrl: './notice-reader.scss',
})
export class NoticeReader {
  private readonly api = inject(NoticeApi);
  private readonly auth = inject(Auth);
  private readonly window = inject(DOCUMENT).defaultView;

  /** Route parameter. */
  readonly noticeId = input.required<string>();

  protected readonly notice = rxResource({
    params: () => this.noticeId(),
    stream: ({ params }) => this.api.get(params),
  });
  protected readonly isVendor = computed(() => this.auth.user()?.role === 'vendor');
  protected readonly kindLabel = NOTICE_KIND_LABELS;

  /** A time of the letter as the letter writes it: the procedure's zone (named) and the letter's locale. */
  protected inZone(iso: string, letter: Pick<NoticeSummary, 'timeZone' | 'locale'>): string {
    return formatInZone(iso, letter.timeZone, { locale: letter.locale });
  }

  protected print(): void {
    this.window?.print();
  }

  protected problem(): string {
    const error = this.notice.error();
    if (apiProblem(error)?.status === 404) return 'There is no such notice, or it is not addressed to you.';
    return loadErrorMessage(error, 'The notice could not be loaded.') ?? '';
  }
}
