// Large neighbourhood search over the best award on the shared board (a primal heuristic: it
// finds cheaper awards, it proves nothing). Each round frees a neighbourhood of the current award
// (workers/neighbourhoods.ts), fixes every other integer column at the award's value and solves
// that sub-problem with HiGHS under a short time limit, seeded with the award itself. A cheaper
// award that meets every row of the model is published to the board, where the full HiGHS run
// takes it in at its next user-solution checkpoint and prunes with it. The neighbourhood grows
// while its sub-problems are solved quickly and shrinks when they hit their limit.
// The portfolio stops this worker by terminating its thread; on its own it stops at its deadline.
import { bestAward, publishAward } from '../award-board';
import { cleaned, costOf, randomSource, satisfiesRows } from '../kernel';
import { awardOf, lagrangianFixing, relaxed, roundedBound, soleData, subgradient, type LagrangianFixing, type SoleData } from '../lagrangian';
import { searchOpenSets } from '../open-set-search';
import type { MipModel } from '../model';
import type { EngineOutcome } from '../solve';
import { createHighsModel, engineLabel, highsRuntime, type HighsModel } from './highs-model';
import { setThreadPriority } from './low-priority';
import { neighbourhood, prepare, readAward, type ModelStructure, type NeighbourhoodKind } from './neighbourhoods';

export interface NeighbourhoodTask {
  model: MipModel;
  structure: ModelStructure & { soleColumn?: boolean[] };
  board: SharedArrayBuffer;
  timeLimitSeconds: number;
  deadlineEpochMs?: number;
  randomSeed?: number;
  maxRounds?: number;
  /**
   * On a sole award model, first the Lagrangian bound and heuristic (lagrangian.ts) for this share
   * of the time; its bound then closes the search as soon as the best award meets it.
   */
  lagrangianShare?: number;
  /** Then the search over the vendors that serve (open-set-search.ts) until this share of the time has passed (sole award only). */
  searchShare?: number;
  /** Then the kernel search until this share of the time has passed (sole award only). */
  kernelShare?: number;
  relativeGap?: number;
}

// Subgradient steps taken even when the phase's time is up (see lagrangianPhase).
const MIN_STEPS = 30;
const LAGRANGIAN_SOURCE = 'Lagrangian relaxation of the assignment rows (one knapsack per vendor)';

/**
 * The subgradient method (lagrangian.ts) from the cheapest prices, its first steps on the
 * knapsacks' LPs, until `until`: every repaired award that meets the model's rows goes on the
 * board. Returns the bound, its multipliers and the vendors' worth at them. (An LP solve for
 * starting duals came first here once; at 60 × 200 and more it took a quarter of the phase and
 * often ran out of time, while the knapsacks' LPs reach the same duals in a fraction of it.)
 */
function lagrangianPhase(model: MipModel, data: SoleData, board: SharedArrayBuffer, until: number): { bound: number; source: string; multipliers: Float64Array; worth: Float64Array } {
  // At least MIN_STEPS steps even past `until`: a few seconds at most at 80 × 400.
  let steps = 0;
  const r = subgradient(data, {
    upper: bestAward(board, model.numCols)?.objective ?? Infinity, iterations: 5000, lpFirst: true,
    stop: () => ++steps > MIN_STEPS && Date.now() > until,
    onAward: (award) => {
      if (satisfiesRows(model, award.x)) publishAward(board, award.objective, award.x);
      const theirs = bestAward(board, model.numCols);
      return theirs?.objective;
    },
  });
  return { bound: r.bound, source: `${LAGRANGIAN_SOURCE}, ${r.iterations} subgradient steps`, multipliers: r.multipliers, worth: relaxed(data, r.multipliers).worth };
}

/** The owner of each region in a sole award x (−1 where none). */
function ownersOf(data: SoleData, x: ArrayLike<number>): Int32Array {
  const owner = new Int32Array(data.n).fill(-1);
  for (let i = 0; i < data.m; i++) {
    for (let j = 0; j < data.n; j++) {
      const c = data.supply[i][j];
      if (c >= 0 && x[c] > 0.5) owner[j] = i;
    }
  }
  return owner;
}

/** Column upper bounds of the model with the Lagrangian fixing applied (fixed pairs and closed vendors at 0). */
function fixedUppers(model: MipModel, data: SoleData, fixing: LagrangianFixing | null): Float64Array {
  const upper = Float64Array.from(model.colUpper);
  if (!fixing) return upper;
  for (let i = 0; i < data.m; i++) {
    if (fixing.vendors[i] && data.open[i] >= 0) upper[data.open[i]] = 0;
    for (let j = 0; j < data.n; j++) if (fixing.pairs[i * data.n + j] && data.supply[i][j] >= 0) upper[data.supply[i][j]] = 0;
  }
  return upper;
}

