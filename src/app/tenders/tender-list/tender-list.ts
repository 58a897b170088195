import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked, viewChild } from '@angular/core';
import { rxResource, takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatChipsModule } from '@angular/material/chips';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { ActivatedRoute, Router, RouterLink } from '@angular/router';
import { TENDER_STATUSES, type TenderStatus, type TenderSummary } from '@shared/tenders';
import { debounceTime } from 'rxjs';
import { Auth } from '../../core/auth/auth';
import { localClosingTime, minuteClock, timeLeft } from '../closing-time';
import { TenderApi } from '../tender-api';
import { BID_STATUS_LABELS, TENDER_STATUS_LABELS } from '../tender-status';
import { quantity } from '../../ui/number-format';
import { loadErrorMessage } from '../../ui/load-error';
import { SkeletonRows } from '../../ui/skeleton-rows';
import { ScrollFrame } from '../../ui/scroll-frame';

/** /tenders — every tender the person may see, filtered by status and searched on the server (?status=&q=). */
@Component({
  selector: 'app-tender-list',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    SkeletonRows, ScrollFrame, RouterLink,
    MatTableModule,
    MatSortModule,
    MatChipsModule,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    MatIconModule,
    MatProgressBarModule,
  ],
  templateUrl: './tender-list.html',
  styleUrl: './tender-list.scss',
})
export class TenderList {
  private readonly api = inject(TenderApi);
  private readonly auth = inject(Auth);
  private readonly sort = viewChild.required(MatSort);
  private readonly router = inject(Router);
  private readonly route = inject(ActivatedRoute);

  protected readonly isVendor = computed(() => this.auth.user()?.role === 'vendor');
  protected readonly isBuyer = computed(() => this.auth.user()?.role === 'buyer');
  protected readonly heading = computed(() => (this.isVendor() ? 'My tenders' : 'Tenders'));
  /** Vendors never see drafts, so they are not offered as a filter. */
  protected readonly statuses = computed(() =>
    TENDER_STATUSES.filter((s) => !this.isVendor() || s !== 'draft').map((value) => ({ value, label: TENDER_STATUS_LABELS[value] })),
  );
  /** Query parameters (?status=…&q=…): a filtered list survives a reload and can be shared as a link. */
  readonly status = input<string | undefined>();
  readonly q = input<string | undefined>();
  protected readonly statusFilter = computed<TenderStatus | null>(() => {
    const value = this.status();
    return (TENDER_STATUSES as readonly string[]).includes(value ?? '') ? (value as TenderStatus) : null;
  });
  /** What is typed; it reaches the address (and the server) once typing pauses. */
  protected readonly search = signal('');

  private readonly tenders = rxResource({
    params: () => ({ status: this.statusFilter(), q: (this.q() ?? '').trim() }),
    stream: ({ params }) => this.api.list(params),
  });
  protected readonly loading = this.tenders.isLoading;
  protected readonly loadError = computed(() => loadErrorMessage(this.tenders.error(), 'Tenders could not be loaded.'));
  protected readonly rows = new MatTableDataSource<TenderSummary>([]);
  protected readonly count = computed(() => this.tenders.value()?.length ?? 0);
  protected readonly columns = computed(() => [
    'reference', 'title', 'status', 'closesAt', 'regionCount', 'totalForecast', ...(this.isVendor() ? ['myBidStatus'] : []),
  ]);
  protected readonly now = minuteClock();
  protected readonly quantity = quantity;
  protected readonly closingTime = localClosingTime;

  constructor() {
    this.rows.sortingDataAccessor = (t, column) => {
      switch (column) {
        case 'closesAt':
          return new Date(t.closesAt).getTime();
        case 'regionCount':
          return t.regionCount;
        case 'totalForecast':
          return t.totalForecast;
        case 'status':
          return TENDER_STATUSES.indexOf(t.status);
        default:
          return String(t[column as 'reference' | 'title'] ?? '').toLocaleLowerCase();
      }
    };
    effect(() => {
      this.rows.sort = this.sort();
    });
    effect(() => {
      this.rows.data = this.tenders.value() ?? [];
    });
    // The field follows the address (a shared link, back and forward).
    effect(() => {
      const q = this.q() ?? '';
      untracked(() => {
        if (q.trim() !== this.search().trim()) this.search.set(q);
      });
    });
    toObservable(this.search)
      .pipe(debounceTime(300), takeUntilDestroyed())
      .subscribe((typed) => {
        if (typed.trim() !== (this.q() ?? '').trim()) this.go({ q: typed.trim() || null }, true);
      });
  }

  /** Changes the list's query parameters; typing replaces the history entry rather than adding one per pause. */
  private go(queryParams: Record<string, string | null>, replaceUrl = false): void {
    void this.router.navigate([], { relativeTo: this.route, queryParams, queryParamsHandling: 'merge', replaceUrl });
  }

  protected timeLeft(t: TenderSummary): string {
    // A cancelled tender never closes: no countdown.
    return t.status === 'cancelled' ? 'cancelled before closing' : timeLeft(t.closesAt, this.now());
  }

  protected statusText(t: TenderSummary): string {
    return TENDER_STATUS_LABELS[t.status];
  }

  protected bidText(t: TenderSummary): string {
    return t.myBidStatus ? BID_STATUS_LABELS[t.myBidStatus] : 'No bid yet';
  }

  /** "All" (or unselecting the current chip) clears the filter. */
  protected filterBy(value: TenderStatus | 'all' | undefined): void {
    this.go({ status: !value || value === 'all' ? null : value });
  }

  protected onSearch(event: Event): void {
    this.search.set((event.target as HTMLInputElement).value);
  }

  protected reload(): void {
    this.tenders.reload();
  }
}
