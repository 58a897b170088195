import type { BidFlags, PriceFlag, TotalFlag } from '@shared/compliance';

/** What the screen needs of a bid: its vendor, whether it is excluded, and its figures. */
export interface FlagInputBid {
  vendor: string;
  excluded: boolean;
  fixedFee: number;
  /** Region code → unit price; a region missing was not bid. */
  prices: Record<string, number>;
}

/** The middle value; with an even count, the mean of the two middle values. Undefined when empty. */
export function median(values: readonly number[]): number | undefined {
  if (!values.length) return undefined;
  const sorted = [...values].sort((a, b) => a - b);
  const mid = Math.floor(sorted.length / 2);
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

/** median × (1 − percent/100), written so that whole figures stay exact (50 at 20 % → 40, not 40.000…01). */
function thresholdOf(med: number, percent: number): number {
  return (med * (100 - percent)) / 100;
}

/**
 * The one function that flags abnormally low prices (a first screen, common practice: a price or
 * total far below the others' asks for an explanation, it proves nothing by itself):
 * - every unit price more than `percent` % below the median of the compliant (not excluded) bids'
 *   prices for that region;
 * - every bid whose total at the forecast (fixed fee + Σ price × forecast) is more than `percent` %
 *   below the median total of the compliant bids. Only bids that price every region are compared
 *   (and make up the median): a bid for fewer regions covers less volume, so its total is lower
 *   without being abnormally low; its prices are still screened one by one.
 * Excluded bids are left out of the medians and get no flags. Pure: same input, same flags, so every
 * figure shown (median, threshold) can be re-computed from the tabulation.
 */
export function abnormallyLowFlags(
  bids: readonly FlagInputBid[], regions: readonly { code: string; forecast: number }[], percent: number,
): Map<string, BidFlags> {
  const compliant = bids.filter((b) => !b.excluded);
  const medians = new Map<string, number>();
  for (const r of regions) {
    const m = median(compliant.flatMap((b) => (r.code in b.prices ? [b.prices[r.code]] : [])));
    if (m !== undefined) medians.set(r.code, m);
  }
  const complete = (b: FlagInputBid) => regions.length > 0 && regions.every((r) => r.code in b.prices);
  const totalOf = (b: FlagInputBid) => b.fixedFee + regions.reduce((s, r) => s + (b.prices[r.code] ?? 0) * r.forecast, 0);
  const medianTotal = median(compliant.filter(complete).map(totalOf));

  const flags = new Map<string, BidFlags>();
  for (const b of bids) {
    if (b.excluded) {
      flags.set(b.vendor, { percent, prices: [], total: null, totalCompared: false });
      continue;
    }
    const prices: PriceFlag[] = [];
    for (const r of regions) {
      const med = medians.get(r.code);
      if (!(r.code in b.prices) || med === undefined) continue;
      const threshold = thresholdOf(med, percent);
      if (b.prices[r.code] < threshold) prices.push({ region: r.code, price: b.prices[r.code], median: med, threshold });
    }
    const compared = complete(b) && medianTotal !== undefined;
    let total: TotalFlag | null = null;
    if (compared) {
      const own = totalOf(b);
      const threshold = thresholdOf(medianTotal, percent);
      if (own < threshold) total = { total: own, median: medianTotal, threshold };
    }
    flags.set(b.vendor, { percent, prices, total, totalCompared: compared });
  }
  return flags;
}

/** Whether any flag is raised. */
export const isFlagged = (f: BidFlags | undefined): boolean => !!f && (f.prices.length > 0 || f.total !== null);
