import type { MipModel } from './model';
import type { EngineOutcome } from './solve';

/**
 * Reduced-cost fixing (a standard integer-programming technique, see MODEL.md) and what a run on
 * the reduced model proves about the full one.
 */

export { costOf } from './kernel';

/**
 * A column at 0 in the LP with reduced cost rc > 0 raises any solution's cost to at least
 * lp + rc·x, so in an award cheaper than `upper` it is at most (upper − lp)/rc: binaries beyond
 * that are fixed at 0, continuous bounds tightened. No award cheaper than `upper` is lost.
 */
export function fixByReducedCost(model: MipModel, lpValue: number, lp: ArrayLike<number>, rc: ArrayLike<number>, upper: number): { model: MipModel; fixed: number } {
  const slack = upper - lpValue + 1e-6 * Math.max(1, Math.abs(upper));
  let fixed = 0;
  const colUpper = model.colUpper.map((u, c) => {
    if (model.colLower[c] !== 0 || lp[c] > 1e-9 || !(rc[c] > 1e-9)) return u;
    const limit = slack / rc[c];
    if (limit >= u) return u;
    if (model.integer[c]) {
      const v = Math.floor(limit + 1e-9);
      if (v < u) { fixed++; return v; }
      return u;
    }
    return limit;
  });
  return { model: { ...model, colUpper }, fixed };
}

/**
 * What a run on a model reduced with `upper` (the cost of `incumbent`) means for the full model:
 * every award cheaper than `upper` survived the fixing, so "infeasible" or an optimum not below
 * `upper` proves the incumbent optimal, and the run's bound is valid up to `upper`.
 */
export function asFullModel(o: EngineOutcome, incumbent: Float64Array | null, upper: number, lower: number, how: string): EngineOutcome {
  if (incumbent && (o.status === 'infeasible' || (o.status === 'optimal' && (o.objective ?? Infinity) >= upper))) {
    return { status: 'optimal', values: incumbent, objective: upper, bound: upper, boundSource: `optimum proven by ${how}`, seconds: o.seconds, engine: o.engine };
  }
  if (o.status === 'infeasible') return o;
  const bound = Math.max(lower, Math.min(o.bound ?? -Infinity, upper));
  if (o.values && o.objective !== null && o.objective < upper) {
    return { ...o, bound, boundSource: o.status === 'optimal' ? `optimum proven by ${how}` : `${o.boundSource} (${how})` };
  }
  if (incumbent) return { status: 'feasible', values: incumbent, objective: upper, bound, boundSource: `HiGHS dual bound (${how})`, seconds: o.seconds, engine: o.engine };
  return { ...o, bound: Number.isFinite(bound) ? bound : null };
}
