import type { AwardResult, ValidAwardProblem } from '../../shared/award';
import { recordByCode } from '../../shared/bids';
import {
  extraCostWords, moneyWords, percentWords, reasonWords,
  type DebriefRegion, type DebriefVendor, type ExplanationReason, type ExplanationResult, type RegionChallenger, type RegionExplanation, type VendorDebrief, type WordsContext,
} from '../../shared/explanation';
import { buildModel } from './build-model';
import { emptyResult, extractAward } from './extract';
import { satisfiesRows } from './heuristic';
import { effectiveCapacity, inIncrements, toInstance, validateProblem, type AwardInstance } from './instance';
import type { MipModel } from './model';
import { costOf } from './reduced-model';
import { HIGHS_WORKER, runInWorker, type RelaxationOutcome } from './solve';
import { verifyAward } from './verify';

/**
 * Explains a finished run's award (`explainAward`, per region) and debriefs one vendor on demand
 * (`debriefVendor`). See MODEL.md, "Explaining an award", for how the figures are computed and bounded.
 *
 * - Forced re-solve of vendor i in region j: i must supply the whole region (the other bids for j
 *   set aside). It is the run's own model, built once, with one column bound changed (z_ij ≥ 1, or
 *   q_ij ≥ d_j), solved in three steps, each stopping when the award is proven:
 *   1. an incumbent: the run's award repaired to satisfy the forcing (j moved to i, vendors left
 *      with nothing closed, i's other sole regions moved to the next vendor if its cap overflows);
 *   2. a lower bound from the LP relaxation of the run's model, solved once for all re-solves:
 *      LP + the reduced cost of the forced column (standard reduced-cost argument, MODEL.md), and
 *      the run's own proven bound (forcing only removes awards);
 *   3. when they do not meet, HiGHS on the forced model seeded with the incumbent, for a slice of
 *      the time budget. Not proven in its slice: the extra cost is the range the bound and the
 *      incumbent allow.
 *   extra = forced total − the run's total. The reason is read from the forced award: i gives up
 *   quantity elsewhere with its cap (or the vendor-share rule) reached → capacity; i was not
 *   awarded and the extra is at most its fee → fee not recovered; a rule (maximum vendors, SME
 *   share, minimum award) changed the rest of the award → that rule; no forced award exists → the
 *   rule that, left out, makes one possible.
 * - The explanation forces only the cheapest compliant unawarded bid of each region (at most one
 *   re-solve per region) within a budget of BUDGET_FACTOR × the run's solve time.
 * - Debrief price (per vendor, on demand): for a sole region the forced re-solve gives it exactly,
 *   p − extra / forecast (every award with i in j carries the same forecast quantity there); for a
 *   split region, where a part of the region may come earlier, bisection between that value and
 *   the bid price with a solve at each step (i wins when the award gives it anything of j), to
 *   0.5 % of the price or a cent, whichever is larger.
 * - Uniform cut: the fraction r of all its prices and fee at which an unawarded vendor gets any
 *   award; bracket from the forced re-solves (at r = extra / its value in the forced award it wins
 *   for sure), then a solve just below, and bisection if that still wins; to 0.5 percentage
 *   points or a cent of its lowest unit price, whichever is larger.
 */

export type SolveFn = (problem: ValidAwardProblem) => Promise<AwardResult>;

export interface ExplainOptions {
  /** A whole re-solve of a changed problem (the rule checks of an impossible forcing, the debrief's bisections). */
  solve: SolveFn;
  /** Re-solves at once (the solver pools have two threads each by default). */
  concurrency?: number;
  signal?: AbortSignal;
  onProgress?: (done: number, total: number) => void;
  /**
   * Seconds the forced re-solves of an explanation may take in all (wall time); default
   * BUDGET_FACTOR × the run's solve time, at least MIN_BUDGET_SECONDS. For a debrief, the limit of
   * each forced re-solve (default: the problem's time limit).
   */
  budgetSeconds?: number;
}

/**
 * The explanation's time budget, in multiples of the run's own solve time. 6, not 10: the promise
 * is 10 × as the screen sees it, which adds the queue's pick-up (up to 1 s), loading the run, the LP
 * and the screen's next poll (up to 1 s) to the re-solves: about 2 s that weigh most on short runs
 * (bench:queue, a 30 × 200 sole run solved in 0.74 s: 7 × gave 10.0 × as the screen saw it).
 */