// Kernel search: each region keeps this many vendors of the kernel at first (those with the
// smallest Lagrangian reduced cost c_ij − u_j), two more every round; the vendors outside the
// kernel join it in this many buckets, one per round.
const KERNEL_PAIRS = 4;
const KERNEL_BUCKETS = 8;

/**
 * Kernel search (after Angelelli, Mansini & Speranza 2010; MODEL.md): HiGHS on the model
 * restricted to a kernel of promising vendors — those of the best award and those the relaxation
 * opens at the multipliers u — and, per region, the pairs with the smallest Lagrangian reduced
 * cost; each round adds a bucket of further vendors (by how far their prices undercut u) and more
 * pairs per region, seeded with the best award, which is the cutoff. The last round, once the kernel holds
 * every vendor and pair the fixing left, is the exact model reduced by the fixing: a proof there is
 * a proof for the whole model. Returns the rounds run and whether that last round proved the award.
 */
function kernelSearch(args: {
  highs: Awaited<ReturnType<typeof highsRuntime>>; mip: HighsModel; model: MipModel; data: SoleData; u: Float64Array;
  base: Float64Array; board: SharedArrayBuffer; until: number; roundLimit: number;
  best: () => { x: Float64Array; objective: number }; found: (x: Float64Array, objective: number) => void;
}): { rounds: number; proven: boolean } {
  const { highs, mip, model, data, u, base, until, roundLimit } = args;
  const { m, n, cost, open, supply } = data;
  const usable = (i: number) => open[i] >= 0 && base[open[i]] > 0.5;
  const start = args.best();
  const startOwner = ownersOf(data, start.x);
  const kernel = new Uint8Array(m);
  for (let j = 0; j < n; j++) if (startOwner[j] >= 0) kernel[startOwner[j]] = 1;
  // The vendors the relaxation opens at u.
  const r = relaxed(data, u);
  for (let i = 0; i < m; i++) if (r.open[i] > 1e-9 && usable(i)) kernel[i] = 1;
  // Vendors whose prices undercut the multipliers most are the most promising.
  const undercut = Array.from({ length: m }, (_, i) => {
    let s = 0;
    for (let j = 0; j < n; j++) s += Math.min(0, cost[i * n + j] - u[j]);
    return s;
  });
  const rest = Array.from({ length: m }, (_, i) => i).filter((i) => usable(i) && !kernel[i]).sort((a, b) => undercut[a] - undercut[b]);
  const bucketSize = Math.max(1, Math.ceil(rest.length / KERNEL_BUCKETS));
  const lower = Float64Array.from(model.colLower);
  const upper = new Float64Array(model.numCols);
  const all = { kind: 'range', from: 0, to: model.numCols - 1 } as const;
  let perRegion = KERNEL_PAIRS;
  let rounds = 0;
  for (;;) {
    const remaining = (until - Date.now()) / 1000;
    if (remaining < 0.3) return { rounds, proven: false };
    const incumbent = args.best();
    const owner = ownersOf(data, incumbent.x);
    const whole = rest.length === 0 && perRegion >= m;
    upper.set(base);
    for (let i = 0; i < m; i++) if (!kernel[i] && open[i] >= 0 && owner.indexOf(i) < 0) upper[open[i]] = 0;
    for (let j = 0; j < n; j++) {
      const candidates: number[] = [];
      for (let i = 0; i < m; i++) {
        const c = supply[i][j];
        if (c < 0) continue;
        if (kernel[i] && base[c] > 0.5) candidates.push(i);
        else upper[c] = 0;
      }
      candidates.sort((a, b) => (cost[a * n + j] - u[j]) - (cost[b * n + j] - u[j]));
      for (const i of candidates.slice(perRegion)) upper[supply[i][j]] = 0;
      // The best award stays feasible in every round: it is the starting award and the cutoff.
      if (owner[j] >= 0) { upper[supply[owner[j]][j]] = 1; upper[open[owner[j]]] = 1; }
    }
    mip.changeColsBounds(all, lower, upper);
    // A round may take a third of what is left of the phase (at least the neighbourhoods' round limit).
    const limit = whole ? remaining : Math.min(Math.max(roundLimit, remaining / 3), remaining);
    mip.options.set({ time_limit: limit, random_seed: rounds });
    mip.setSolution({ colValue: incumbent.x });
    mip.run();
    rounds++;
    if (Number(mip.info.get('primal_solution_status')) === 2) {
      const x = cleaned(model, mip.getSolution().colValue);
      const objective = costOf(model, x);
      if (objective < incumbent.objective - 1e-6 * Math.max(1, incumbent.objective) && satisfiesRows(model, x)) args.found(x, objective);
    }
    if (whole) return { rounds, proven: mip.getModelStatus() === highs.constants.modelStatus.optimal };
    for (const i of rest.splice(0, bucketSize)) kernel[i] = 1;
    perRegion = rest.length === 0 && perRegion + 2 >= m ? m : perRegion + 2;
  }
}

