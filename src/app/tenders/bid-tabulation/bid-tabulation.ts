import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, signal, viewChild } from '@angular/core';
import { rxResource, takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatDialog } from '@angular/material/dialog';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { byCode, recordByCode } from '@shared/bids';
import { EXCLUSION_GROUND_LABELS } from '@shared/compliance';
import type { TabulatedBid, TenderView } from '@shared/tenders';
import { Auth } from '../../core/auth/auth';
import { BidCheckDialog, type BidCheckDialogData } from '../bid-check-dialog/bid-check-dialog';
import { LowPriceDialog, type LowPriceDialogData } from '../low-price-dialog/low-price-dialog';
import { REGIONS_PER_PAGE, RegionPager, regionPage } from '../../ui/region-pages';
import { TenderApi } from '../tender-api';
import { money, quantity } from '../../ui/number-format';
import { loadErrorMessage } from '../../ui/load-error';
import { DownloadLink } from '../../ui/download-link';
import { SkeletonRows } from '../../ui/skeleton-rows';

/** The lowest unit price bid for each region among the bids not excluded (regions nobody bid are left out). */
export function lowestPrices(bids: readonly TabulatedBid[]): Record<string, number> {
  const lowest = recordByCode<number>();
  for (const bid of bids) {
    if (bid.compliance.decision === 'excluded') continue;
    for (const [code, price] of Object.entries(bid.prices)) {
      const best = byCode(lowest, code);
      if (best === undefined || price < best) lowest[code] = price;
    }
  }
  return lowest;
}

const REGION_COLUMN = 'region:';

/** Whether the server flagged anything in the bid as abnormally low. */
export function isFlagged(bid: TabulatedBid): boolean {
  return bid.flags.prices.length > 0 || bid.flags.total !== null;
}

/**
 * After closing: every submitted bid, vendor × region, the lowest price of each region marked;
 * each bid's compliance check and abnormally-low flags (computed by the server, with their medians
 * and thresholds), and for the buyer the actions that record them.
 */
@Component({
  selector: 'app-bid-tabulation',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [SkeletonRows, DownloadLink, MatTableModule, MatSortModule, MatButtonModule, MatIconModule, MatProgressBarModule, RegionPager],
  templateUrl: './bid-tabulation.html',
  styleUrl: './bid-tabulation.scss',
})
export class BidTabulation {
  private readonly api = inject(TenderApi);
  private readonly auth = inject(Auth);
  private readonly dialog = inject(MatDialog);
  private readonly destroyRef = inject(DestroyRef);
  private readonly sort = viewChild(MatSort);

  readonly tender = input.required<TenderView>();

  private readonly answer = rxResource({ params: () => this.tender().id, stream: ({ params }) => this.api.bids(params) });
  protected readonly loading = this.answer.isLoading;
  protected readonly loadError = computed(() => loadErrorMessage(this.answer.error(), 'The bids could not be loaded.'));
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
  protected readonly columns = computed(() => ['vendor', 'check', 'flags', 'sme', 'fixedFee', 'capacity', ...this.shownRegions().map((r) => r.column)]);
  protected readonly exportUrl = computed(() => this.api.tabulationUrl(this.tender().id));
  protected readonly openingRecordUrl = computed(() => this.api.openingRecordUrl(this.tender().id));
  /** The buyer records checks and decisions while the tender is closed and not yet awarded. */
  protected readonly canDecide = computed(() => this.auth.hasRole(['buyer']) && this.tender().status === 'closed');
  protected readonly excludedCount = computed(() => this.bids().filter((b) => b.compliance.decision === 'excluded').length);
  protected readonly uncheckedCount = computed(() => this.bids().filter((b) => b.compliance.decision === null).length);
  protected readonly flaggedCount = computed(() => this.bids().filter(isFlagged).length);
  protected readonly isFlagged = isFlagged;
  /** Announced after a decision is stored. */
  protected readonly status = signal('');
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
    if (bid.compliance.decision === 'excluded') return false;
    const price = byCode(bid.prices, code);
    return price !== undefined && price === byCode(this.lowest(), code);
  }

  protected groundLabel(bid: TabulatedBid): string {
    return bid.compliance.ground ? EXCLUSION_GROUND_LABELS[bid.compliance.ground] : '';
  }

  protected priceFlag(bid: TabulatedBid, code: string) {
    return bid.flags.prices.find((f) => f.region === code);
  }

  /** The flags in the buyer's words, every figure shown so that it can be checked. */
  protected flagTexts(bid: TabulatedBid): string[] {
    const regionName = (code: string) => this.tender().regions.find((r) => r.code === code)?.name ?? code;
    const pct = bid.flags.percent;
    return [
      ...bid.flags.prices.map((f) => `${regionName(f.region)}: ${this.money(f.price)} is more than ${pct} % below the median ${this.money(f.median)} (threshold ${this.money(f.threshold)})`),
      ...(bid.flags.total ? [`Total at the forecast ${money(bid.flags.total.total, this.tender().currency, 2)} is more than ${pct} % below the median total ${money(bid.flags.total.median, this.tender().currency, 2)}`] : []),
    ];
  }

  protected check(bid: TabulatedBid): void {
    this.dialog
      .open<BidCheckDialog, BidCheckDialogData, TabulatedBid>(BidCheckDialog, { data: { tenderId: this.tender().id, bid }, width: '640px', maxWidth: '95vw' })
      .afterClosed()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe((stored) => {
        if (!stored) return;
        this.status.set(`${stored.vendor.name}: ${stored.compliance.decision === 'excluded' ? 'excluded from the evaluation' : 'found compliant'}.`);
        // Medians count compliant bids only: every bid's flags may change.
        this.answer.reload();
      });
  }

  protected decideLowPrice(bid: TabulatedBid): void {
    this.dialog
      .open<LowPriceDialog, LowPriceDialogData, TabulatedBid>(LowPriceDialog, {
        data: { tenderId: this.tender().id, bid, flags: this.flagTexts(bid) }, width: '640px', maxWidth: '95vw',
      })
      .afterClosed()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe((stored) => {
        if (!stored) return;
        this.status.set(`${stored.vendor.name}: explanation ${stored.abnormallyLow?.accepted ? 'accepted' : 'not accepted'}.`);
        this.answer.reload();
      });
  }
}
