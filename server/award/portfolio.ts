import type { MipModel } from './model';
import { GLPK_WORKER, HIGHS_WORKER, runInWorker, type EngineOutcome, type EngineRequest, type RelaxationOutcome, type SolverEngine } from './solve';

/**
 * The Tendara engine (see MODEL.md, "Solving"): glpk.js first, then HiGHS beside it with cheap
 * accelerations: an LP relaxation (proven bound, reduced costs), a greedy award as seed,
 * reduced-cost fixing with that award's cost, and, for long solves, a second run (kernel MIP, then
 * another seed) sharing awards with the first through shared memory. The first proof wins
 * (glpk.js on small problems, usually); the other workers are stopped.
 */

// glpk.js alone gets this head start: most real tenders are proven in well under a second.
const HEAD_START_SECONDS = 0.5;
// glpk.js keeps racing for this share of the limit only (at least 1 s): on hard problems HiGHS
// proves faster, and on two shared cores a glpk.js that cannot finish only slows HiGHS down.
const GLPK_SHARE = 0.025;
// The second HiGHS run (kernel, then another seed) joins only when the first has not finished
// within this share of the limit: on a busy machine it would halve the first run's speed, so it
// is kept for the long solves, where a second search path and better awards pay off.
const SECOND_RUN_AFTER_SHARE = 0.25;
// The kernel gets a small part of the time; it only has to find a good award, not prove it.
const KERNEL_SHARE = 0.1;
const KERNEL_MAX_SECONDS = 5;
const KERNEL_PER_ROW = 4;

const decisive = (o: EngineOutcome) => o.status === 'optimal' || o.status === 'infeasible';

export function costOf(model: MipModel, x: ArrayLike<number>): number {
  let s = 0;
  for (let c = 0; c < model.numCols; c++) s += model.colCost[c] * x[c];
  return s;
}

/** Columns worth keeping in the kernel: LP support, incumbent support, few cheapest per equality row. */
export function kernelColumns(model: MipModel, lp: ArrayLike<number>, rc: ArrayLike<number>, incumbent?: ArrayLike<number>): boolean[] {
  const keep = model.integer.map((isInt, c) => !isInt || lp[c] > 1e-6 || (incumbent !== undefined && incumbent[c] > 1e-6));
  const inEquality = new Array<boolean>(model.numCols).fill(false);
  for (let r = 0; r < model.rowNames.length; r++) {
    if (model.rowLower[r] !== model.rowUpper[r]) continue;
    const cols: number[] = [];
    for (let k = model.rowStarts[r]; k < model.rowStarts[r + 1]; k++) {
      const c = model.rowIndex[k];
      inEquality[c] = true;
      if (model.integer[c]) cols.push(c);
    }
    cols.sort((a, b) => rc[a] - rc[b]).slice(0, KERNEL_PER_ROW).forEach((c) => { keep[c] = true; });
  }
  // Integer columns outside every equality row (the award decisions y_i) always stay.
  model.integer.forEach((isInt, c) => { if (isInt && !inEquality[c]) keep[c] = true; });
  return keep;
}

/**
 * Reduced-cost fixing: a column at 0 in the LP with reduced cost rc > 0 raises any solution's cost
 * to at least lp + rc·x, so in an award cheaper than `upper` it is at most (upper − lp)/rc: binaries
 * beyond that are fixed at 0, continuous bounds tightened. No award cheaper than `upper` is lost.
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

/** A fresh award board for the HiGHS runs (layout in workers/shared-incumbent.mjs). */
function newBoard(model: MipModel, incumbent: Float64Array | null, upper: number): SharedArrayBuffer {
  const board = new SharedArrayBuffer(8 + 8 * (model.numCols + 1));
  const nums = new Float64Array(board, 8);
  nums[0] = incumbent ? upper : Infinity;
  if (incumbent) nums.set(incumbent, 1);
  return board;
}

/**
 * What a run on a model reduced by reduced-cost fixing with `upper` means for the full model:
 * every award cheaper than `upper` survived the fixing, so "infeasible" or an optimum not below
 * `upper` proves the incumbent optimal, and the run's bound is valid up to `upper`.
 */