// A round's sub-problem may use this share of the time limit (between 0.5 and 5 s).
const ROUND_SHARE = 0.05;
// Neighbourhood kinds (workers/neighbourhoods.ts), drawn in these proportions.
const KINDS: NeighbourhoodKind[] = ['vendors', 'vendors', 'vendors', 'regions', 'regions', 'random'];
// Stalling. While the search finds awards cheaper than any other run has, it runs at a reduced
// priority (low-priority.ts: GAINING_STEPS of niceness above its process's). After
// PATIENCE_ROUNDS rounds and PATIENCE_SECONDS seconds without such a gain it is stalled: lowest
// priority (niceness 19), and after each round it rests a multiple of the round's time, from 1
// and growing by 1 every REST_GROWTH_ROUNDS rounds up to MAX_REST_RATIO, until it gains again.
// Measured on this two-core machine: one busy thread beside HiGHS A
// slowed A by 25-75 % on a busy machine, and by 5-10 % on a quiet one (niceness cannot help
// there: the cores share caches and memory). Always at normal priority the search cost A 7-10 s
// on instances A proves in 20-45 s (p30, p56); at the lowest priority without resting, 1-3 s on
// a quiet machine (p32, p62, p66: +2.8, +2.1, +2.6 s); resting as long as it works, 0-1.7 s
// (same instances, -0.4 to +1.7 s), while it still reached p57's and p58's optima (at 10 s and
// 31 s instead of 12 s and 21 s). With the growing rests, the full Holmberg set took 430.7 s
// against 440.1 s for HiGHS alone in the same run (server/award/MODEL.md).
const GAINING_STEPS = 5;
const STALLED_STEPS = 19;
const PATIENCE_ROUNDS = 8;
const PATIENCE_SECONDS = 3;
const REST_GROWTH_ROUNDS = 8;
const MAX_REST_RATIO = 4;

const sleeper = new Int32Array(new SharedArrayBuffer(4));
const sleep = (ms: number) => Atomics.wait(sleeper, 0, 0, ms);

/** Sleeps `seconds` (never past the deadline), in short steps so that a terminate is never kept waiting long. */
function rest(seconds: number, deadline: number): void {
  const until = Math.min(Date.now() + seconds * 1000, deadline - 200);
  for (let left = until - Date.now(); left > 0; left = until - Date.now()) sleep(Math.min(200, left));
}

/**
 * Runs until the deadline, or `maxRounds` sub-problems, or until the thread is terminated.
 * `structure` is the model's map of vendor and region columns; `board` the shared award board.
 * Returns the best award it holds.
 */