export const BUDGET_FACTOR = 6;
export const MIN_BUDGET_SECONDS = 4;
/** Each forced MIP re-solve gets at least this long, once the cheaper steps have not settled it. */
const MIN_SLICE_SECONDS = 0.5;

const usable = (r: AwardResult) => (r.status === 'optimal' || r.status === 'feasible') && r.objective !== null;
const EPS = 1e-6;

function qtyOf(r: AwardResult, vendor: string, region?: string): number {
  const award = r.awards.find((a) => a.vendor === vendor);
  if (!award) return 0;
  return region === undefined ? award.quantity : award.lines.filter((l) => l.region === region).reduce((s, l) => s + l.quantity, 0);
}
const isAwarded = (r: AwardResult, vendor: string) => r.awards.some((a) => a.vendor === vendor);
const floorCent = (x: number) => Math.floor(x * 100 - 1e-7) / 100;

/** Runs tasks with at most `n` at once, in order of the list. */
async function pool<T>(items: T[], n: number, work: (item: T) => Promise<void>): Promise<void> {
  let next = 0;
  const runners = Array.from({ length: Math.max(1, Math.min(n, items.length)) }, async () => {
    while (next < items.length) await work(items[next++]);
  });
  await Promise.all(runners);
}

interface Forced { result: AwardResult; reason: ExplanationReason }

