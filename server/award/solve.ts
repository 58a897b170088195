import type { MipModel, ModelMap } from './model';
import { runOnPool } from './workers';

/** What one engine run reports back; `values` is the full column vector of the model. */
export interface EngineOutcome {
  status: 'optimal' | 'feasible' | 'infeasible' | 'unknown' | 'failed';
  values: Float64Array | null;
  objective: number | null;
  /** A proven lower bound on the optimum, or null. */
  bound: number | null;
  boundSource: string | null;
  seconds: number;
  engine: string;
  message?: string;
}

export interface EngineRequest {
  model: MipModel;
  timeLimitSeconds: number;
  relativeGap: number;
  signal?: AbortSignal;
  /** A feasible column vector to seed the search (engines that cannot use it ignore it). */
  incumbent?: Float64Array;
  /** Where the vendors' and regions' columns are (the combined engine's neighbourhood search needs it). */
  map?: ModelMap;
  /** Computes a seed on demand (the combined engine calls it only when no run has an award yet); stops when `signal` aborts. */
  seed?: (signal?: AbortSignal) => Promise<Float64Array | null>;
}

/** A MIP engine behind one interface, so the pipeline never depends on a given solver. */
export interface SolverEngine {
  readonly id: EngineId;
  solve(request: EngineRequest): Promise<EngineOutcome>;
}

/** `tendara`: the combined engine (portfolio.ts); `glpk`, `highs`: one solver alone. */
export type EngineId = 'glpk' | 'highs' | 'tendara';

// Grace period past the time limit before a worker that ignores its limit is stopped.
const GRACE_SECONDS = 10;

/** Extra fields of an LP-relaxation run (HiGHS worker with `relax: true`). */
export interface RelaxationOutcome extends EngineOutcome {
  reducedCosts: Float64Array | null;
  /** Row duals of the LP optimum (the Lagrangian bound starts its multipliers from them). */
  rowDuals: Float64Array | null;
}

/**
 * Runs one task in a solver worker. The worker is terminated when `signal` aborts or when it
 * overruns its time limit; a crash comes back as a `failed` outcome, an abort as a rejection.
 */
export async function runInWorker<T extends EngineOutcome>(file: string, payload: Record<string, unknown> & { timeLimitSeconds: number }, signal?: AbortSignal): Promise<T> {
  const controller = new AbortController();
  const onAbort = () => controller.abort(signal?.reason);
  signal?.addEventListener('abort', onAbort, { once: true });
  const watchdog = setTimeout(() => controller.abort(new Error('time limit overrun')), (payload.timeLimitSeconds + GRACE_SECONDS) * 1000);
  const started = performance.now();
  try {
    signal?.throwIfAborted();
    return (await runOnPool(file, payload, controller.signal)) as T;
  } catch (err) {
    if (signal?.aborted) throw signal.reason ?? err;
    const message = err instanceof Error ? err.message : String(err);
    return { status: 'failed', values: null, objective: null, bound: null, boundSource: null, seconds: (performance.now() - started) / 1000, engine: file === GLPK_WORKER ? 'glpk.js' : 'HiGHS', message } as T;
  } finally {
    clearTimeout(watchdog);
    signal?.removeEventListener('abort', onAbort);
  }
}

export const GLPK_WORKER = 'glpk-worker';
export const HIGHS_WORKER = 'highs-worker';
export const LNS_WORKER = 'lns-worker';

/** glpk.js alone on the model as built (the default engine's first solver, and a baseline). */
export const glpkEngine: SolverEngine = {
  id: 'glpk',
  solve: ({ model, timeLimitSeconds, relativeGap, signal }) => runInWorker(GLPK_WORKER, { model, timeLimitSeconds, relativeGap }, signal),
};

/** HiGHS alone; uses the incumbent when one is given. */
export const highsEngine: SolverEngine = {
  id: 'highs',
  solve: ({ model, timeLimitSeconds, relativeGap, signal, incumbent }) => runInWorker(HIGHS_WORKER, { model, timeLimitSeconds, relativeGap, incumbent }, signal),
};

/** The plain engines; the combined engine lives in portfolio.ts. */
export const plainEngines = { glpk: glpkEngine, highs: highsEngine };
