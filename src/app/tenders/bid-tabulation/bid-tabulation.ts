import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, viewChild } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { byCode, recordByCode } from '@shared/bids';
import type { TabulatedBid, TenderView } from '@shared/tenders';
import { ApiError } from '../../core/http/api-error';
import { REGIONS_PER_PAGE, RegionPager, regionPage } from '../../ui/region-pages';
import { TenderApi } from '../tender-api';
import { money, quantity } from '../tender-status';

/** The lowest unit price bid for each region (regions nobody bid are left out). */
export function lowestPrices(bids: readonly TabulatedBid[]): Record<string, number> {
  const lowest = recordByCode<number>();
  for (const bid of bids) {
    for (const [code, price] of Object.entries(bid.prices)) {
      const best = byCode(lowest, code);
      if (best === undefined || price < best) lowest[code] = price;
    }
  }
  return lowest;
}

const REGION_COLUMN = 'region:';

/** After closing: every submitted bid, vendor × region, the lowest price of each region marked. */
@Component({
  selector: 'app-bid-tabulation',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatTableModule, MatSortModule, MatButtonModule, MatIconModule, MatProgressBarModule, RegionPager],
  templateUrl: './bid-tabulation.html',
  styleUrl: './bid-tabulation.scss',
})
export class BidTabulation {
  private readonly api = inject(TenderApi);
  private readonly sort = viewChild(MatSort);

  readonly tender = input.required<TenderView>();

  private readonly answer = rxResource({ params: () => this.tender().id, stream: ({ params }) => this.api.bids(params) });
  protected readonly loading = this.answer.isLoading;
  protected readonly loadError = computed(() => {
    const error = this.answer.error();
    if (!error) return null;
    return error instanceof ApiError ? error.userMessage : 'The bids could not be loaded.';
  });
  protected readonly bids = computed(() => {
    const answer = this.answer.value();
    return answer && 'bids' in answer ? answer.bids : [];
  });
  protected readonly lowest = computed(() => lowestPrices(this.bids()));
  protected readonly rows = new MatTableDataSource<TabulatedBid>([]);
  protected readonly regionPageIndex = signal(0);
  protected readonly regionPageSize = signal(REGIONS_PER_PAGE);
  /**
   * Every region has its column definition (cheap: nothing is drawn for it); only the regions on
   * the current page are displayed (see ui/region-pages.ts). Paging then changes the displayed
   * columns only, instead of destroying and creating 25 column definitions.
   */
  protected readonly regionColumns = computed(() => this.tender().regions.map((r) => ({ ...r, column: REGION_COLUMN + r.code })));
  protected readonly shownRegions = regionPage(this.regionColumns, this.regionPageIndex, this.regionPageSize);
  protected readonly columns = computed(() => ['vendor', 'sme', 'fixedFee', 'capacity', ...this.shownRegions().map((r) => r.column)]);
  protected readonly exportUrl = computed(() => this.api.tabulationUrl(this.tender().id));
  protected readonly quantity = quantity;

  constructor() {
    this.rows.sortingDataAccessor = (bid, column) => {
      if (column.startsWith(REGION_COLUMN)) {
        // Regions a vendor did not bid sort after every price, whichever the direction.
        return byCode(bid.prices, column.slice(REGION_COLUMN.length)) ?? (this.rows.sort?.direction === 'desc' ? -1 : Number.MAX_VALUE);
      }
      switch (column) {
        case 'sme':
          return bid.vendor.sme ? 0 : 1;
        case 'fixedFee':
          return bid.fixedFee;
        case 'capacity':
          return bid.capacity ?? Number.MAX_VALUE;
        default:
          return bid.vendor.name.toLocaleLowerCase();
      }
    };
    effect(() => {
      this.rows.sort = this.sort() ?? null;
    });
    effect(() => {
      this.rows.data = this.bids();
    });
  }

  protected money(value: number): string {
    return money(value, this.tender().currency, 4);
  }

  protected documentUrl(documentId: string): string {
    return this.api.documentUrl(this.tender().id, documentId);
  }

  protected isLowest(bid: TabulatedBid, code: string): boolean {
    const price = byCode(bid.prices, code);
    return price !== undefined && price === byCode(this.lowest(), code);
  }
}
