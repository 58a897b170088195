import { ChangeDetectionStrategy, Component, computed, effect, input, model, type Signal } from '@angular/core';
import { MatPaginatorIntl, MatPaginatorModule, type PageEvent } from '@angular/material/paginator';

/** Regions shown at once in the wide vendor × region tables, unless the user asks for more. */
export const REGIONS_PER_PAGE = 25;

/**
 * The regions of one page of a wide vendor × region table. A 30 × 200 table drawn whole is
 * 6,000 cells (and, in the tabulation, 200 sortable headers): paging the region columns keeps
 * the screen responsive (`npm run bench:client` measures both). The page resets when the
 * regions change.
 */
export function regionPage<T>(regions: Signal<readonly T[]>, pageIndex: Signal<number>, pageSize: Signal<number>): Signal<readonly T[]> {
  return computed(() => {
    const all = regions();
    const size = Math.max(1, pageSize());
    const last = Math.max(0, Math.ceil(all.length / size) - 1);
    const start = Math.min(pageIndex(), last) * size;
    return all.slice(start, start + size);
  });
}

/** Page sizes offered: 25, 50, 100 and every region at once. */
export function regionPageSizes(total: number): number[] {
  return [...new Set([REGIONS_PER_PAGE, 50, 100, total])].filter((n) => n <= total || n === REGIONS_PER_PAGE).sort((a, b) => a - b);
}

function regionPaginatorIntl(): MatPaginatorIntl {
  const intl = new MatPaginatorIntl();
  intl.itemsPerPageLabel = 'Regions per page:';
  intl.nextPageLabel = 'Next regions';
  intl.previousPageLabel = 'Previous regions';
  intl.firstPageLabel = 'First regions';
  intl.lastPageLabel = 'Last regions';
  intl.getRangeLabel = (page, size, length) => {
    if (length === 0) return 'No regions';
    const start = page * size;
    return `Regions ${start + 1}–${Math.min(length, start + size)} of ${length}`;
  };
  return intl;
}

/**
 * The pager above a wide vendor × region table, shown only when there are more regions than fit
 * on one page. Two-way bound: `[(pageIndex)]` and `[(pageSize)]`.
 */
@Component({
  selector: 'app-region-pager',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatPaginatorModule],
  providers: [{ provide: MatPaginatorIntl, useFactory: regionPaginatorIntl }],
  template: `
    @if (total() > sizes()[0]) {
      <mat-paginator
        [length]="total()"
        [pageIndex]="pageIndex()"
        [pageSize]="pageSize()"
        [pageSizeOptions]="sizes()"
        [showFirstLastButtons]="true"
        [attr.aria-label]="label()"
        (page)="changed($event)"
      />
    }
  `,
  styles: `
    :host { display: block; }
    mat-paginator { background: transparent; }
  `,
})
export class RegionPager {
  readonly total = input.required<number>();
  readonly label = input('Pages of regions');
  readonly pageIndex = model(0);
  readonly pageSize = model(REGIONS_PER_PAGE);
  protected readonly sizes = computed(() => regionPageSizes(this.total()));

  constructor() {
    // A different set of regions (another tender or run) starts again at its first page.
    let seen: number | null = null;
    effect(() => {
      const total = this.total();
      if (seen !== null && seen !== total) this.pageIndex.set(0);
      seen = total;
    });
  }

  protected changed(event: PageEvent): void {
    this.pageSize.set(event.pageSize);
    this.pageIndex.set(event.pageIndex);
  }
}