function asFullModel(o: EngineOutcome, incumbent: Float64Array | null, upper: number, lower: number, how: string): EngineOutcome {
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

/**
 * HiGHS part of the Tendara engine. After the LP relaxation and the greedy award, two runs share
 * an award board in shared memory:
 *  A. HiGHS on the model reduced with the greedy award's cost, seeded with it, starts at once;
 *  B. if A is still running after a quarter of the limit: a kernel MIP that hunts for a cheaper
 *     award (published to the board, so A takes it in), then HiGHS with another random seed on the
 *     model reduced again with that cheaper award's cost.
 * The first proof wins; MIP search times vary widely with the seed and the model's size.
 */
async function highsPipeline(request: EngineRequest, deadline: number, signal: AbortSignal): Promise<EngineOutcome> {
  const { model, relativeGap } = request;
  const remaining = () => Math.max(0.5, (deadline - performance.now()) / 1000);
  const started = performance.now();
  const lpRun = runInWorker<RelaxationOutcome>(HIGHS_WORKER, { model, relax: true, timeLimitSeconds: remaining(), relativeGap }, signal);
  // The greedy award is computed on this thread while the LP runs in its worker.
  const incumbent = request.incumbent ?? (await request.seed?.()) ?? null;
  const lp = await lpRun;
  if (lp.status === 'infeasible') return lp;
  const upper = incumbent ? costOf(model, incumbent) : Infinity;
  if (lp.status !== 'optimal' || !lp.values || !lp.reducedCosts || lp.objective === null) {
    return runInWorker(HIGHS_WORKER, { model, timeLimitSeconds: remaining(), relativeGap, incumbent: incumbent ?? undefined }, signal);
  }
  const lower = lp.objective;
  const lpValues = lp.values;
  const rc = lp.reducedCosts;
  const gapClosed = (ub: number) => ub - lower <= 1e-6 * Math.max(1, Math.abs(ub)) + relativeGap * Math.abs(ub);
  const provenBy = (values: Float64Array, objective: number, what: string, engine: string): EngineOutcome =>
    ({ status: 'optimal', values, objective, bound: lower, boundSource: `LP relaxation (HiGHS) meets the ${what} award`, seconds: (performance.now() - started) / 1000, engine });
  if (incumbent && gapClosed(upper)) return provenBy(incumbent, upper, 'greedy', `Tendara greedy award, proven by the LP bound of ${lp.engine}`);
  const reduceWith = (ub: number) => (Number.isFinite(ub) ? fixByReducedCost(model, lower, lpValues, rc, ub).model : model);

  const board = newBoard(model, incumbent, upper);
  const stops = [new AbortController(), new AbortController()];
  const onAbort = () => stops.forEach((c) => c.abort(signal.reason));
  signal.addEventListener('abort', onAbort, { once: true });
  // Runs may wait in the pool's queue, so their limits count down to one absolute deadline.
  const common = { relativeGap, board, timeLimitSeconds: remaining(), deadlineEpochMs: Date.now() + remaining() * 1000 };
  const fixing = 'HiGHS on the model reduced by LP reduced-cost fixing';
  try {
    const runA = runInWorker(HIGHS_WORKER, { ...common, model: reduceWith(upper), incumbent: incumbent ?? undefined, randomSeed: 0 }, stops[0].signal)
      .then((o) => asFullModel(o, incumbent, upper, lower, `${fixing}, seeded with the greedy award`));
    const runB = (async (): Promise<EngineOutcome> => {
      const wait = request.timeLimitSeconds * SECOND_RUN_AFTER_SHARE - (performance.now() - started) / 1000;
      if (wait > 0) {
        await new Promise<void>((resolve) => {
          const timer = setTimeout(resolve, wait * 1000);
          stops[1].signal.addEventListener('abort', () => { clearTimeout(timer); resolve(); }, { once: true });
        });
      }
      stops[1].signal.throwIfAborted();
      let seed = incumbent;
      let ub = upper;
      let source = 'greedy';
      const keep = kernelColumns(model, lpValues, rc, incumbent ?? undefined);
      const kept = keep.filter((k, c) => k && model.integer[c]).length;
      if (kept < 0.6 * model.integer.filter(Boolean).length) {
        const kernel: MipModel = { ...model, colUpper: model.colUpper.map((u, c) => (keep[c] ? u : 0)) };
        const k = await runInWorker(HIGHS_WORKER, { ...common, model: kernel, incumbent: seed ?? undefined, heuristicEffort: 0.3, timeLimitSeconds: Math.min(KERNEL_MAX_SECONDS, KERNEL_SHARE * remaining()) }, stops[1].signal);
        if (k.values && k.objective !== null && k.objective < ub) {
          seed = k.values;
          ub = k.objective;
          source = 'kernel';
          if (gapClosed(ub)) return provenBy(seed, ub, 'kernel', k.engine);
        }
      }
      const o = await runInWorker(HIGHS_WORKER, { ...common, model: reduceWith(ub), incumbent: seed ?? undefined, randomSeed: 20_260 }, stops[1].signal);
      return asFullModel(o, seed, ub, lower, `${fixing}, seeded with the ${source} award`);
    })();
    const runs = [runA, runB].map((p, k) => p.then((o) => ({ k, o }), (error: unknown) => {
      if (signal.aborted) throw error;
      return { k, o: null as EngineOutcome | null };
    }));
    const pending = new Set([0, 1]);
    const done: EngineOutcome[] = [];
    while (pending.size > 0) {
      const { k, o } = await Promise.race(runs.filter((_, i) => pending.has(i)));
      pending.delete(k);
      if (!o) continue;
      done.push(o);
      if (decisive(o)) return { ...o, seconds: (performance.now() - started) / 1000 };
    }
    return { ...combine(done), seconds: (performance.now() - started) / 1000 };
  } finally {
    signal.removeEventListener('abort', onAbort);
    stops.forEach((c) => c.abort(new Error('finished')));
  }
}

export const portfolioEngine: SolverEngine = {
  id: 'tendara',
  async solve(request) {
    const deadline = performance.now() + request.timeLimitSeconds * 1000;
    const stopG = new AbortController();
    const stopH = new AbortController();
    const cancel = () => { stopG.abort(request.signal?.reason); stopH.abort(request.signal?.reason); };
    request.signal?.addEventListener('abort', cancel, { once: true });
    const swallow = <T>(p: Promise<T>) => p.catch((error: unknown) => (request.signal?.aborted ? Promise.reject(error) : null));
    try {
      const glpkLimit = Math.min(request.timeLimitSeconds, Math.max(1, GLPK_SHARE * request.timeLimitSeconds));
      const glpk = swallow(runInWorker(GLPK_WORKER, { model: request.model, timeLimitSeconds: glpkLimit, relativeGap: request.relativeGap }, stopG.signal));
      let timer: NodeJS.Timeout | undefined;
      const tick = new Promise<'tick'>((r) => { timer = setTimeout(() => r('tick'), Math.min(HEAD_START_SECONDS, request.timeLimitSeconds / 10) * 1000); });
      const head = await Promise.race([glpk, tick]);
      clearTimeout(timer);
      if (head !== 'tick' && head && decisive(head)) return head;
      const highs = swallow(highsPipeline(request, deadline, stopH.signal));
      const tagged = [glpk.then((o) => ({ k: 0, o })), highs.then((o) => ({ k: 1, o }))];
      const pending = new Set([0, 1]);
      const done: EngineOutcome[] = [];
      while (pending.size > 0) {
        const { k, o } = await Promise.race(tagged.filter((_, i) => pending.has(i)));
        pending.delete(k);
        request.signal?.throwIfAborted();
        if (!o) continue;
        done.push(o);
        if (decisive(o)) {
          (k === 0 ? stopH : stopG).abort(new Error('the other engine finished first'));
          const bounds = done.map((d) => d.bound).filter((b): b is number => b !== null && (o.objective === null || b <= o.objective));
          return bounds.length ? { ...o, bound: Math.max(...bounds) } : o;
        }
      }
      return combine(done);
    } finally {
      stopG.abort(new Error('finished'));
      stopH.abort(new Error('finished'));
      request.signal?.removeEventListener('abort', cancel);
    }
  },
};

/** Both engines stopped without proof: keep the cheaper award and the higher proven bound. */
function combine(outcomes: EngineOutcome[]): EngineOutcome {
  if (outcomes.length === 0) return { status: 'failed', values: null, objective: null, bound: null, boundSource: null, seconds: 0, engine: 'Tendara', message: 'no engine returned a result' };
  const withAward = outcomes.filter((o) => o.values !== null && o.objective !== null).sort((a, b) => a.objective! - b.objective!);
  const best = withAward[0] ?? outcomes.find((o) => o.status !== 'failed') ?? outcomes[0];
  const top = outcomes.filter((o) => o.bound !== null).sort((a, b) => b.bound! - a.bound!)[0];
  return { ...best, status: best.values ? 'feasible' : best.status, bound: top?.bound ?? null, boundSource: top ? `${top.boundSource} (${top.engine})` : null };
}
