import { availableParallelism } from 'node:os';
import { bestAward, newBoard, publishAward } from './award-board';
import { cleaned, satisfiesRows } from './kernel';
import { asFullModel, costOf, fixByReducedCost } from './reduced-model';
import { GLPK_WORKER, HIGHS_WORKER, LNS_WORKER, runInWorker, type EngineOutcome, type EngineRequest, type RelaxationOutcome, type SolverEngine } from './solve';

/**
 * The Tendara engine (see MODEL.md, "Solving"). The runs share every award they find through a
 * board in shared memory:
 *  - glpk.js, the default first engine, on the model as built (tender-sized problems are proven
 *    here), for a short share of the limit, at a lower thread priority;
 *  - HiGHS A on the model as built, started at the same moment: nothing waits in front of it, so
 *    on problems HiGHS proves in well under a second the engine is as fast as HiGHS alone;
 *  - on sole award models of some size, instead of glpk.js, the Lagrangian bound and heuristic
 *    (lagrangian.ts) first in the neighbourhood-search thread, then the search over the vendors
 *    that serve (open-set-search.ts) from the best
 *    award, reduced-cost fixing and a kernel search: its bound closes the search once an award
 *    meets it;
 *  - once glpk.js stops without a proof, on models of some size, a large neighbourhood search
 *    (workers/lns-worker.ts) on the core glpk.js leaves free, at a lower thread priority and
 *    resting when it stops gaining: it improves the best award on the board and publishes what
 *    it finds, so HiGHS A prunes with it;
 *  - HiGHS B, when cores are to spare, once glpk.js stops: LP relaxation (proven bound, reduced
 *    costs), the best award so far (glpk.js, HiGHS A, or else a greedy award), reduced-cost
 *    fixing with its cost, then HiGHS with another seed on that smaller, seeded model.
 * The first proof wins and the other runs are stopped; otherwise the cheapest award is kept with
 * the highest proven bound.
 */

// glpk.js races for this share of the limit only (at least 1 s): on hard problems HiGHS proves
// faster, and a glpk.js that cannot finish only takes CPU from HiGHS.
const GLPK_SHARE = 0.025;
const FIXING = 'HiGHS on the model reduced by LP reduced-cost fixing';
// A second HiGHS run pays off only with a core to spare for it. Measured on a busy two-core
// machine (same run, 60 s limit): two runs side by side each went at half speed (p56: 46 s against
// 23 s for HiGHS alone), and stopping A to restart on the reduced, seeded model lost more than
// it won (p59, p62, p66: 5–6 s slower each). So on two cores HiGHS A goes on alone.
const SPARE_CORES = availableParallelism() > 2;
// The neighbourhood search starts only on models of this many columns or more: smaller ones are
// proven by glpk.js or HiGHS A within a second or two, before it could help.
const LNS_MIN_COLUMNS = 1000;
// On sole award models the neighbourhood-search thread first spends this share of the limit on
// the Lagrangian bound and heuristic (lagrangian.ts): a bound above the LP's, and awards repaired
// from the relaxed solutions; the bound then closes the search once an award meets it.
const LAGRANGIAN_SHARE = 0.15;
// Then, on the same thread, the search over the vendors that serve (open-set-search.ts) until
// this share of the limit has passed,
const SEARCH_SHARE = 0.4;
// and the kernel search (workers/lns-worker.ts) until this one: HiGHS on the model restricted to
// the promising vendors and pairs.
const KERNEL_SHARE = 0.5;

const decisive = (o: EngineOutcome) => o.status === 'optimal' || o.status === 'infeasible';

