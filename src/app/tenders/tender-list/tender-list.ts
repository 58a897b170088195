import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { rxResource, takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatChipsModule } from '@angular/material/chips';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSortModule, type Sort } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { ActivatedRoute, Router, RouterLink } from '@angular/router';
import { TENDER_PAGE_SIZE, TENDER_PAGE_SIZES, TENDER_SORTS, TENDER_STATUSES, type TenderSort, type TenderStatus, type TenderSummary } from '@shared/tenders';
import { debounceTime } from 'rxjs';
import { Auth } from '../../core/auth/auth';
import { localClosingTime, minuteClock, timeLeft } from '../closing-time';
import { TenderApi } from '../tender-api';
import { BID_STATUS_LABELS, TENDER_STATUS_LABELS } from '../tender-status';
import { quantity } from '../../ui/number-format';
import { loadErrorMessage } from '../../ui/load-error';
import { SkeletonRows } from '../../ui/skeleton-rows';
import { ScrollFrame } from '../../ui/scroll-frame';

/** The order a column is read in when first chosen: closing time newest first, the others A to Z. */
const defaultDir = (sort: TenderSort): 'asc' | 'desc' => (sort === 'closesAt' ? 'desc' : 'asc');

/**
 * /tenders — every tender the person may see, a page at a time, filtered, searched and ordered on
 * the server (?status=&q=&page=&size=&sort=&dir=).
 */
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
    MatPaginatorModule,
  ],
  templateUrl: './tender-list.html',
  styleUrl: './tender-list.scss',
})
export class TenderList {
  private readonly api = inject(TenderApi);
  private readonly auth = inject(Auth);
  private readonly router = inject(Router);
  private readonly route = inject(ActivatedRoute);

  protected readonly isVendor = computed(() => this.auth.user()?.role === 'vendor');
  protected readonly isBuyer = computed(() => this.auth.user()?.role === 'buyer');
  protected readonly heading = computed(() => (this.isVendor() ? 'My tenders' : 'Tenders'));
  /** Vendors never see drafts, so they are not offered as a filter. */
  protected readonly statuses = computed(() =>
    TENDER_STATUSES.filter((s) => !this.isVendor() || s !== 'draft').map((value) => ({ value, label: TENDER_STATUS_LABELS[value] })),
  );
  /** Query parameters (?status=…&q=…&page=…): a filtered list survives a reload and can be shared as a link. */
  readonly status = input<string | undefined>();
  readonly q = input<string | undefined>();
  readonly page = input<string | undefined>();
  readonly size = input<string | undefined>();
  readonly sort = input<string | undefined>();
  readonly dir = input<string | undefined>();
  protected readonly statusFilter = computed<TenderStatus | null>(() => {
    const value = this.status();
    return (TENDER_STATUSES as readonly string[]).includes(value ?? '') ? (value as TenderStatus) : null;
  });
  protected readonly pageSizes = TENDER_PAGE_SIZES;
  protected readonly pageNumber = computed(() => Math.max(1, Math.floor(Number(this.page()) || 1)));
  protected readonly pageSize = computed(() => {
    const size = Number(this.size());
    return (TENDER_PAGE_SIZES as readonly number[]).includes(size) ? size : TENDER_PAGE_SIZE;
  });
  protected readonly sortColumn = computed<TenderSort>(() => {
    const value = this.sort();
    return (TENDER_SORTS as readonly string[]).includes(value ?? '') ? (value as TenderSort) : 'closesAt';
  });
  protected readonly sortDir = computed<'asc' | 'desc'>(() => {
    const value = this.dir();
    return value === 'asc' || value === 'desc' ? value : defaultDir(this.sortColumn());
  });
  /** What is typed; it reaches the address (and the server) once typing pauses. */
  protected readonly search = signal('');

  private readonly tenders = rxResource({
    params: () => ({
      status: this.statusFilter(), q: (this.q() ?? '').trim(), page: this.pageNumber(), size: this.pageSize(), sort: this.sortColumn(),
      dir: this.sortDir() === defaultDir(this.sortColumn()) ? undefined : this.sortDir(),
    }),
    stream: ({ params }) => this.api.list(params),
  });
  protected readonly loading = this.tenders.isLoading;
  protected readonly loadError = computed(() => loadErrorMessage(this.tenders.error(), 'Tenders could not be loaded.'));
  /** The page shown; the last one while the next loads, so the table does not jump. */
  protected readonly rows = signal<TenderSummary[]>([]);
  protected readonly count = signal(0);
  protected readonly columns = computed(() => [
    'reference', 'title', 'status', 'closesAt', 'regionCount', 'totalForecast', ...(this.isVendor() ? ['myBidStatus'] : []),
  ]);
  protected readonly now = minuteClock();
  protected readonly quantity = quantity;
  protected readonly closingTime = localClosingTime;

  constructor() {
    effect(() => {
      const page = this.tenders.value();
      if (!page) return;
      this.rows.set(page.items);
      this.count.set(page.total);
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
        if (typed.trim() !== (this.q() ?? '').trim()) this.go({ q: typed.trim() || null, page: null }, true);
      });
  }

  /** Changes the list's query parameters; typing replaces the history entry rather than adding one per pause. */
  private go(queryParams: Record<string, string | number | null>, replaceUrl = false): void {
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
    this.go({ status: !value || value === 'all' ? null : value, page: null });
  }

  /** Another page, or another page size (which starts again at the first page). */
  protected turn(event: PageEvent): void {
    const size = event.pageSize === TENDER_PAGE_SIZE ? null : event.pageSize;
    this.go({ page: event.pageIndex > 0 && event.pageSize === this.pageSize() ? event.pageIndex + 1 : null, size });
  }

  /** Ordered on the server: a column header starts again at the first page. */
  protected sortBy(event: Sort): void {
    const sort = (TENDER_SORTS as readonly string[]).includes(event.active) ? (event.active as TenderSort) : 'closesAt';
    const dir = event.direction || defaultDir(sort);
    this.go({ sort: sort === 'closesAt' ? null : sort, dir: dir === defaultDir(sort) ? null : dir, page: null });
  }

  protected onSearch(event: Event): void {
    this.search.set((event.target as HTMLInputElement).value);
  }

  protected reload(): void {
    this.tenders.reload();
  }
}
