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
 * k whole increments of size u, as the number a reader expects: k·u rounded to 15 significant
 * digits, so 6 × 0.1 is reported as 0.6, not 0.6000000000000001 (a whole multiple to any test).
 */
export function increments(k: number, u: number): number {
  return Number((k * u).toPrecision(15));
}

/**
 * Reads quantities per vendor and region: sole columns are rounded to 0/1, split quantities
 * below dust are dropped. With an award increment the model counts split quantities in whole
 * increments: each is rounded to its integer count k and reported as k increments (the whole
 * forecast when k is all of the region), never as a solver's fraction. A vendor is listed only
 * when it supplies something or its fee is charged (y_i = 1), so the award lists exactly the
 * awarded vendors. `inst` is the problem's instance (`toInstance`), in the problem's units.
 */
export function extractAward(inst: AwardInstance, map: ModelMap, values: ArrayLike<number>): ExtractedAward {
  const u = inst.increment;
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
      else if (u !== undefined) {
        const k = Math.round(values[c]);
        quantity = k === Math.round(r.demand / u) ? r.demand : increments(k, u);
      } else {
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
    const sum = lines.reduce((s, l) => s + l.quantity, 0);
    // A sum of whole multiples is one: reported as exactly as its lines (0.1 + 0.2 is 0.3).
    const quantity = u === undefined ? sum : Number(sum.toPrecision(15));
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
