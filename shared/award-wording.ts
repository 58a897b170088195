import type { AwardResult } from './award';
import type { SoleAwardCost } from './evaluation';

/**
 * How a run's status is said to buyers and compliance officers, and what the cost of sole award is
 * as far as two runs prove it. One home for both: the run page, the recommendation screens, the
 * compare screen and the award workbook all use these, so they say the same thing.
 *
 * The engine's words (bound, gap, bound source, engine, seconds) stay in the "Engine details"
 * panel and the workbook's appendix sheet.
 */

/** The status line of a proven optimum. */
export const PROVEN_BEST = 'Best possible award (proven)';

/**
 * How far above the best possible award this one can be at most, as a fraction (0.0053 = 0.53 %),
 * rounded up to 0.01 %; 0 when proven best; null when nothing bounds it (no award, or no bound).
 *
 * The engine's `gap` is (total − bound) / total; the buyer's question is "how much more than the
 * best possible can this cost", and the best possible is at least the bound, so the honest figure
 * is (total − bound) / bound, which is never below the gap (110 against a bound of 100: gap 9.09 %,
 * at most 10 % above the best possible).
 */
export function marginAboveBest(result: Pick<AwardResult, 'status' | 'objective' | 'bound'> | null | undefined): number | null {
  if (!result || result.objective === null) return null;
  if (result.status === 'optimal') return 0;
  if (result.status !== 'feasible' || result.bound === null || result.bound <= 0) return null;
  const margin = Math.max(0, (result.objective - result.bound) / result.bound);
  // Rounded up, never down: "at most" must stay true. The 1e-9 keeps 0.0053 from becoming 0.0054.
  return Math.ceil(margin * 10_000 - 1e-9) / 10_000;
}

/** A fraction as the plain-words sentences write it: 0.0053 → "0.53 %" (up to two decimals). */
export function plainPercent(fraction: number): string {
  const value = Math.round(fraction * 10_000) / 100;
  return `${value.toLocaleString('en-GB', { maximumFractionDigits: 2 })} %`;
}

/**
 * The status of a run with an award in the buyer's words: "Best possible award (proven)", or "Best
 * award found in the time limit: at most X % above the best possible". Null for a run without an
 * award (its status label says what happened). `percent` formats a fraction (the client passes its
 * locale's format).
 */
export function awardStatusWords(
  result: Pick<AwardResult, 'status' | 'objective' | 'bound'> | null | undefined,
  percent: (fraction: number) => string = plainPercent,
): string | null {
  if (!result || result.objective === null) return null;
  if (result.status === 'optimal') return PROVEN_BEST;
  if (result.status !== 'feasible') return null;
  const margin = marginAboveBest(result);
  return margin === null
    ? 'Best award found in the time limit: how far it is above the best possible is not known'
    : `Best award found in the time limit: at most ${percent(margin)} above the best possible`;
}

/** What a run contributes to the cost of sole award: its total and, when not proven best, its bound. */
export type CostRun = Pick<AwardResult, 'status' | 'objective' | 'bound'>;

/**
 * The cost of sole award (best sole award − best split award) that the two runs allow, never
 * negative. With S and P the totals found and Sb, Pb their bounds (a proven run's bound is its
 * total; costs are never negative, so a missing bound counts as 0):
 *
 * - the best sole award S* lies in [Sb, S], the best split award P* in [Pb, P];
 * - every sole award is also a split award, so P* ≤ min(P, S) and S* ≥ P*;
 * - so S* − P* ≥ max(0, Sb − min(P, S)) and S* − P* ≤ S − Pb.
 *
 * Both proven: low = high = max(0, S − P). Percentages are of P, the split award found. Null when
 * either run has no award.
 */
export function soleAwardCostRange(split: CostRun | null | undefined, sole: CostRun | null | undefined): SoleAwardCost | null {
  const usable = (r: CostRun | null | undefined): r is CostRun & { objective: number } =>
    !!r && (r.status === 'optimal' || r.status === 'feasible') && r.objective !== null;
  if (!usable(split) || !usable(sole)) return null;
  const lower = (r: CostRun & { objective: number }) => (r.status === 'optimal' ? r.objective : Math.max(0, r.bound ?? 0));
  const low = Math.max(0, lower(sole) - Math.min(split.objective, sole.objective));
  const high = Math.max(low, sole.objective - lower(split));
  const of = (amount: number) => (split.objective > 0 ? amount / split.objective : 0);
  const exact = split.status === 'optimal' && sole.status === 'optimal';
  return { low, high: exact ? low : high, lowPercent: of(low), highPercent: of(exact ? low : high), exact };
}