/** What explaining and debriefing share: the problem, the run, one model build and one LP. */
function explainContext(input: unknown, run: AwardResult, options: ExplainOptions) {
  const problem = validateProblem(input);
  if (!usable(run)) throw new Error('Only a run with an award can be explained.');
  const runObjective = run.objective!;
  const ctx: WordsContext = { currency: problem.currency ?? 'EUR', unit: problem.unit ?? 'units' };
  const total = problem.regions.reduce((s, r) => s + r.demand, 0);
  const rules = problem.rules;
  const excluded = new Set(rules.exclude);
  const isSole = (region: string) => rules.sourcing === 'sole' || rules.soleRegions.includes(region);
  const vendorName = (id: string) => problem.vendors.find((v) => v.id === id)?.name ?? id;
  const priceOf = (vendor: string, region: string): number | undefined => {
    const v = problem.vendors.find((x) => x.id === vendor);
    return v && Object.prototype.hasOwnProperty.call(v.prices, region) ? v.prices[region] : undefined;
  };
  const regionById = new Map(problem.regions.map((r) => [r.id, r]));
  const counter = { solves: 0 };
  const solve = async (p: ValidAwardProblem) => {
    options.signal?.throwIfAborted();
    counter.solves++;
    return options.solve(p);
  };

  // One model build for every forced re-solve: the run's model, only a column bound changes.
  const inst: AwardInstance = toInstance(problem);
  const { model, map } = buildModel(inst);
  const units = inIncrements(inst);
  const caps = units.vendors.map((_, i) => effectiveCapacity(units, i));
  const vendorIndex = new Map(inst.vendors.map((v, i) => [v.id, i]));
  const regionIndex = new Map(inst.regions.map((r, j) => [r.id, j]));
  /** Model quantity of a supply column at full region: 1 for z_ij, d_j (in increments) for q_ij. */
  const full = (j: number) => (map.soleColumn[j] ? 1 : units.regions[j].demand);
  /** Units of quantity per unit of a supply column. */
  const perCol = (j: number) => (map.soleColumn[j] ? units.regions[j].demand : 1);
  const tol = (x: number) => EPS * Math.max(1, Math.abs(x)) + inst.relativeGap * Math.abs(x);

  // The run's award as a column vector of the model (null if it cannot be read back exactly).
  const runValues = ((): Float64Array | null => {
    const x = new Float64Array(model.numCols);
    for (const a of run.awards) {
      const i = vendorIndex.get(a.vendor);
      if (i === undefined || map.open[i] < 0) return null;
      x[map.open[i]] = 1;
      for (const l of a.lines) {
        const j = regionIndex.get(l.region)!;
        const c = map.supply[i][j];
        if (c < 0) return null;
        x[c] = map.soleColumn[j] ? 1 : inst.increment !== undefined ? Math.round(l.quantity / inst.increment) : l.quantity;
      }
    }
    return satisfiesRows(model, x) ? x : null;
  })();

  let lpRun: Promise<RelaxationOutcome | null> | null = null;
  /** The LP relaxation of the run's model, solved once (a lower bound for every forced re-solve). */
  const relaxation = () => {
    lpRun ??= (async () => {
      counter.solves++;
      const lp = await runInWorker<RelaxationOutcome>(HIGHS_WORKER, { model, relax: true, timeLimitSeconds: Math.max(5, inst.timeLimitSeconds), relativeGap: 0 }, options.signal);
      return lp.status === 'optimal' && lp.values && lp.reducedCosts && lp.objective !== null ? lp : null;
    })();
    return lpRun;
  };

  /** The run's award with region j moved whole to vendor i, repaired to meet the rules; null when that fails. */
  function repaired(forcedModel: MipModel, i: number, j: number): Float64Array | null {
    if (!runValues) return null;
    const x = runValues.slice();
    for (let k = 0; k < map.supply.length; k++) if (map.supply[k][j] >= 0) x[map.supply[k][j]] = 0;
    x[map.supply[i][j]] = full(j);
    x[map.open[i]] = 1;
    const load = (k: number) => map.supply[k].reduce((s, c, jj) => s + (c >= 0 ? x[c] * perCol(jj) : 0), 0);
    // i over its cap: move its other sole regions, least extra cost first, to the cheapest vendor with room.
    if (load(i) > caps[i] + 1e-9) {
      const others = map.supply[i].map((c, jj) => ({ c, jj })).filter(({ c, jj }) => jj !== j && c >= 0 && map.soleColumn[jj] && x[c] > 0.5);
      const moves = others.map(({ c, jj }) => {
        let best: { k: number; cost: number } | null = null;
        for (let k = 0; k < map.supply.length; k++) {
          const ck = map.supply[k][jj];
          if (k === i || ck < 0 || forcedModel.colUpper[ck] < 1) continue;
          const cost = model.colCost[ck] + (x[map.open[k]] > 0.5 ? 0 : model.colCost[map.open[k]]);
          if (!best || cost < best.cost) best = { k, cost };
        }
        return { c, jj, best, extra: best ? best.cost - model.colCost[c] : Infinity };
      }).sort((a, b) => a.extra - b.extra);
      for (const m of moves) {
        if (load(i) <= caps[i] + 1e-9) break;
        if (!m.best || load(m.best.k) + perCol(m.jj) > caps[m.best.k] + 1e-9) continue;
        x[m.c] = 0;
        x[map.supply[m.best.k][m.jj]] = 1;
        x[map.open[m.best.k]] = 1;
      }
    }
    // Vendors left with nothing are closed (their fees saved) where the rules allow.
    const closed = x.slice();
    for (let k = 0; k < map.open.length; k++) {
      if (map.open[k] >= 0 && forcedModel.colLower[map.open[k]] < 0.5 && load(k) <= 1e-9) closed[map.open[k]] = 0;
    }
    if (satisfiesRows(forcedModel, closed)) return closed;
    return satisfiesRows(forcedModel, x) ? x : null;
  }

  const asResult = (values: Float64Array, status: 'optimal' | 'feasible', bound: number, seconds: number): AwardResult | null => {
    const award = extractAward(inst, map, values);
    if (verifyAward(problem, award.awards, award.objective).length > 0) return null;
    return {
      status, objective: award.objective, fixedCost: award.fixedCost, variableCost: award.variableCost,
      bound: Math.min(bound, award.objective), boundSource: 'forced re-solve', gap: null,
      solveSeconds: seconds, engine: 'explanation', awards: award.awards, diagnosis: [],
    };
  };

  /**
   * Vendor i made to supply all of region j: the cheapest award, or (not proven in `limitSeconds`)
   * the best found with its proven bound. `limitSeconds` null: no MIP, only the incumbent and the
   * LP bound; 0 (the budget spent): a MIP only when there is no incumbent, for MIN_SLICE_SECONDS.
   */
  async function forcedSolve(vendor: string, region: string, limitSeconds: number | null): Promise<AwardResult> {
    options.signal?.throwIfAborted();
    const started = performance.now();
    const seconds = () => Math.round((performance.now() - started) / 10) / 100;
    const i = vendorIndex.get(vendor)!;
    const j = regionIndex.get(region)!;
    const c = map.supply[i][j];
    const infeasible = () => emptyResult({ status: 'infeasible', engine: 'explanation', solveSeconds: seconds(), diagnosis: [] });
    if (c < 0 || model.colUpper[c] < full(j) - 1e-9) return infeasible();
    const colLower = model.colLower.slice();
    colLower[c] = full(j);
    const forcedModel: MipModel = { ...model, colLower };

    let lower = run.bound ?? -Infinity;
    const lp = await relaxation();
    if (lp) {
      const rc = lp.reducedCosts![c];
      lower = Math.max(lower, lp.objective! + (lp.values![c] <= 1e-9 && rc > 0 ? rc * full(j) : 0) - tol(lp.objective!));
    }
    const incumbent = repaired(forcedModel, i, j);
    const upper = incumbent ? costOf(model, incumbent) : Infinity;
    if (incumbent && upper - lower <= tol(upper)) return asResult(incumbent, 'optimal', lower, seconds()) ?? infeasible();
    if ((limitSeconds === null || limitSeconds <= 0) && incumbent) return asResult(incumbent, 'feasible', lower, seconds()) ?? infeasible();
    if (limitSeconds === null) {
      return emptyResult({ status: 'failed', engine: 'explanation', solveSeconds: seconds(), diagnosis: ['No forced award without a re-solve.'], bound: Number.isFinite(lower) ? lower : null });
    }

    counter.solves++;
    const o = await runInWorker(HIGHS_WORKER, {
      model: forcedModel, timeLimitSeconds: Math.max(limitSeconds, MIN_SLICE_SECONDS), relativeGap: inst.relativeGap, incumbent: incumbent ?? undefined,
    }, options.signal);
    if (o.status === 'infeasible' && !incumbent) return infeasible();
    const bound = Math.max(lower, o.bound ?? -Infinity);
    const better = o.values && o.objective !== null && o.objective < upper ? o.values : incumbent;
    if (!better) return emptyResult({ status: 'failed', engine: 'explanation', solveSeconds: seconds(), diagnosis: ['No forced award within the time limit.'], bound: Number.isFinite(bound) ? bound : null });
    const value = costOf(model, better);
    const proven = o.status === 'optimal' || value - bound <= tol(value);
    return asResult(better, proven ? 'optimal' : 'feasible', proven ? Math.max(bound, value - tol(value)) : bound, seconds()) ?? infeasible();
  }

  /** Infeasible forced award: the rule that, left out, makes one possible (capacity when none does). */
  async function blockingRule(vendor: string, region: string): Promise<ExplanationReason> {
    const v = problem.vendors.find((x) => x.id === vendor)!;
    const demand = regionById.get(region)!.demand;
    const cap = v.capacity ?? total;
    if (isSole(region) && (cap < demand - EPS || (rules.maxRegionShare ?? 1) < 1)) return 'soleRegions';
    if ((rules.maxRegionShare ?? 1) < 1) return 'maxRegionShare';
    if (cap < demand - EPS) return 'capacity';
    if (rules.maxVendorShare !== undefined && rules.maxVendorShare * total < demand - EPS) return 'maxVendorShare';
    const candidates: (keyof typeof rules & ExplanationReason)[] = ['maxVendors', 'smeShare', 'minAwardQuantity', 'maxVendorShare', 'awardIncrement', 'require', 'minVendors'];
    const base: ValidAwardProblem = {
      ...problem,
      vendors: problem.vendors.map((x) => (x.id === vendor ? x : { ...x, prices: recordByCode(Object.entries(x.prices).filter(([code]) => code !== region)) })),
    };
    for (const rule of candidates) {
      const present = rule === 'require' ? rules.require.length > 0 : rules[rule] !== undefined;
      if (!present) continue;
      const relaxed: ValidAwardProblem = { ...base, rules: { ...base.rules, ...(rule === 'require' ? { require: [] } : { [rule]: undefined }) } };
      if (usable(await solve(relaxed))) return rule;
    }
    return 'capacity';
  }

  /** Why the forced award costs more, read from it. */
  function reasonFromForced(vendor: string, region: string, f: AwardResult): ExplanationReason {
    const v = problem.vendors.find((x) => x.id === vendor)!;
    const cap = v.capacity ?? total;
    const runOther = qtyOf(run, vendor);
    const forcedAll = qtyOf(f, vendor);
    const gaveUp = runOther - (forcedAll - qtyOf(f, vendor, region)) > EPS * Math.max(1, runOther);
    if (gaveUp) {
      // It gives up quantity elsewhere because it is full: its cap, or the vendor-share rule.
      if (forcedAll >= cap - EPS * Math.max(1, cap)) return 'capacity';
      if (rules.maxVendorShare !== undefined && forcedAll >= rules.maxVendorShare * total - EPS * total) return 'maxVendorShare';
    }
    const smeQty = (r: AwardResult) => r.awards.filter((a) => problem.vendors.find((x) => x.id === a.vendor)?.sme).reduce((s, a) => s + a.quantity, 0);
    if (rules.smeShare !== undefined && rules.smeShare > 0 && !v.sme && smeQty(run) <= rules.smeShare * total + EPS * total && smeQty(f) < smeQty(run) - EPS * total) return 'smeShare';
    if (runOther <= EPS) {
      if (rules.maxVendors !== undefined && run.awards.length >= rules.maxVendors && f.awards.length <= run.awards.length) return 'maxVendors';
      const demand = regionById.get(region)!.demand;
      if (rules.minAwardQuantity !== undefined && rules.minAwardQuantity > demand + EPS && forcedAll > demand + EPS) return 'minAwardQuantity';
      // Not awarded at all: its fee is what stands between it and the region when the forced award
      // costs no more than that fee, or its unit price undercuts a price awarded there.
      const extra = f.objective! - runObjective;
      const dearestAwarded = Math.max(0, ...run.awards.flatMap((a) => a.lines.filter((l) => l.region === region && l.quantity > 0).map((l) => l.unitPrice)));
      if (v.fixedFee > 0 && (extra <= v.fixedFee + EPS * Math.max(1, v.fixedFee) || (priceOf(vendor, region) ?? Infinity) < dearestAwarded)) return 'fixedFee';
    }
    return 'price';
  }

  async function forceOne(vendor: string, region: string, limitSeconds: number | null): Promise<Forced> {
    const result = await forcedSolve(vendor, region, limitSeconds);
    const reason = usable(result) ? reasonFromForced(vendor, region, result)
      : result.status === 'infeasible' ? await blockingRule(vendor, region) : 'unsettled';
    return { result, reason };
  }

  /** Every region a compliant vendor bid and got nothing of. */
  const unawardedBids = (vendor: string) => problem.regions
    .filter((r) => !excluded.has(vendor) && priceOf(vendor, r.id) !== undefined && qtyOf(run, vendor, r.id) <= EPS)
    .map((r) => r.id);

  return {
    problem, run, runObjective, ctx, rules, excluded, isSole, vendorName, priceOf, regionById, counter, solve,
    forceOne, unawardedBids, runProven: run.status === 'optimal',
  };
}