/** HiGHS B: LP relaxation, best award so far, reduced-cost fixing, HiGHS on the reduced model. */
async function reducedRun(request: EngineRequest, board: SharedArrayBuffer, deadline: number, signal: AbortSignal): Promise<EngineOutcome> {
  const { model, relativeGap } = request;
  const started = performance.now();
  const remaining = () => Math.max(0.5, (deadline - performance.now()) / 1000);
  const lpRun = runInWorker<RelaxationOutcome>(HIGHS_WORKER, { model, relax: true, timeLimitSeconds: remaining(), relativeGap }, signal);
  // The greedy award (on this thread, while the LP runs) is only worth its second when no other
  // run has found an award yet.
  let source = 'best';
  if (!bestAward(board, model.numCols)) {
    const greedy = request.incumbent ?? (await request.seed?.(signal)) ?? null;
    if (greedy && publishAward(board, costOf(model, greedy), greedy)) source = 'greedy';
  }
  const lp = await lpRun;
  signal.throwIfAborted();
  if (lp.status === 'infeasible') return lp;
  const best = bestAward(board, model.numCols);
  const incumbent = best?.x ?? null;
  const upper = best?.objective ?? Infinity;
  const lower = lp.objective ?? -Infinity;
  if (lp.status !== 'optimal' || !lp.values || !lp.reducedCosts || !incumbent) {
    return runInWorker(HIGHS_WORKER, { relativeGap, board, model, incumbent: incumbent ?? undefined, randomSeed: 20_260, timeLimitSeconds: remaining(), deadlineEpochMs: Date.now() + remaining() * 1000 }, signal);
  }
  if (upper - lower <= 1e-6 * Math.max(1, Math.abs(upper)) + relativeGap * Math.abs(upper)) {
    const engine = source === 'greedy' ? `Tendara greedy award, proven by the LP bound of ${lp.engine}` : lp.engine;
    return { status: 'optimal', values: incumbent, objective: upper, bound: lower, boundSource: `LP relaxation (HiGHS) meets ${source === 'greedy' ? 'the greedy award' : 'the best award so far'}`, seconds: (performance.now() - started) / 1000, engine };
  }
  const reduced = fixByReducedCost(model, lower, lp.values, lp.reducedCosts, upper).model;
  const o = await runInWorker(HIGHS_WORKER, { relativeGap, board, model: reduced, incumbent, randomSeed: 20_260, timeLimitSeconds: remaining(), deadlineEpochMs: Date.now() + remaining() * 1000 }, signal);
  return asFullModel(o, incumbent, upper, lower, `${FIXING}, seeded with ${source === 'greedy' ? 'the greedy award' : 'the best award so far'}`);
}

/**
 * The large neighbourhood search (workers/lns-worker.ts) over the board's best award, to the
 * deadline. It starts from the greedy award when that is cheaper than what the board holds (often
 * glpk.js's award at this point, far from optimal: neighbourhoods of a poor award are slow to
 * solve and gain little each). The greedy award is built on this thread (it yields to the event
 * loop after every round and stops after a second) while the core is free.
 */
async function neighbourhoodRun(request: EngineRequest, board: SharedArrayBuffer, deadline: number, signal: AbortSignal): Promise<EngineOutcome> {
  const { model, map } = request;
  if (!map || model.numCols < LNS_MIN_COLUMNS) throw new Error('no neighbourhood search on a small model');
  signal.throwIfAborted();
  const greedy = await request.seed?.(signal).catch(() => null);
  if (greedy) publishAward(board, costOf(model, greedy), greedy);
  signal.throwIfAborted();
  const seconds = Math.max(0.5, (deadline - performance.now()) / 1000);
  return runInWorker(LNS_WORKER, {
    model, structure: { open: map.open, supply: map.supply, soleColumn: map.soleColumn }, board, timeLimitSeconds: seconds, deadlineEpochMs: Date.now() + seconds * 1000,
    randomSeed: 20_260, lagrangianShare: LAGRANGIAN_SHARE, searchShare: SEARCH_SHARE, kernelShare: KERNEL_SHARE, relativeGap: request.relativeGap,
  }, signal);
}

