import { BreakpointObserver } from '@angular/cdk/layout';
import { ChangeDetectionStrategy, Component, computed, effect, inject, input } from '@angular/core';
import { rxResource, toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { ActivatedRoute, Router, RouterLink } from '@angular/router';
import { map } from 'rxjs';
import { OutboxApi } from '../outbox-api';
import { loadErrorMessage } from '../../ui/load-error';
import { DateTimePipe } from '../../ui/date-time.pipe';
import { SkeletonRows } from '../../ui/skeleton-rows';

/** Messages per page. */
const PAGE_SIZE = 25;

/** /outbox — every e-mail Tendara sent, newest first, searchable, a page at a time (?q=…&page=…). */
@Component({
  selector: 'app-outbox-list',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [SkeletonRows, DateTimePipe, RouterLink, ReactiveFormsModule, MatTableModule, MatIconModule, MatButtonModule, MatProgressBarModule, MatFormFieldModule, MatInputModule, MatPaginatorModule],
  templateUrl: './outbox-list.html',
  styleUrl: './outbox-list.scss',
})
export class OutboxList {
  private readonly api = inject(OutboxApi);
  private readonly router = inject(Router);
  private readonly route = inject(ActivatedRoute);

  /** Query parameters, so a search and a page survive a reload and can be shared as a link. */
  readonly q = input<string>();
  readonly page = input<string>();

  protected readonly pageSize = PAGE_SIZE;
  protected readonly query = computed(() => ({ q: (this.q() ?? '').trim(), page: Math.max(1, Math.floor(Number(this.page()) || 1)), pageSize: PAGE_SIZE }));
  protected readonly result = rxResource({ params: () => this.query(), stream: ({ params }) => this.api.list(params) });
  protected readonly messages = computed(() => this.result.value()?.messages ?? []);
  protected readonly search = new FormControl('', { nonNullable: true });
  protected readonly searchForm = new FormGroup({ q: this.search });
  /** On a phone the date and recipients move under the subject, so nothing scrolls. */
  protected readonly narrow = toSignal(
    inject(BreakpointObserver).observe('(max-width: 719.98px)').pipe(map((state) => state.matches)),
    { initialValue: false },
  );
  protected readonly columns = computed(() => (this.narrow() ? ['subject'] : ['date', 'to', 'subject']));

  constructor() {
    // The field follows the address (back and forward buttons, a shared link).
    effect(() => this.search.setValue(this.query().q, { emitEvent: false }));
  }

  protected problem(): string {
    return loadErrorMessage(this.result.error(), 'The outbox could not be loaded.') ?? '';
  }

  protected find(): void {
    this.go({ q: this.search.value.trim() || null, page: null });
  }

  protected turn(event: PageEvent): void {
    this.go({ page: event.pageIndex > 0 ? event.pageIndex + 1 : null });
  }

  private go(queryParams: Record<string, string | number | null>): void {
    void this.router.navigate([], { relativeTo: this.route, queryParams, queryParamsHandling: 'merge' });
  }
}
