import { once } from 'node:events';
import type { AwardProblem } from '../../shared/award';
import { bestAward, newBoard, publishAward } from '../../server/award/award-board';
import { buildModel } from '../../server/award/build-model';
import { extractAward } from '../../server/award/extract';
import { satisfiesRows } from '../../server/award/heuristic';
import { toInstance, validateProblem } from '../../server/award/instance';
import type { MipModel } from '../../server/award/model';
import { costOf } from '../../server/award/reduced-model';
import { HIGHS_WORKER, LNS_WORKER, runInWorker, type EngineOutcome } from '../../server/award/solve';
import { verifyAward } from '../../server/award/verify';
import { closeSolverPool, solverPool } from '../../server/award/workers';
import { waitFor } from '../support/wait';
import { largeSoleProblem, prng } from './support/problems';

// The large neighbourhood search (server/award/workers/lns-worker.ts) run on its own against a
// board, the way the Tendara engine runs it beside HiGHS. Runs are bounded by a number of rounds,
// not by time, so that what they find does not depend on how busy the machine is.
jest.setTimeout(120_000);
afterAll(() => closeSolverPool());

/** Sole and split regions mixed, with every kind of rule that adds a row to the model. */
function ruledProblem(seed: number): AwardProblem {
  const base = largeSoleProblem(14, 70, seed);
  const rnd = prng(seed + 1);
  return {
    ...base,
    vendors: base.vendors.map((v, i) => ({ ...v, sme: i % 3 === 0 })),
    rules: {
      sourcing: 'split',
      soleRegions: base.regions.filter((_, j) => j % 2 === 0).map((r) => r.id),
      maxVendors: 9,
      minVendors: 3,
      maxVendorShare: 0.45,
      minAwardQuantity: 40,
      smeShare: 0.15 + 0.05 * rnd(),
      require: ['V4'],
      exclude: ['V5'],
    },
  };
}

function setUp(problem: AwardProblem) {
  const valid = validateProblem(problem);
  const inst = toInstance(valid);
  const { model, map } = buildModel(inst);
  return { valid, inst, model, map, structure: { open: map.open, supply: map.supply } };
}

/**
 * A poor but feasible start: HiGHS on the same rows with shuffled costs, integer columns rounded.
 * The rows are the model's, so the award is feasible; the costs are not, so it is far from optimal.
 */
async function poorStart(model: MipModel, seed: number): Promise<Float64Array> {
  const rnd = prng(seed);
  const shuffled = { ...model, colCost: model.colCost.map((c) => c * (0.2 + 3 * rnd())) };
  const o = await runInWorker(HIGHS_WORKER, { model: shuffled, timeLimitSeconds: 10, relativeGap: 0.05 });
  expect(o.values).not.toBeNull();
  const x = Float64Array.from(o.values!, (v, c) => (model.integer[c] ? Math.round(v) : v));
  expect(satisfiesRows(model, x)).toBe(true);
  return x;
}