type ExplainContext = ReturnType<typeof explainContext>;

/** How many regions' extra costs are a range (a forced re-solve not proven in the time it had). */
export const rangesOf = (regions: RegionExplanation[]) =>
  regions.filter((r) => r.challenger && !r.challenger.exact && r.challenger.extraCost !== null).length;

/** The cheapest compliant bid for a region that got none of it (its forced re-solve explains the region). */
function challengerOf(x: ExplainContext, region: string): { region: string; vendor: string; price: number } | null {
  const best = x.problem.vendors
    .filter((v) => x.unawardedBids(v.id).includes(region))
    .map((v) => ({ vendor: v.id, price: x.priceOf(v.id, region)! }))
    .sort((a, b) => a.price - b.price)[0];
  return best ? { region, ...best } : null;
}

/** One region of the explanation: who was awarded it, and why its cheapest unawarded bid was not, with the figure. */
function regionExplanation(x: ExplainContext, region: string, best: { vendor: string; price: number } | null, forced: Forced | undefined): RegionExplanation {
  const { problem, run, ctx, runObjective, vendorName } = x;
  const r = x.regionById.get(region)!;
  const awarded = run.awards.flatMap((a) => a.lines.filter((l) => l.region === region && l.quantity > 0)
    .map((l) => ({ vendor: a.vendor, vendorName: vendorName(a.vendor), quantity: l.quantity, unitPrice: l.unitPrice })));
  let challenger: RegionChallenger | null = null;
  if (best && forced) {
    const { result: f, reason } = forced;
    const { extraCost, exact, extraCostAtLeast } = extraOf(f, runObjective, x.runProven);
    const v = problem.vendors.find((y) => y.id === best.vendor)!;
    const fullElsewhere = v.capacity !== null && qtyOf(run, v.id) >= v.capacity - EPS * v.capacity;
    const why = reasonWords(reason, { capacity: v.capacity, forecast: r.demand, unit: ctx.unit, fullElsewhere });
    const figure = reason === 'unsettled' ? 'no extra cost can be stated'
      : extraCost !== null && exact && extraCost <= EPS * Math.max(1, runObjective)
      ? 'an equally cheap award with it exists; the award kept the other'
      : extraCostWords({ extraCost, exact, extraCostAtLeast }, ctx);
    challenger = {
      vendor: best.vendor, vendorName: vendorName(best.vendor), unitPrice: best.price, reason,
      words: `${vendorName(best.vendor)} bid ${moneyWords(best.price, ctx)} per ${ctx.unit} but was not awarded it: ${why}; ${figure}.`,
      extraCost, exact, extraCostAtLeast,
    };
  }
  return { region, regionName: r.name ?? region, forecast: r.demand, awarded, challenger };
}

