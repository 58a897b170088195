// Solver worker for HiGHS (the `highs` package, HiGHS compiled to WebAssembly); each worker
// thread keeps one loaded runtime. Compiled with the server (dist/), run through tsx from source.
import type { Highs, HighsCallbackMap } from 'highs';
import { boardObjective, bestAward, publishAward } from '../award-board';
import type { MipModel } from '../model';
import type { EngineOutcome, RelaxationOutcome } from '../solve';
import { createHighsModel, engineLabel, highsRuntime } from './highs-model';

export interface HighsTask {
  model: MipModel;
  timeLimitSeconds: number;
  relativeGap: number;
  incumbent?: Float64Array;
  relax?: boolean;
  board?: SharedArrayBuffer;
  randomSeed?: number;
  heuristicEffort?: number;
  deadlineEpochMs?: number;
}

/** Callbacks that publish this run's improving awards and take in cheaper ones from the board. */
function sharingCallbacks(highs: Highs, board: SharedArrayBuffer, numCols: number): HighsCallbackMap {
  const cb = highs.constants.callbackType;
  return {
    [cb.mipImprovingSolution]: (event) => {
      const x = event.data.mip_solution;
      const objective = event.data.objective_function_value;
      if (x && x.length === numCols && objective !== undefined && Number.isFinite(objective)) publishAward(board, objective, x);
    },
    [cb.mipUserSolution]: (event) => {
      const mine = event.data.mip_primal_bound ?? Infinity;
      const theirs = boardObjective(board);
      if (!(theirs < mine - 1e-9 * Math.max(1, Math.abs(theirs)))) return;
      const best = bestAward(board, numCols);
      if (best) event.setSolution(best.x);
    },
  };
}

/**
 * Solves the MIP; an optional incumbent (full column vector) seeds the search. With
 * `relax: true` it solves the LP relaxation instead and also returns the reduced costs.
 */
export default async function solveWithHighs({ model, timeLimitSeconds, relativeGap, incumbent, relax, board, randomSeed, heuristicEffort, deadlineEpochMs }: HighsTask): Promise<EngineOutcome | RelaxationOutcome> {
  const highs = await highsRuntime();
  const started = performance.now();
  const engine = engineLabel(highs);
  const isMip = !relax && model.integer.some(Boolean);
  const m = createHighsModel(highs, model, isMip);
  try {
    m.options.set({ output_flag: false, time_limit: Math.max(0.5, deadlineEpochMs ? Math.min(timeLimitSeconds, (deadlineEpochMs - Date.now()) / 1000) : timeLimitSeconds), mip_rel_gap: relativeGap, mip_abs_gap: 1e-6 });
    if (randomSeed !== undefined) m.options.set('random_seed', randomSeed);
    if (heuristicEffort !== undefined) m.options.set('mip_heuristic_effort', heuristicEffort);
    if (incumbent && isMip) m.setSolution({ colValue: incumbent });
    m.run(board && isMip ? sharingCallbacks(highs, board, model.numCols) : undefined);
    const st = m.getModelStatus();
    const S = highs.constants.modelStatus;
    const seconds = (performance.now() - started) / 1000;
    if (st === S.infeasible || st === S.unboundedOrInfeasible) {
      return { status: 'infeasible', values: null, objective: null, bound: null, boundSource: null, seconds, engine };
    }
    const hasSolution = Number(m.info.get('primal_solution_status')) === 2;
    const rawBound = isMip ? Number(m.info.get('mip_dual_bound')) : (st === S.optimal ? m.getObjectiveValue() : NaN);
    const bound = Number.isFinite(rawBound) ? rawBound : null;
    const values = hasSolution ? Float64Array.from(m.getSolution().colValue) : null;
    const objective = hasSolution ? m.getObjectiveValue() : null;
    const boundSource = isMip ? 'HiGHS branch-and-cut dual bound' : relax ? 'LP relaxation (HiGHS simplex)' : 'LP optimum (HiGHS)';
    if (relax) {
      const sol = m.getSolution();
      const rowDuals = st === S.optimal ? Float64Array.from(sol.rowDual) : null;
      return { status: st === S.optimal ? 'optimal' : 'unknown', values, objective, bound, boundSource, seconds, engine, reducedCosts: st === S.optimal ? Float64Array.from(sol.colDual) : null, rowDuals };
    }
    if (st === S.optimal) return { status: 'optimal', values, objective, bound, boundSource, seconds, engine };
    return { status: hasSolution ? 'feasible' : 'unknown', values, objective, bound, boundSource, seconds, engine };
  } finally {
    m.dispose();
  }
}