export const portfolioEngine: SolverEngine = {
  id: 'tendara',
  async solve(request) {
    const { model, relativeGap, timeLimitSeconds } = request;
    const started = performance.now();
    const deadline = started + timeLimitSeconds * 1000;
    const stops = [new AbortController(), new AbortController(), new AbortController(), new AbortController()];
    const cancel = () => stops.forEach((c) => c.abort(request.signal?.reason));
    request.signal?.addEventListener('abort', cancel, { once: true });
    const board = newBoard(model);
    if (request.incumbent) publishAward(board, costOf(model, request.incumbent), request.incumbent);
    try {
      request.signal?.throwIfAborted();
      const glpkLimit = Math.min(timeLimitSeconds, Math.max(1, GLPK_SHARE * timeLimitSeconds));
      // glpk.js runs in its own pool at a lower thread priority (workers/glpk-worker.ts), so on a
      // busy machine it does not slow HiGHS A down.
      const highsA = runInWorker(HIGHS_WORKER, { model, timeLimitSeconds, relativeGap, board, randomSeed: 0, incumbent: request.incumbent }, stops[1].signal);
      // On a sole award model of some size the Lagrangian bound and heuristic take glpk.js's
      // place from the start: glpk.js does not prove such models in its short share, and they
      // need the core it would hold.
      const lagrangianFirst = !!request.map && model.numCols >= LNS_MIN_COLUMNS && request.map.soleColumn.every(Boolean);
      const glpk = lagrangianFirst
        ? Promise.reject(new Error('the Lagrangian bound runs instead of glpk.js on a large sole award model'))
        : runInWorker(GLPK_WORKER, { model, timeLimitSeconds: glpkLimit, relativeGap }, stops[0].signal);
      // Runs that start when glpk.js stops, so that glpk.js and they never compete for a core.
      const afterGlpk = glpk.catch(() => null).then((g) => {
        if (g && decisive(g)) throw new Error('glpk.js finished first');
        if (g?.values && g.objective !== null) publishAward(board, g.objective, g.values);
      });
      const highsB = afterGlpk.then(() => {
        if (!SPARE_CORES) throw new Error('no core to spare for a second HiGHS run');
        stops[2].signal.throwIfAborted();
        return reducedRun(request, board, deadline, stops[2].signal);
      });
      const lns = afterGlpk.then(() => neighbourhoodRun(request, board, deadline, stops[3].signal));
      const tagged = [glpk, highsA, highsB, lns].map((p, k) => p.then((o) => ({ k, o }), (error: unknown) => {
        if (request.signal?.aborted) throw error;
        return { k, o: null as EngineOutcome | null };
      }));
      const pending = new Set([0, 1, 2, 3]);
      const done: EngineOutcome[] = [];
      while (pending.size > 0) {
        const { k, o } = await Promise.race(tagged.filter((_, i) => pending.has(i)));
        pending.delete(k);
        request.signal?.throwIfAborted();
        if (!o) continue;
        done.push(o);
        if (decisive(o)) {
          const bounds = done.map((d) => d.bound).filter((b): b is number => b !== null && (o.objective === null || b <= o.objective));
          const seconds = (performance.now() - started) / 1000;
          return bounds.length ? { ...o, bound: Math.max(...bounds), seconds } : { ...o, seconds };
        }
      }
      return combine(done, boardAward(board, model));
    } finally {
      stops.forEach((c) => c.abort(new Error('finished')));
      request.signal?.removeEventListener('abort', cancel);
    }
  },
};

/**
 * The board's award as an outcome, when it meets every row once rounded: a run stopped by its
 * watchdog (a thread slow to start on a busy machine) leaves its awards there, and so does the
 * greedy award.
 */
function boardAward(board: SharedArrayBuffer, model: EngineRequest['model']): EngineOutcome | null {
  const b = bestAward(board, model.numCols);
  if (!b) return null;
  const x = cleaned(model, b.x);
  if (!satisfiesRows(model, x)) return null;
  return { status: 'feasible', values: x, objective: costOf(model, x), bound: null, boundSource: null, seconds: 0, engine: 'Tendara (best award on the shared board)' };
}

/** Every run stopped without proof: keep the cheapest award (the runs' or the board's) and the highest proven bound. */
function combine(found: EngineOutcome[], onBoard: EngineOutcome | null): EngineOutcome {
  const outcomes = onBoard ? [...found, onBoard] : found;
  if (outcomes.length === 0) return { status: 'failed', values: null, objective: null, bound: null, boundSource: null, seconds: 0, engine: 'Tendara', message: 'no engine returned a result' };
  const withAward = outcomes.filter((o) => o.values !== null && o.objective !== null).sort((a, b) => a.objective! - b.objective!);
  const best = withAward[0] ?? outcomes.find((o) => o.status !== 'failed') ?? outcomes[0];
  const top = outcomes.filter((o) => o.bound !== null).sort((a, b) => b.bound! - a.bound!)[0];
  return { ...best, status: best.values ? 'feasible' : best.status, bound: top?.bound ?? null, boundSource: top ? `${top.boundSource} (${top.engine})` : null };
}
