import { byCode } from '@shared/bids';
import type { RegionView } from '@shared/tenders';

/**
 * What the bid costs the buyer if it won every region it offers at the forecast quantities:
 * fixed fee + Σ unit price × forecast over the offered regions. Blank or non-numeric entries count
 * as not offered, so the total follows the form while it is being typed.
 */
export function totalAtForecast(
  fixedFee: number | null | undefined,
  prices: Readonly<Record<string, number | null | undefined>>,
  regions: readonly RegionView[],
): { total: number; offered: number; quantity: number } {
  let total = typeof fixedFee === 'number' && Number.isFinite(fixedFee) ? fixedFee : 0;
  let offered = 0;
  let quantity = 0;
  for (const region of regions) {
    const price = byCode(prices, region.code);
    if (typeof price !== 'number' || !Number.isFinite(price)) continue;
    total += price * region.forecast;
    offered += 1;
    quantity += region.forecast;
  }
  return { total, offered, quantity };
}