/**
 * One region worked out exactly, on demand (after an explanation left its extra cost as a range):
 * the same forced re-solve, with the whole of `options.budgetSeconds` (default: the problem's time
 * limit) instead of a share of the explanation's budget. Null when no compliant bid lost the region.
 */
export async function explainRegion(input: unknown, run: AwardResult, region: string, options: ExplainOptions): Promise<RegionExplanation | null> {
  const x = explainContext(input, run, options);
  if (!x.regionById.has(region)) throw new Error(`No region ${region} in the run's problem.`);
  const best = challengerOf(x, region);
  if (!best) return null;
  const limit = options.budgetSeconds ?? x.problem.options?.timeLimitSeconds ?? 60;
  options.onProgress?.(0, 1);
  const forced = await x.forceOne(best.vendor, region, limit);
  options.onProgress?.(1, 1);
  return regionExplanation(x, region, best, forced);
}

/** The figure of a forced re-solve against the run: exact, or the range its bound allows. */
function extraOf(f: AwardResult, runObjective: number, runProven: boolean) {
  const ok = usable(f);
  const extraCost = ok ? Math.max(0, f.objective! - runObjective) : null;
  const exact = ok && runProven && f.status === 'optimal';
  const extraCostAtLeast = ok && !exact && f.bound !== null ? Math.max(0, f.bound - runObjective) : null;
  return { extraCost, exact, extraCostAtLeast };
}

