import type { AwardResult, ValidAwardProblem } from '../../shared/award';
import { recordByCode } from '../../shared/bids';
import {
  extraCostWords, moneyWords, percentWords, reasonWords,
  type DebriefRegion, type ExplanationReason, type ExplanationResult, type RegionChallenger, type RegionExplanation, type VendorDebrief, type WordsContext,
} from '../../shared/explanation';
import { validateProblem } from './instance';

/**
 * Explains a finished run's award and debriefs the vendors who lost, by re-solving with the
 * engine's own entry point (`solve`, normally `solveAward`): nothing here models the award itself.
 *
 * - Forced re-solve of vendor i in region j: the problem with every other vendor's bid for j set
 *   aside, so i must supply the whole region. For a vendor with no award, one solve with it
 *   required settles every region it supplies whole in that award (the cheapest award with it). extra = forced total − the run's total (exact when
 *   both are proven best; else the range the forced solve's bound allows). The reason is read
 *   from the forced award: i gives up quantity elsewhere with its cap (or the vendor-share rule)
 *   reached → capacity; i was not awarded and the extra is at most its fee → fee not recovered;
 *   a rule (maximum vendors, SME share, minimum award) changed the rest of the award → that rule;
 *   no forced award exists → the rule that, left out, makes one possible.
 * - Debrief price: for a sole region the forced re-solve gives it exactly, p − extra / forecast
 *   (every award with i in j carries the same forecast quantity there); for a split region, where
 *   a part of the region may come earlier, bisection between that value and the bid price with a
 *   solve at each step (i wins when the award gives it anything of j), to 0.5 % of the price or a
 *   cent, whichever is larger.
 * - Uniform cut: the fraction r of all its prices and fee at which an unawarded vendor gets any
 *   award; bracket from the forced re-solves (at r = extra / its value in the forced award it wins
 *   for sure), then a solve just below, and bisection if that still wins; to 0.5 percentage
 *   points or a cent of its lowest unit price, whichever is larger.
 */

export type SolveFn = (problem: ValidAwardProblem) => Promise<AwardResult>;

export interface ExplainOptions {
  solve: SolveFn;
  /** Re-solves at once (the solver pools have two threads each by default). */
  concurrency?: number;
  signal?: AbortSignal;
  onProgress?: (done: number, total: number) => void;
}

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