export default async function searchNeighbourhoods({ model, structure, board, timeLimitSeconds, deadlineEpochMs, randomSeed = 1, maxRounds = Infinity, lagrangianShare = 0, searchShare = 0, kernelShare = 0, relativeGap = 0 }: NeighbourhoodTask): Promise<EngineOutcome> {
  // A thread of this pool may have ended its last search at the lowest priority.
  setThreadPriority(GAINING_STEPS);
  const highs = await highsRuntime();
  const started = performance.now();
  const engine = `${engineLabel(highs)}, large neighbourhood search`;
  const deadline = Math.min(deadlineEpochMs ?? Infinity, Date.now() + timeLimitSeconds * 1000);
  const eps = (v: number) => 1e-6 * Math.max(1, Math.abs(v));
  const roundLimit = Math.min(5, Math.max(0.5, ROUND_SHARE * timeLimitSeconds));
  const ctx = prepare(model, structure);
  const random = randomSource(randomSeed);
  const stats = { rounds: 0, improvements: 0 };

  let best = null as { x: Float64Array; objective: number } | null;
  let mine = false;
  const adoptBoard = () => {
    const b = bestAward(board, model.numCols);
    if (!b || (best && !(b.objective < best.objective - eps(best.objective)))) return false;
    const x = cleaned(model, b.x);
    // An award taken from the board is only a base to fix columns at; it must meet the rows
    // once rounded to be usable as the sub-problems' starting award.
    if (!satisfiesRows(model, x)) return false;
    best = { x, objective: costOf(model, x) };
    mine = false;
    return true;
  };
  const sole = lagrangianShare > 0 && structure.soleColumn ? soleData(model, { ...structure, soleColumn: structure.soleColumn }) : null;
  const phase = sole ? lagrangianPhase(model, sole, board, Math.min(deadline - 200, Date.now() + lagrangianShare * timeLimitSeconds * 1000)) : null;
  let proven: { bound: number; source: string } | null = phase;
  const multipliers = phase?.multipliers ?? null;
  // The best award is optimal once no award can be cheaper than the bound (every total a whole
  // number: the bound rounded up), within the relative gap asked for.
  const closed = () => !!best && !!proven && !!sole && roundedBound(sole, proven.bound) >= best.objective - eps(best.objective) - relativeGap * Math.abs(best.objective);
  while (!best && Date.now() < deadline - 200) {
    adoptBoard();
    if (!best) sleep(50);
  }
  // Column upper bounds of every sub-problem: the model's, with the Lagrangian reduced-cost fixing applied.
  let base: Float64Array<ArrayBufferLike> = Float64Array.from(model.colUpper);
  let fixing = null as LagrangianFixing | null;
  const refix = () => {
    if (!sole || !multipliers || !best) return;
    fixing = lagrangianFixing(sole, multipliers, best.objective);
    base = fixedUppers(model, sole, fixing);
  };
  refix();
  const found = (x: Float64Array, objective: number) => {
    best = { x, objective };
    mine = true;
    stats.improvements++;
    publishAward(board, objective, x);
  };
  let kernelRounds = 0;
  let searchRounds = 0;
  /** The search over the vendors that serve, from the best award, until `until`; true when it found a cheaper award. */
  const openSetSearch = (until: number): boolean => {
    if (!sole || !best) return false;
    const owner = ownersOf(sole, best.x);
    if (!owner.every((i) => i >= 0)) return false;
    const before = best.objective;
    searchRounds += searchOpenSets(sole, owner, {
      worth: phase?.worth, random, rounds: Number.MAX_SAFE_INTEGER, stop: () => Date.now() > until,
      onBest: (o, total) => {
        if (!best || total >= best.objective - eps(best.objective)) return;
        const a = awardOf(sole, o);
        if (satisfiesRows(model, a.x)) found(a.x, a.objective);
      },
    }).rounds;
    return best.objective < before - eps(before);
  };
  const fixedWords = () => (fixing ? `; Lagrangian reduced-cost fixing ruled out ${fixing.fixedPairs} of ${sole!.cost.filter((c) => c < Infinity).length} region-vendor pairs and ${fixing.closedVendors} vendors` : '');
  const outcome = (): EngineOutcome => ({
    status: closed() ? 'optimal' : best ? 'feasible' : 'unknown', values: best?.x ?? null, objective: best?.objective ?? null, bound: proven?.bound ?? null, boundSource: proven ? `${proven.source}${fixedWords()}` : null,
    seconds: (performance.now() - started) / 1000, engine: proven && sole ? `${engine} after the Lagrangian heuristic${kernelRounds ? ` and ${kernelRounds} kernel-search rounds` : ''}` : engine,
    message: `${stats.rounds} neighbourhoods, ${searchRounds ? `${searchRounds} rounds of the search over the vendors that serve, ` : ''}${kernelRounds ? `${kernelRounds} kernel-search rounds, ` : ''}${stats.improvements} improvements${mine ? '' : ' (best award found by another run)'}${fixedWords()}`,
  });
  if (!best || closed()) return outcome();
  // The search over the vendors that serve, from the best award on the board (its local search
  // first: it polishes another run's award too), until its share of the time has passed.
  const at = (share: number) => Math.min(deadline - 200, started + share * timeLimitSeconds * 1000 - performance.now() + Date.now());
  if (sole) {
    adoptBoard();
    openSetSearch(Math.max(Date.now(), at(searchShare)));
  }
  refix();
  if (closed()) return outcome();

  const m = createHighsModel(highs, model, true);
  try {
    m.options.set({ output_flag: false, mip_rel_gap: 0, mip_abs_gap: 1e-6 });
    const lower = new Float64Array(model.numCols);
    const upper = new Float64Array(model.numCols);
    const all = { kind: 'range', from: 0, to: model.numCols - 1 } as const;
    if (sole && multipliers && kernelShare > 0) {
      const until = at(kernelShare);
      const k = kernelSearch({ highs, mip: m, model, data: sole, u: multipliers, base, board, until, roundLimit: Math.max(roundLimit, 1), best: () => best!, found });
      kernelRounds = k.rounds;
      if (k.proven && best) proven = { bound: best.objective, source: 'optimum of the exact model reduced by Lagrangian reduced-cost fixing (HiGHS)' };
      refix();
      if (closed()) return outcome();
    }
    // Each kind's size (vendors, or regions for 'regions') grows while its sub-problems are
    // solved well within the limit and shrinks when they are not: the search stays where HiGHS
    // still proves the sub-problem quickly.
    const vendorCount = ctx.vendors.length;
    const limits: Record<NeighbourhoodKind, [number, number]> = { vendors: [2, vendorCount], random: [2, vendorCount], regions: [Math.min(ctx.n, 5), ctx.n] };
    const sizes: Record<NeighbourhoodKind, number> = { vendors: Math.min(vendorCount, 4), random: Math.min(vendorCount, 4), regions: Math.max(limits.regions[0], Math.round(ctx.n / 10)) };
    let idleRounds = 0;
    let lastGain = performance.now();
    let stalled = false;
    let stalledRounds = 0;
    /** A cheaper award than any run had: fix again with it, and back to the gaining priority. */
    const gaining = () => {
      refix();
      idleRounds = 0;
      lastGain = performance.now();
      if (stalled) {
        stalled = false;
        setThreadPriority(GAINING_STEPS);
      }
    };
    for (;;) {
      const remaining = (deadline - Date.now()) / 1000;
      if (remaining < 0.2 || stats.rounds >= maxRounds) break;
      if (!stalled && idleRounds >= PATIENCE_ROUNDS && performance.now() - lastGain > PATIENCE_SECONDS * 1000) {
        stalled = true;
        stalledRounds = 0;
        setThreadPriority(STALLED_STEPS);
      }
      adoptBoard();
      if (closed()) break;
      const award = readAward(ctx, best.x);
      const kind = KINDS[Math.floor(random() * KINDS.length)];
      const { free } = neighbourhood(ctx, award, kind, sizes[kind], random);
      for (let c = 0; c < model.numCols; c++) {
        // Continuous quantities stay free: with the award decisions fixed they form an LP. With an
        // award increment the quantities are integer columns (whole increments), fixed outside
        // the neighbourhood like the award decisions, so a round stays a small integer program
        // (server/award/MODEL.md, "Award increment").
        const open = free[c] === 1 || !model.integer[c];
        lower[c] = open ? model.colLower[c] : best.x[c];
        upper[c] = open ? Math.max(base[c], best.x[c]) : best.x[c];
      }
      m.changeColsBounds(all, lower, upper);
      const limit = Math.min(roundLimit, remaining);
      m.options.set({ time_limit: limit, random_seed: stats.rounds % 2_000_000 });
      m.setSolution({ colValue: best.x });
      const t0 = performance.now();
      m.run();
      const took = (performance.now() - t0) / 1000;
      stats.rounds++;
      idleRounds++;
      const solved = m.getModelStatus() === highs.constants.modelStatus.optimal;
      if (Number(m.info.get('primal_solution_status')) === 2) {
        const x = cleaned(model, m.getSolution().colValue);
        const objective = costOf(model, x);
        if (objective < best.objective - eps(best.objective) && satisfiesRows(model, x)) {
          best = { x, objective };
          mine = true;
          stats.improvements++;
          // A gain only when no other run had found as cheap an award: keeping up is none.
          if (publishAward(board, objective, x)) gaining();
        }
      }
      const [low, high] = limits[kind];
      if (solved && took < limit / 3) sizes[kind] = Math.min(high, Math.max(sizes[kind] + 1, Math.round(sizes[kind] * 1.2)));
      else if (!solved) sizes[kind] = Math.max(low, Math.min(sizes[kind] - 1, Math.round(sizes[kind] * 0.8)));
      // On a sole award model, each neighbourhood is followed by as long a search over the vendors
      // that serve: the two find different kinds of gains (an assignment HiGHS proves best within
      // a neighbourhood, another set of vendors).
      let spent = took;
      if (sole && remaining > 0.4) {
        const t1 = performance.now();
        if (openSetSearch(Math.min(deadline - 200, Date.now() + took * 1000))) gaining();
        spent += (performance.now() - t1) / 1000;
      }
      if (stalled) rest(spent * Math.min(MAX_REST_RATIO, 1 + stalledRounds++ / REST_GROWTH_ROUNDS), deadline);
    }
  } finally {
    m.dispose();
  }
  return outcome();
}
