import type { AwardResult, VendorAward } from '../../shared/award';
import type { AwardInstance } from './instance';
import type { ModelMap } from './model';

/** The award read back from a solver's column vector, costs recomputed from the bids themselves. */
export interface ExtractedAward {
  awards: VendorAward[];
  objective: number;
  fixedCost: number;
  variableCost: number;
}

// Solver values within this of a bound are the bound (simplex arithmetic leaves dust like 1e-12).
const DUST = 1e-7;

/**
 * Reads quantities per vendor and region: sole columns are rounded to 0/1, split quantities
 * below dust are dropped. A vendor is listed only when it supplies something or its fee is
 * charged (y_i = 1), so the award lists exactly the awarded vendors.
 */
export function extractAward(inst: AwardInstance, map: ModelMap, values: ArrayLike<number>): ExtractedAward {
  const awards: VendorAward[] = [];
  let fixedCost = 0;
  let variableCost = 0;
  inst.vendors.forEach((v, i) => {
    const lines: VendorAward['lines'] = [];
    inst.regions.forEach((r, j) => {
      const c = map.supply[i][j];
      if (c < 0) return;
      let quantity: number;
      if (map.soleColumn[j]) quantity = values[c] > 0.5 ? r.demand : 0;
      else {
        quantity = values[c];
        if (quantity < DUST * Math.max(1, r.demand)) quantity = 0;
        if (Math.abs(quantity - r.demand) < DUST * Math.max(1, r.demand)) quantity = r.demand;
      }
      if (quantity <= 0) return;
      const unitPrice = v.prices[j]!;
      lines.push({ region: r.id, quantity, unitPrice, cost: unitPrice * quantity });
    });
    const opened = map.open[i] >= 0 && values[map.open[i]] > 0.5;
    if (!opened && lines.length === 0) return;
    const quantity = lines.reduce((s, l) => s + l.quantity, 0);
    const variable = lines.reduce((s, l) => s + l.cost, 0);
    fixedCost += v.fee;
    variableCost += variable;
    awards.push({ vendor: v.id, fixedFee: v.fee, quantity, value: v.fee + variable, share: quantity / inst.totalDemand, lines });
  });
  return { awards, objective: fixedCost + variableCost, fixedCost, variableCost };
}

/** Relative gap between an award's cost and a proven lower bound (0 when the bound meets it). */
export function relativeGap(objective: number, bound: number | null): number | null {
  if (bound === null) return null;
  const gap = (objective - bound) / Math.max(Math.abs(objective), 1e-9);
  return Math.max(0, gap);
}

export function emptyResult(partial: Pick<AwardResult, 'status' | 'engine' | 'solveSeconds' | 'diagnosis'> & Partial<AwardResult>): AwardResult {
  return { objective: null, fixedCost: null, variableCost: null, bound: null, boundSource: null, gap: null, awards: [], ...partial };
}