export async function explainAward(input: unknown, run: AwardResult, options: ExplainOptions): Promise<ExplanationResult> {
  const started = performance.now();
  const problem = validateProblem(input);
  if (!usable(run)) throw new Error('Only a run with an award can be explained.');
  const runObjective = run.objective!;
  const ctx: WordsContext = { currency: problem.currency ?? 'EUR', unit: problem.unit ?? 'units' };
  const unit = ctx.unit;
  const total = problem.regions.reduce((s, r) => s + r.demand, 0);
  const rules = problem.rules;
  const excluded = new Set(rules.exclude);
  const isSole = (region: string) => rules.sourcing === 'sole' || rules.soleRegions.includes(region);
  const vendorName = (id: string) => problem.vendors.find((v) => v.id === id)?.name ?? id;
  const priceOf = (vendor: string, region: string): number | undefined => {
    const v = problem.vendors.find((x) => x.id === vendor);
    return v && Object.prototype.hasOwnProperty.call(v.prices, region) ? v.prices[region] : undefined;
  };
  let solves = 0;
  const solve = async (p: ValidAwardProblem) => {
    options.signal?.throwIfAborted();
    solves++;
    return options.solve(p);
  };

  /** The problem with vendor `vendor`'s prices and fee changed. */
  const withVendor = (vendor: string, change: (v: ValidAwardProblem['vendors'][number]) => Partial<ValidAwardProblem['vendors'][number]>): ValidAwardProblem => ({
    ...problem,
    vendors: problem.vendors.map((v) => (v.id === vendor ? { ...v, ...change(v) } : v)),
  });
  /** i must supply the whole of region j: the other bids for j are set aside. */
  const forcedProblem = (vendor: string, region: string): ValidAwardProblem => ({
    ...problem,
    vendors: problem.vendors.map((v) => (v.id === vendor ? v : { ...v, prices: recordByCode(Object.entries(v.prices).filter(([code]) => code !== region)) })),
  });

  // Every (vendor, region) a compliant vendor bid and got nothing of: each gets a forced re-solve.
  const pairs: { vendor: string; region: string }[] = [];
  for (const v of problem.vendors) {
    if (excluded.has(v.id)) continue;
    for (const r of problem.regions) {
      if (priceOf(v.id, r.id) !== undefined && qtyOf(run, v.id, r.id) <= EPS) pairs.push({ vendor: v.id, region: r.id });
    }
  }
  const losers = problem.vendors.filter((v) => !excluded.has(v.id) && !isAwarded(run, v.id) && Object.keys(v.prices).length > 0);
  const progressTotal = pairs.length + losers.length;
  let done = 0;
  const tick = () => options.onProgress?.(++done, progressTotal);
  options.onProgress?.(0, progressTotal);

  const forced = new Map<string, { result: AwardResult; reason: ExplanationReason }>();
  const key = (vendor: string, region: string) => `${vendor}\u0000${region}`;

  /** Infeasible forced award: the rule that, left out, makes one possible (capacity when none does). */
  async function blockingRule(vendor: string, region: string): Promise<ExplanationReason> {
    const v = problem.vendors.find((x) => x.id === vendor)!;
    const demand = problem.regions.find((r) => r.id === region)!.demand;
    const cap = v.capacity ?? total;
    if (isSole(region) && (cap < demand - EPS || (rules.maxRegionShare ?? 1) < 1)) return 'soleRegions';
    if ((rules.maxRegionShare ?? 1) < 1) return 'maxRegionShare';
    if (cap < demand - EPS) return 'capacity';
    if (rules.maxVendorShare !== undefined && rules.maxVendorShare * total < demand - EPS) return 'maxVendorShare';
    const candidates: (keyof typeof rules & ExplanationReason)[] = ['maxVendors', 'smeShare', 'minAwardQuantity', 'maxVendorShare', 'awardIncrement', 'require', 'minVendors'];
    for (const rule of candidates) {
      const present = rule === 'require' ? rules.require.length > 0 : rules[rule] !== undefined;
      if (!present) continue;
      const base = forcedProblem(vendor, region);
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
      const demand = problem.regions.find((r) => r.id === region)!.demand;
      if (rules.minAwardQuantity !== undefined && rules.minAwardQuantity > demand + EPS && forcedAll > demand + EPS) return 'minAwardQuantity';
      // Not awarded at all: its fee is what stands between it and the region when the forced award
      // costs no more than that fee, or its unit price undercuts a price awarded there.
      const extra = f.objective! - runObjective;
      const dearestAwarded = Math.max(0, ...run.awards.flatMap((a) => a.lines.filter((l) => l.region === region && l.quantity > 0).map((l) => l.unitPrice)));
      if (v.fixedFee > 0 && (extra <= v.fixedFee + EPS * Math.max(1, v.fixedFee) || (priceOf(vendor, region) ?? Infinity) < dearestAwarded)) return 'fixedFee';
    }
    return 'price';
  }

  async function forceOne(vendor: string, region: string): Promise<void> {
    const result = await solve(forcedProblem(vendor, region));
    const reason = usable(result) ? reasonFromForced(vendor, region, result)
      : result.status === 'infeasible' ? await blockingRule(vendor, region) : 'unsettled';
    forced.set(key(vendor, region), { result, reason });
  }

  const concurrency = options.concurrency ?? 2;
  const splitPairs: { vendor: string; region: string }[] = [];
  const settled = (vendor: string, region: string) => {
    if (isSole(region)) tick();
    else splitPairs.push({ vendor, region });
  };
  // A vendor with no award, required: the cheapest award that includes it. Every region it supplies
  // whole there is settled by that one solve — any award with it in such a region includes it, so
  // none costs less — and its own forced re-solve is saved.
  const paired = new Set(pairs.map((p) => key(p.vendor, p.region)));
  await pool(losers, concurrency, async (v) => {
    const required = await solve({ ...problem, rules: { ...rules, require: [...rules.require, v.id] } });
    if (!usable(required)) return;
    for (const r of problem.regions) {
      if (!paired.has(key(v.id, r.id)) || qtyOf(required, v.id, r.id) < r.demand - EPS * Math.max(1, r.demand)) continue;
      forced.set(key(v.id, r.id), { result: required, reason: reasonFromForced(v.id, r.id, required) });
      settled(v.id, r.id);
    }
  });
  await pool(pairs.filter((p) => !forced.has(key(p.vendor, p.region))), concurrency, async ({ vendor, region }) => {
    await forceOne(vendor, region);
    settled(vendor, region);
  });

  const runProven = run.status === 'optimal';
  const regionById = new Map(problem.regions.map((r) => [r.id, r]));

  // Region by region: who supplies it, and the cheapest compliant bid that got none of it.
  const regions: RegionExplanation[] = problem.regions.map((r) => {
    const awarded = run.awards.flatMap((a) => a.lines.filter((l) => l.region === r.id && l.quantity > 0)
      .map((l) => ({ vendor: a.vendor, vendorName: vendorName(a.vendor), quantity: l.quantity, unitPrice: l.unitPrice })));
    const candidates = pairs.filter((p) => p.region === r.id)
      .map((p) => ({ vendor: p.vendor, price: priceOf(p.vendor, r.id)! }))
      .sort((a, b) => a.price - b.price);
    const best = candidates[0];
    let challenger: RegionChallenger | null = null;
    if (best) {
      const { result: f, reason } = forced.get(key(best.vendor, r.id))!;
      const ok = usable(f);
      const extraCost = ok ? Math.max(0, f.objective! - runObjective) : null;
      const exact = ok && runProven && f.status === 'optimal';
      const extraCostAtLeast = ok && !exact && f.bound !== null ? Math.max(0, f.bound - runObjective) : null;
      const v = problem.vendors.find((x) => x.id === best.vendor)!;
      const fullElsewhere = v.capacity !== null && qtyOf(run, v.id) >= v.capacity - EPS * v.capacity;
      const why = reasonWords(reason, { capacity: v.capacity, forecast: r.demand, unit, fullElsewhere });
      const figure = reason === 'unsettled' ? 'no extra cost can be stated'
        : extraCost !== null && exact && extraCost <= EPS * Math.max(1, runObjective)
        ? 'an equally cheap award with it exists; the award kept the other'
        : extraCostWords({ extraCost, exact, extraCostAtLeast }, ctx);
      challenger = {
        vendor: best.vendor, vendorName: vendorName(best.vendor), unitPrice: best.price, reason,
        words: `${vendorName(best.vendor)} bid ${moneyWords(best.price, ctx)} per ${unit} but was not awarded it: ${why}; ${figure}.`,
        extraCost, exact, extraCostAtLeast,
      };
    }
    return { region: r.id, regionName: r.name ?? r.id, forecast: r.demand, awarded, challenger };
  });

  // Debrief prices.
  const needed = new Map<string, DebriefRegion>();
  const priceTolerance = (price: number) => (0.005 * price > 0.01 ? { step: 0.005 * price, tolerance: 'percent' as const } : { step: 0.01, tolerance: 'cent' as const });

  function debriefWords(vendor: string, region: string, neededPrice: number | null, reason: ExplanationReason): string {
    const price = priceOf(vendor, region)!;
    const v = problem.vendors.find((x) => x.id === vendor)!;
    const fullElsewhere = v.capacity !== null && qtyOf(run, v.id) >= v.capacity - EPS * v.capacity;
    if (neededPrice === null && reason === 'unsettled') return 'Not worked out: working the award out again did not finish within the time limit.';
    if (neededPrice === null) return `No unit price would have won it this region: ${reasonWords(reason, { capacity: v.capacity, forecast: regionById.get(region)!.demand, unit, fullElsewhere })}.`;
    const cut = price > 0 ? (price - neededPrice) / price : 0;
    return `It would have been awarded this region at ${moneyWords(neededPrice, ctx)} per ${unit} or less (its bid: ${moneyWords(price, ctx)}, ${percentWords(cut)} lower).`;
  }

  for (const { vendor, region } of pairs) {
    if (!isSole(region)) continue;
    const { result: f, reason } = forced.get(key(vendor, region))!;
    const price = priceOf(vendor, region)!;
    const demand = regionById.get(region)!.demand;
    const threshold = usable(f) ? price - (f.objective! - runObjective) / demand : null;
    const neededPrice = threshold !== null && threshold > 0 ? Math.max(0, floorCent(threshold)) : null;
    needed.set(key(vendor, region), { region, regionName: regionById.get(region)!.name ?? region, unitPrice: price, neededPrice, tolerance: 'cent', reason, words: debriefWords(vendor, region, neededPrice, reason) });
  }

  const winsRegion = async (vendor: string, region: string, price: number) => {
    const r = await solve(withVendor(vendor, (v) => ({ prices: recordByCode([...Object.entries(v.prices).filter(([c]) => c !== region), [region, price] as const]) })));
    return usable(r) && qtyOf(r, vendor, region) > EPS;
  };

  await pool(splitPairs, concurrency, async ({ vendor, region }) => {
    const { result: f, reason } = forced.get(key(vendor, region))!;
    const price = priceOf(vendor, region)!;
    const demand = regionById.get(region)!.demand;
    const { step, tolerance } = priceTolerance(price);
    // Whole-region threshold: at or below it the vendor surely gets the region; a part may come at a higher price.
    const threshold = usable(f) ? price - (f.objective! - runObjective) / demand : 0;
    let lo = Math.max(0, floorCent(threshold));
    let hi = price;
    let neededPrice: number | null = null;
    // Below the whole-region threshold the forced award itself beats the run, and every award
    // without the vendor in the region costs at least the run: it wins there, no solve needed.
    if ((lo > 0 && lo < threshold) || (await winsRegion(vendor, region, lo))) {
      // Confirm a step above first (usually the end), then bisect what remains.
      const above = Math.min(hi, lo + step);
      if (above < hi && (await winsRegion(vendor, region, above))) {
        lo = above;
        while (hi - lo > step) {
          const mid = (lo + hi) / 2;
          if (await winsRegion(vendor, region, mid)) lo = mid; else hi = mid;
        }
      }
      neededPrice = Math.max(0, Math.floor(lo * 100 + 1e-6) / 100);
    }
    needed.set(key(vendor, region), { region, regionName: regionById.get(region)!.name ?? region, unitPrice: price, neededPrice, tolerance, reason, words: debriefWords(vendor, region, neededPrice, reason) });
    tick();
  });

  // Uniform cut for vendors with no award.
  const uniform = new Map<string, VendorDebrief['uniformReduction']>();
  const scaled = (vendor: string, r: number) => withVendor(vendor, (v) => ({
    fixedFee: v.fixedFee * (1 - r),
    prices: recordByCode(Object.entries(v.prices).map(([c, p]) => [c, p * (1 - r)] as const)),
  }));
  const winsAny = async (vendor: string, r: number) => {
    const res = await solve(scaled(vendor, r));
    return usable(res) && isAwarded(res, vendor);
  };
  await pool(losers, concurrency, async (v) => {
    const prices = Object.values(v.prices).filter((p) => p > 0);
    const minPrice = prices.length ? Math.min(...prices) : 0;
    const centStep = minPrice > 0 ? 0.01 / minPrice : 0;
    const step = Math.max(0.005, centStep);
    const tolerance = centStep > 0.005 ? 'cent' as const : 'percent' as const;
    // Bracket: forcing it into a region, its own value there v_f and the extra e: at r = e / v_f that award beats the run.
    let hint = 1;
    for (const [k, { result: f }] of forced) {
      if (!k.startsWith(`${v.id}\u0000`) || !usable(f)) continue;
      const value = f.awards.find((a) => a.vendor === v.id)?.value ?? 0;
      if (value > 0) hint = Math.min(hint, Math.max(0, f.objective! - runObjective) / value);
    }
    let hi = Math.min(1, hint + 1e-6);
    let fraction: number | null = null;
    // Just above the hint that forced award, cut, costs less than the run, and every award without
    // the vendor costs at least the run: it wins there, no solve needed.
    let wins = hint < 1 || (await winsAny(v.id, hi));
    if (!wins && hi < 1) { hi = 1; wins = await winsAny(v.id, 1); }
    if (wins) {
      let lo = 0;
      const below = hi - step;
      if (below > 0 && (await winsAny(v.id, below))) {
        hi = below;
        while (hi - lo > step) {
          const mid = (lo + hi) / 2;
          if (await winsAny(v.id, mid)) hi = mid; else lo = mid;
        }
      }
      fraction = Math.min(1, Math.ceil(hi * 1000 - 1e-6) / 1000);
    }
    uniform.set(v.id, {
      fraction, tolerance,
      words: fraction === null
        ? 'No uniform cut of its prices would have won it an award: the rules keep it out.'
        : `A cut of ${percentWords(fraction)} to all its prices, fixed fee included, would have won it an award.`,
    });
    tick();
  });

  const debrief: VendorDebrief[] = problem.vendors
    .filter((v) => !excluded.has(v.id) && Object.keys(v.prices).length > 0)
    .map((v) => ({
      vendor: v.id, vendorName: vendorName(v.id), awarded: isAwarded(run, v.id),
      regions: problem.regions.map((r) => needed.get(key(v.id, r.id))).filter((d): d is DebriefRegion => d !== undefined),
      uniformReduction: uniform.get(v.id) ?? null,
    }))
    .filter((d) => d.regions.length > 0 || d.uniformReduction !== null);

  return {
    currency: ctx.currency, unit, objective: runObjective, runProven, regions, debrief,
    solves, seconds: Math.round((performance.now() - started) / 10) / 100,
  };
}