describe('the large neighbourhood search', () => {
  test('every award it publishes meets every row of the model and every rule of the tender, and each is cheaper than the last', async () => {
    const { valid, inst, model, map, structure } = setUp(ruledProblem(3));
    const board = newBoard(model);
    const start = await poorStart(model, 5);
    publishAward(board, costOf(model, start), start);

    // Watch the board while the search runs and keep every award that appears on it.
    const seen: { objective: number; x: Float64Array }[] = [];
    const watch = setInterval(() => {
      const b = bestAward(board, model.numCols);
      if (b && (seen.length === 0 || b.objective < seen[seen.length - 1].objective)) seen.push(b);
    }, 2);
    const outcome = await runInWorker<EngineOutcome>(LNS_WORKER, { model, structure, board, timeLimitSeconds: 40, maxRounds: 15, randomSeed: 7 });
    clearInterval(watch);
    const last = bestAward(board, model.numCols)!;
    if (last.objective < seen[seen.length - 1].objective) seen.push(last);

    expect(seen.length).toBeGreaterThan(1);
    expect(outcome).toMatchObject({ status: 'feasible', bound: null, objective: last.objective });
    expect(outcome.objective!).toBeLessThan(costOf(model, start));
    for (const award of seen) {
      expect(satisfiesRows(model, award.x)).toBe(true);
      expect(award.objective).toBeCloseTo(costOf(model, award.x), 6);
      const extracted = extractAward(inst, map, award.x);
      expect(verifyAward(valid, extracted.awards, extracted.objective)).toEqual([]);
    }
    for (let k = 1; k < seen.length; k++) expect(seen[k].objective).toBeLessThan(seen[k - 1].objective);
  });

  test('it waits for a first award on the board and improves the one it is given', async () => {
    const { model, structure } = setUp(largeSoleProblem(20, 90, 4));
    const board = newBoard(model);
    const start = await poorStart(model, 9);
    // No thread left from earlier tests: a thread in the pool is this run's.
    await closeSolverPool();
    const run = runInWorker<EngineOutcome>(LNS_WORKER, { model, structure, board, timeLimitSeconds: 40, maxRounds: 10, randomSeed: 1 });
    // Published only once the thread has started (the hook: the pool holds it), so it had to wait.
    void waitFor('the search thread to start', () => solverPool(LNS_WORKER).threads.length > 0, { everyMs: 20 })
      .then(() => publishAward(board, costOf(model, start), start));
    const outcome = await run;
    expect(outcome.status).toBe('feasible');
    expect(outcome.objective!).toBeLessThan(costOf(model, start));
    expect(outcome.message).toMatch(/^\d+ neighbourhoods, [1-9]\d* improvements$/);
  });

  test('on a sole award tender it starts with the Lagrangian bound, counts the pairs its reduced-cost fixing rules out, and its award meets every row and rule', async () => {
    const problem = largeSoleProblem(20, 90, 4);
    const { valid, inst, model, map } = setUp(problem);
    const board = newBoard(model);
    const start = await poorStart(model, 5);
    publishAward(board, costOf(model, start), start);
    const outcome = await runInWorker<EngineOutcome>(LNS_WORKER, {
      model, structure: { open: map.open, supply: map.supply, soleColumn: map.soleColumn }, board, timeLimitSeconds: 20, maxRounds: 3, randomSeed: 1, lagrangianShare: 0.1, kernelShare: 0.3,
    });
    expect(['feasible', 'optimal']).toContain(outcome.status);
    expect(outcome.objective!).toBeLessThan(costOf(model, start));
    expect(satisfiesRows(model, outcome.values!)).toBe(true);
    const extracted = extractAward(inst, map, outcome.values!);
    expect(verifyAward(valid, extracted.awards, extracted.objective)).toEqual([]);
    expect(outcome.boundSource).toMatch(/^Lagrangian relaxation .*; Lagrangian reduced-cost fixing ruled out \d+ of \d+ region-vendor pairs and \d+ vendors$/);
    expect(outcome.bound!).toBeLessThanOrEqual(outcome.objective! + 1e-6 * outcome.objective!);
  });

  test('with no award ever on the board it returns none at its deadline', async () => {
    const { model, structure } = setUp(largeSoleProblem(10, 40, 2));
    const outcome = await runInWorker<EngineOutcome>(LNS_WORKER, { model, structure, board: newBoard(model), timeLimitSeconds: 1 });
    expect(outcome).toMatchObject({ status: 'unknown', values: null, objective: null, bound: null });
  });

  test('an abort stops it at once: the call rejects with the reason, the board changes no more, and the next run works', async () => {
    const { model, structure } = setUp(largeSoleProblem(30, 150, 11));
    const board = newBoard(model);
    const start = await poorStart(model, 2);
    publishAward(board, costOf(model, start), start);
    const published = new Int32Array(board, 0, 2)[1];
    const controller = new AbortController();
    const run = runInWorker(LNS_WORKER, { model, structure, board, timeLimitSeconds: 60 }, controller.signal);
    // At the abort, the search runs on one of the pool's threads: the hook is their exit.
    // Aborted once the search has improved the board at least once (so it surely runs), not after a guessed pause.
    let ended: Promise<unknown>[] = [];
    void waitFor('the search to improve the board once', () => new Int32Array(board, 0, 2)[1] > published, { everyMs: 20 }).then(() => {
      ended = solverPool(LNS_WORKER).threads.map((thread) => once(thread, 'exit'));
      controller.abort(new Error('solve finished elsewhere'));
    });
    await expect(run).rejects.toThrow('solve finished elsewhere');
    const version = new Int32Array(board, 0, 2)[1];
    // Once every one of those threads has ended (the aborted one terminated, the idle ones by closing
    // the pools) nothing can write to the board: any write after the rejection is caught, no pause.
    await closeSolverPool();
    await Promise.all(ended);
    expect(ended.length).toBeGreaterThan(0);
    expect(new Int32Array(board, 0, 2)[1]).toBe(version);

    const small = setUp(largeSoleProblem(10, 40, 2));
    const again = newBoard(small.model);
    const seed = await poorStart(small.model, 3);
    publishAward(again, costOf(small.model, seed), seed);
    const after = await runInWorker<EngineOutcome>(LNS_WORKER, { model: small.model, structure: small.structure, board: again, timeLimitSeconds: 40, maxRounds: 3 });
    expect(after.status).toBe('feasible');
  });
});