/**
 * Per region of a finished run: who supplies it, and the cheapest compliant bid that got none of
 * it with the reason and the extra cost of forcing it (one re-solve per region, within the budget).
 */
export async function explainAward(input: unknown, run: AwardResult, options: ExplainOptions): Promise<ExplanationResult> {
  const started = performance.now();
  const x = explainContext(input, run, options);
  const { problem, ctx, runObjective, vendorName } = x;

  // The cheapest compliant unawarded bid of each region: the one forced re-solve it gets.
  const challengers = problem.regions.map((r) => challengerOf(x, r.id));
  const todo = challengers.filter((c): c is NonNullable<typeof c> => c !== null);
  const budget = options.budgetSeconds ?? Math.max(MIN_BUDGET_SECONDS, BUDGET_FACTOR * (run.solveSeconds ?? 0));
  const deadline = started + budget * 1000;
  const concurrency = options.concurrency ?? 2;
  let done = 0;
  options.onProgress?.(0, todo.length);
  const forced = new Map<string, Forced>();

  // First without a MIP (incumbent and LP bound): most regions are settled there. Then the rest,
  // each with its share of the time left (wall time, `concurrency` at once).
  const open: typeof todo = [];
  await pool(todo, concurrency, async (c) => {
    const f = await x.forceOne(c.vendor, c.region, null);
    if (f.result.status === 'feasible' || (f.result.status === 'failed' && f.reason === 'unsettled')) open.push(c);
    else { forced.set(c.region, f); options.onProgress?.(++done, todo.length); }
  });
  let left = open.length;
  await pool(open, concurrency, async (c) => {
    const slice = ((deadline - performance.now()) / 1000) * Math.min(concurrency, left) / Math.max(1, left);
    left--;
    // Past the budget: the range from the incumbent and the LP bound (a short MIP only when there is no incumbent).
    const f = await x.forceOne(c.vendor, c.region, Math.max(0, slice));
    forced.set(c.region, f);
    options.onProgress?.(++done, todo.length);
  });

  const regions: RegionExplanation[] = problem.regions.map((r, k) => regionExplanation(x, r.id, challengers[k], forced.get(r.id)));

  // The vendors a debrief can be asked for: a compliant bid in a region it did not win, or no award.
  const debriefVendors: DebriefVendor[] = problem.vendors
    .filter((v) => !x.excluded.has(v.id) && Object.keys(v.prices).length > 0 && (x.unawardedBids(v.id).length > 0 || !isAwarded(run, v.id)))
    .map((v) => ({ vendor: v.id, vendorName: vendorName(v.id), awarded: isAwarded(run, v.id) }));

  const seconds = (performance.now() - started) / 1000;
  return {
    currency: ctx.currency, unit: ctx.unit, objective: runObjective, runProven: x.runProven, regions, debriefVendors,
    solves: x.counter.solves, seconds: Math.round(seconds * 100) / 100,
    budgetSeconds: Math.round(budget * 100) / 100,
    ranges: rangesOf(regions),
  };
}

