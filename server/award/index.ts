import type { AwardResult } from '../../shared/award';
import { buildModel } from './build-model';
import { diagnose, solverOnlyInfeasible } from './diagnose';
import { emptyResult, extractAward, relativeGap } from './extract';
import { greedyIncumbent } from './heuristic';
import { toInstance, validateProblem } from './instance';
import { portfolioEngine } from './portfolio';
import { plainEngines, type EngineId, type SolverEngine } from './solve';
import { verifyAward } from './verify';

export { AwardInputError, type AwardFieldError } from './errors';
export { closeSolverPool } from './workers';
export { debriefVendor, explainAward, explainRegion, rangesOf, type ExplainOptions, type SolveFn } from './explain';
export type { EngineId } from './solve';

export interface SolveAwardOptions {
  /** Cancels the solve: the promise rejects with the signal's reason and the workers are stopped. */
  signal?: AbortSignal;
  /** Overrides the problem's `options.timeLimitSeconds`. */
  timeLimitSeconds?: number;
  /**
   * `tendara` (default): glpk.js and HiGHS started together, sharing awards, then on larger
   * models a large neighbourhood search improving the best award, and with cores to spare a
   * second HiGHS run on a model reduced with the best award so far (portfolio.ts); or one
   * engine alone, unseeded (`glpk`, `highs`), as the benchmark's baselines.
   */
  engine?: EngineId;
}

/**
 * The award engine's one entry point: validate → diagnose → build model → solve (worker
 * threads) → extract → verify. Throws AwardInputError for an invalid problem (nothing solved);
 * every other outcome, infeasible included, is an AwardResult.
 */
export async function solveAward(input: unknown, options: SolveAwardOptions = {}): Promise<AwardResult> {
  const started = performance.now();
  const seconds = () => Math.round((performance.now() - started) / 10) / 100;
  const problem = validateProblem(input);
  const inst = toInstance(problem);
  const timeLimit = options.timeLimitSeconds ?? inst.timeLimitSeconds;
  options.signal?.throwIfAborted();

  const reasons = diagnose(inst);
  if (reasons.length > 0) {
    return emptyResult({ status: 'infeasible', engine: 'pre-solve checks', solveSeconds: seconds(), diagnosis: reasons });
  }

  const { model, map } = buildModel(inst);
  const engineId = options.engine ?? 'tendara';
  const engine: SolverEngine = engineId === 'tendara' ? portfolioEngine : plainEngines[engineId];
  const outcome = await engine.solve({
    model, map, timeLimitSeconds: timeLimit, relativeGap: inst.relativeGap, signal: options.signal,
    // Only the combined engine is seeded, so `glpk` and `highs` stay the plain solvers the benchmark compares against.
    seed: engineId === 'tendara' ? (signal) => greedyIncumbent(inst, model, map, 1000, signal) : undefined,
  });

  if (outcome.status === 'infeasible') {
    return emptyResult({ status: 'infeasible', engine: outcome.engine, solveSeconds: seconds(), diagnosis: [solverOnlyInfeasible(inst)] });
  }
  if (!outcome.values) {
    const why = outcome.status === 'failed'
      ? `The solver failed: ${outcome.message ?? 'no reason given'}.`
      : `No award was found within the time limit of ${timeLimit} s; allow more time.`;
    return emptyResult({ status: 'failed', engine: outcome.engine, solveSeconds: seconds(), diagnosis: [why], bound: outcome.bound, boundSource: outcome.boundSource });
  }

  const award = extractAward(inst, map, outcome.values);
  const violations = verifyAward(problem, award.awards, award.objective);
  if (violations.length > 0) {
    return emptyResult({ status: 'failed', engine: outcome.engine, solveSeconds: seconds(), diagnosis: violations.map((v) => `The solver's award breaks a rule: ${v}.`) });
  }
  const status = outcome.status === 'optimal' ? 'optimal' : 'feasible';
  const bound = outcome.bound === null ? null : Math.min(outcome.bound, award.objective);
  return {
    status,
    objective: award.objective,
    fixedCost: award.fixedCost,
    variableCost: award.variableCost,
    bound,
    boundSource: outcome.boundSource,
    gap: status === 'optimal' && inst.relativeGap === 0 ? 0 : relativeGap(award.objective, bound),
    solveSeconds: seconds(),
    engine: outcome.engine,
    awards: award.awards,
    diagnosis: [],
  };
}
