import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { ComparedRun, Comparison } from '@shared/evaluation';
import { of } from 'rxjs';
import { AwardApi } from '../award-api';
import { AwardCaution } from '../award-caution';
import { percent } from '../award-format';
import { fractionPercent, money } from '../../ui/number-format';
import { RUN_STATUS_LABELS } from '../run-status';
import { loadErrorMessage } from '../../ui/load-error';

/** One line of the side-by-side table: a measure, written for each run. */
interface Measure {
  label: string;
  cell: (run: ComparedRun, comparison: Comparison) => string;
}

function signedMoney(value: number, currency: string): string {
  return `${value > 0 ? '+' : ''}${money(value, currency)}`;
}

const MEASURES: readonly Measure[] = [
  { label: 'Can be recommended', cell: (run) => (run.awardable ? 'Yes: the published award basis' : 'No: a what-if, for analysis only') },
  { label: 'Status', cell: (run) => RUN_STATUS_LABELS[run.status] },
  { label: 'Total cost', cell: (run, c) => (run.objective === null ? '—' : money(run.objective, c.currency)) },
  { label: 'Fixed fees', cell: (run, c) => (run.fixedCost === null ? '—' : money(run.fixedCost, c.currency)) },
  { label: 'Unit prices × quantities', cell: (run, c) => (run.variableCost === null ? '—' : money(run.variableCost, c.currency)) },
  { label: 'Vendors awarded', cell: (run) => String(run.vendorsAwarded) },
  { label: 'Largest vendor share', cell: (run) => (run.largestShare === null ? '—' : fractionPercent(run.largestShare)) },
  { label: 'Regions split', cell: (run) => String(run.regionsSplit) },
  {
    label: 'Price over the split baseline',
    cell: (run, c) => {
      if (c.baseline?.runId === run.runId) return 'Baseline';
      if (run.priceOverSplit === null) return '—';
      const pct = run.priceOverSplitPercent === null ? '' : ` (${run.priceOverSplitPercent > 0 ? '+' : ''}${percent(run.priceOverSplitPercent)})`;
      return `${signedMoney(run.priceOverSplit, c.currency)}${pct}`;
    },
  },
];

/** tenders/:id/evaluation/compare?runs=a,b — runs side by side, and what sole award costs. */
@Component({
  selector: 'app-run-compare',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [RouterLink, MatButtonModule, MatIconModule, MatProgressBarModule, AwardCaution],
  templateUrl: './run-compare.html',
  styleUrl: './run-compare.scss',
})
export class RunCompare {
  private readonly api = inject(AwardApi);

  /** The tender id (route) and the compared run ids (query `runs`, comma-separated). */
  readonly id = input.required<string>();
  readonly runs = input<string | undefined>(undefined);

  private readonly runIds = computed(() =>
    (this.runs() ?? '')
      .split(',')
      .map((s) => s.trim())
      .filter(Boolean),
  );
  protected readonly comparison = rxResource({
    params: () => ({ tenderId: this.id(), runIds: this.runIds() }),
    stream: ({ params }) => (params.runIds.length < 2 ? of(null) : this.api.compare(params.tenderId, params.runIds)),
  });
  protected readonly tooFew = computed(() => this.runIds().length < 2);
  protected readonly error = computed(() => loadErrorMessage(this.comparison.error(), 'The comparison could not be loaded.'));
  protected readonly measures = MEASURES;
  protected hasWhatIf(c: Comparison): boolean {
    return c.runs.some((r) => !r.awardable);
  }
  /**
   * The cost of sole award in words: one amount when both runs are proven best, else the range the
   * runs' bounds allow ("between €a and €b"); never negative (soleAwardCostRange, shared).
   */
  protected readonly soleCost = computed(() => {
    const c = this.comparison.value();
    const cost = c?.costOfSoleAward;
    if (!c || !cost) return null;
    const amount = (value: number) => money(value, c.currency);
    return cost.exact || cost.low === cost.high
      ? { amount: amount(cost.low), percent: `${percent(cost.lowPercent)} over split award`, exact: true }
      : {
          amount: `between ${amount(cost.low)} and ${amount(cost.high)}`,
          percent: `${percent(cost.lowPercent)} to ${percent(cost.highPercent)} over the split award found`,
          exact: false,
        };
  });
}