/**
 * What one vendor would have needed (on demand, buyer and compliance only): the unit price at
 * which it would have been awarded each region it bid but did not win, and for a vendor with no
 * award the uniform cut of all its prices. Null when there is nothing to debrief.
 */
export async function debriefVendor(input: unknown, run: AwardResult, vendor: string, options: ExplainOptions): Promise<VendorDebrief | null> {
  const x = explainContext(input, run, options);
  const { problem, ctx, runObjective, priceOf, regionById, isSole, solve, vendorName } = x;
  const unit = ctx.unit;
  const v = problem.vendors.find((y) => y.id === vendor);
  if (!v || x.excluded.has(vendor) || Object.keys(v.prices).length === 0) return null;
  const awarded = isAwarded(run, vendor);
  const pairs = x.unawardedBids(vendor);
  if (!pairs.length && awarded) return null;
  const limit = options.budgetSeconds ?? validateProblem(input).options?.timeLimitSeconds ?? 60;
  const concurrency = options.concurrency ?? 2;
  const progressTotal = pairs.length + (awarded ? 0 : 1);
  let done = 0;
  const tick = () => options.onProgress?.(++done, progressTotal);
  options.onProgress?.(0, progressTotal);

  const forced = new Map<string, Forced>();
  await pool(pairs, concurrency, async (region) => { forced.set(region, await x.forceOne(vendor, region, limit)); });

  const withVendor = (change: (w: ValidAwardProblem['vendors'][number]) => Partial<ValidAwardProblem['vendors'][number]>): ValidAwardProblem => ({
    ...problem,
    vendors: problem.vendors.map((w) => (w.id === vendor ? { ...w, ...change(w) } : w)),
  });
  const fullElsewhere = v.capacity !== null && qtyOf(run, v.id) >= v.capacity - EPS * v.capacity;
  const priceTolerance = (price: number) => (0.005 * price > 0.01 ? { step: 0.005 * price, tolerance: 'percent' as const } : { step: 0.01, tolerance: 'cent' as const });
  function debriefWords(region: string, neededPrice: number | null, reason: ExplanationReason, proven = true): string {
    const price = priceOf(vendor, region)!;
    if (neededPrice === null && reason === 'unsettled') return 'Not worked out: working the award out again did not finish within the time limit.';
    if (neededPrice === null) return `No unit price would have won it this region: ${reasonWords(reason, { capacity: v!.capacity, forecast: regionById.get(region)!.demand, unit, fullElsewhere })}.`;
    const cut = price > 0 ? (price - neededPrice) / price : 0;
    const words = `It would have been awarded this region at ${moneyWords(neededPrice, ctx)} per ${unit} or less (its bid: ${moneyWords(price, ctx)}, ${percentWords(cut)} lower).`;
    // From awards not proven best: a price at which it surely wins, possibly below the highest that would.
    return proven ? words : `${words} The awards compared were not proven best in the time allowed, so it might also have won at a somewhat higher price.`;
  }
  const winsRegion = async (region: string, price: number) => {
    const r = await solve(withVendor((w) => ({ prices: recordByCode([...Object.entries(w.prices).filter(([c]) => c !== region), [region, price] as const]) })));
    return usable(r) && qtyOf(r, vendor, region) > EPS;
  };

  const needed = new Map<string, DebriefRegion>();
  await pool(pairs, concurrency, async (region) => {
    const { result: f, reason } = forced.get(region)!;
    const price = priceOf(vendor, region)!;
    const demand = regionById.get(region)!.demand;
    const regionName = regionById.get(region)!.name ?? region;
    // The forced award's own total (its incumbent when not proven): at or below this price it surely wins.
    const threshold = usable(f) ? price - (f.objective! - runObjective) / demand : null;
    if (isSole(region)) {
      const neededPrice = threshold !== null && threshold > 0 ? Math.max(0, floorCent(threshold)) : null;
      const proven = x.runProven && f.status === 'optimal';
      needed.set(region, { region, regionName, unitPrice: price, neededPrice, tolerance: 'cent', reason, words: debriefWords(region, neededPrice, reason, proven) });
      tick();
      return;
    }
    const { step, tolerance } = priceTolerance(price);
    // Whole-region threshold: at or below it the vendor surely gets the region; a part may come at a higher price.
    let lo = Math.max(0, floorCent(threshold ?? 0));
    let hi = price;
    let neededPrice: number | null = null;
    // Below the whole-region threshold the forced award itself beats the run, and every award
    // without the vendor in the region costs at least the run: it wins there, no solve needed.
    if ((threshold !== null && lo > 0 && lo < threshold) || (await winsRegion(region, lo))) {
      // Confirm a step above first (usually the end), then bisect what remains.
      const above = Math.min(hi, lo + step);
      if (above < hi && (await winsRegion(region, above))) {
        lo = above;
        while (hi - lo > step) {
          const mid = (lo + hi) / 2;
          if (await winsRegion(region, mid)) lo = mid; else hi = mid;
        }
      }
      neededPrice = Math.max(0, Math.floor(lo * 100 + 1e-6) / 100);
    }
    needed.set(region, { region, regionName, unitPrice: price, neededPrice, tolerance, reason, words: debriefWords(region, neededPrice, reason) });
    tick();
  });

  // Uniform cut for a vendor with no award.
  let uniformReduction: VendorDebrief['uniformReduction'] = null;
  if (!awarded) {
    const scaled = (r: number) => withVendor((w) => ({
      fixedFee: w.fixedFee * (1 - r),
      prices: recordByCode(Object.entries(w.prices).map(([c, p]) => [c, p * (1 - r)] as const)),
    }));
    const winsAny = async (r: number) => {
      const res = await solve(scaled(r));
      return usable(res) && isAwarded(res, vendor);
    };
    const prices = Object.values(v.prices).filter((p) => p > 0);
    const minPrice = prices.length ? Math.min(...prices) : 0;
    const centStep = minPrice > 0 ? 0.01 / minPrice : 0;
    const step = Math.max(0.005, centStep);
    const tolerance = centStep > 0.005 ? 'cent' as const : 'percent' as const;
    // Bracket: forcing it into a region, its own value there v_f and the extra e: at r = e / v_f that award beats the run.
    let hint = 1;
    for (const { result: f } of forced.values()) {
      if (!usable(f)) continue;
      const value = f.awards.find((a) => a.vendor === vendor)?.value ?? 0;
      if (value > 0) hint = Math.min(hint, Math.max(0, f.objective! - runObjective) / value);
    }
    let hi = Math.min(1, hint + 1e-6);
    let fraction: number | null = null;
    // Just above the hint that forced award, cut, costs less than the run, and every award without
    // the vendor costs at least the run: it wins there, no solve needed.
    let wins = hint < 1 || (await winsAny(hi));
    if (!wins && hi < 1) { hi = 1; wins = await winsAny(1); }
    if (wins) {
      let lo = 0;
      const below = hi - step;
      if (below > 0 && (await winsAny(below))) {
        hi = below;
        while (hi - lo > step) {
          const mid = (lo + hi) / 2;
          if (await winsAny(mid)) hi = mid; else lo = mid;
        }
      }
      fraction = Math.min(1, Math.ceil(hi * 1000 - 1e-6) / 1000);
    }
    uniformReduction = {
      fraction, tolerance,
      words: fraction === null
        ? 'No uniform cut of its prices would have won it an award: the rules keep it out.'
        : `A cut of ${percentWords(fraction)} to all its prices, fixed fee included, would have won it an award.`,
    };
    tick();
  }

  return {
    vendor, vendorName: vendorName(vendor), awarded,
    regions: problem.regions.map((r) => needed.get(r.id)).filter((d): d is DebriefRegion => d !== undefined),
    uniformReduction,
  };
}
