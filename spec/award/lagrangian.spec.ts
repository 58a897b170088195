import loadHighs from 'highs';
import { buildModel } from '../../server/award/build-model';
import { toInstance, validateProblem } from '../../server/award/instance';
import { satisfiesRows } from '../../server/award/kernel';
import { awardOf, improve, knapsack, lagrangianFixing, relaxed, repair, soleData, subgradient } from '../../server/award/lagrangian';
import { createHighsModel } from '../../server/award/workers/highs-model';
import { readInstance, readOptima, REFERENCE_DIR, referenceAvailable } from '../../server/bench/reference';
import { baseProblem } from './support/problems';
import { referenceLp } from './support/reference-lp';
import { dataOf, owners, tightSoleProblem, withinCapacities } from './support/sole';

// The Lagrangian bound for sole award (server/award/lagrangian.ts) is a lower bound: never above
// an optimum proven by HiGHS from npm on the independently written model (support/reference-lp.ts)
// nor above a published optimum. Runs are bounded by a number of subgradient steps, never by time.
jest.setTimeout(300_000);

let highs: Awaited<ReturnType<typeof loadHighs>>;
beforeAll(async () => { highs = await loadHighs(); });

/** The LP relaxation of the engine's model by HiGHS: its value and the assignment rows' duals. */
function lpRelaxation(model: ReturnType<typeof buildModel>['model'], n: number): { value: number; duals: Float64Array } {
  const lp = createHighsModel(highs, model, false);
  try {
    lp.options.set({ output_flag: false });
    lp.run();
    const rowDual = lp.getSolution().rowDual;
    return { value: lp.getObjectiveValue(), duals: Float64Array.from({ length: n }, (_, j) => rowDual[model.rowNames.indexOf(`demand_${j}`)]) };
  } finally {
    lp.dispose();
  }
}

describe('one vendor\'s knapsack', () => {
  test('values 6, 10, 12 with weights 1, 2, 3 in a capacity of 5: 22 (the second and third), by dynamic programming', () => {
    const take = new Uint8Array(3);
    const r = knapsack(Float64Array.of(6, 10, 12), Float64Array.of(1, 2, 3), [0, 1, 2], 5, take);
    expect(r).toEqual({ value: 22, exact: true });
    expect(Array.from(take)).toEqual([0, 1, 1]);
  });

  test('fractional weights fall back to the Dantzig bound: 6 + 10 + 2/3 of 12 = 24, above the optimum 22', () => {
    const take = new Uint8Array(3);
    const r = knapsack(Float64Array.of(6, 10, 12), Float64Array.of(1, 2, 3.0000001), [0, 1, 2], 5, take);
    expect(r.exact).toBe(false);
    expect(r.value).toBeCloseTo(24, 4);
  });
});

describe('Lagrangian bound on seeded random sole tenders, against HiGHS\'s proven optimum', () => {
  const seeds = [1, 2, 3, 4, 5, 6];

  test.each(seeds)('seed %i (8 vendors × 30 regions, tight caps): bound ≤ optimum, and every repaired award meets the model\'s rows', (seed) => {
    const problem = tightSoleProblem(8, 30, seed);
    const reference = highs.solve(referenceLp(problem), { output_flag: false, mip_rel_gap: 0 });
    expect(reference.Status).toBe('Optimal');
    const optimum = reference.ObjectiveValue;
    const { data, model } = dataOf(problem);
    let repaired = 0;
    const r = subgradient(data, {
      upper: Infinity, iterations: 300,
      onAward: (award) => { repaired++; expect(satisfiesRows(model, award.x)).toBe(true); },
    });
    expect(repaired).toBeGreaterThan(0);
    expect(r.bound).toBeLessThanOrEqual(optimum + 1e-6 * optimum);
    expect(r.best!.objective).toBeGreaterThanOrEqual(optimum - 1e-6 * optimum);
  });

  test('seed 5: the Lagrangian bound from the LP duals is above the LP bound (LP 5416.59, Lagrangian above 5500, optimum 5574.10)', () => {
    const problem = tightSoleProblem(8, 30, 5);
    const { data, model } = dataOf(problem);
    const lp = lpRelaxation(model, data.n);
    expect(lp.value).toBeCloseTo(5416.59, 1);
    const first = relaxed(data, lp.duals);
    // At the LP duals the relaxation keeps what the LP kept and adds integrality: it is not weaker.
    expect(first.bound).toBeGreaterThanOrEqual(lp.value - 1e-6 * lp.value);
    const r = subgradient(data, { upper: 5574.1, iterations: 300, start: lp.duals });
    expect(r.bound).toBeGreaterThan(5500);
    expect(r.bound).toBeLessThanOrEqual(5574.1 + 1e-6);
  });

  test('seed 1: the bound meets HiGHS\'s optimum 5247.90, so the repaired award is proven best', () => {
    const { data } = dataOf(tightSoleProblem(8, 30, 1));
    const r = subgradient(data, { upper: Infinity, iterations: 300 });
    expect(r.best!.objective).toBeCloseTo(5247.9, 6);
    expect(r.bound).toBeCloseTo(5247.9, 4);
  });

  test('a split award model has no Lagrangian bound here (sole award only)', () => {
    const problem = { ...tightSoleProblem(4, 10, 1), rules: { sourcing: 'split' as const } };
    const { model, map } = buildModel(toInstance(validateProblem(problem)));
    expect(soleData(model, map)).toBeNull();
  });

  test('repair returns nothing when the open vendors cannot cover the regions', () => {
    const { data } = dataOf(tightSoleProblem(8, 30, 2));
    const none = { bound: 0, open: new Float64Array(data.m), taken: new Uint8Array(data.m * data.n), exact: true, worth: new Float64Array(data.m) };
    expect(repair(data, none)).toBeNull();
  });
});

/** HiGHS's proven optimum of the engine's own model: its total and column vector. */
function solveExactly(model: ReturnType<typeof buildModel>['model']): { objective: number; x: Float64Array } {
  const mip = createHighsModel(highs, model, true);
  try {
    mip.options.set({ output_flag: false, mip_rel_gap: 0, mip_abs_gap: 1e-6 });
    mip.run();
    expect(mip.getModelStatus()).toBe(highs.constants.modelStatus.optimal);
    return { objective: mip.getObjectiveValue(), x: Float64Array.from(mip.getSolution().colValue) };
  } finally {
    mip.dispose();
  }
}

describe('local search of the Lagrangian heuristic (shift, swap, close a vendor, open a vendor)', () => {
  test('the hand-worked tender: from V3 on Ashford and V1 on Brenley (560) to V1 on Ashford and V2 on Brenley (300, the optimum)', () => {
    // Sole award costs (price × 100 t): V1 A 100, B 300; V2 A 300, B 100; V3 (cap 100 t) A 200, B 200; fees 50, 50, 10.
    const { data, model } = dataOf(baseProblem({ sourcing: 'sole' }));
    const start = Int32Array.of(2, 0);
    expect(awardOf(data, start).objective).toBe(560);
    const result = awardOf(data, improve(data, start));
    expect(Array.from(result.owner)).toEqual([0, 1]);
    expect(result.objective).toBe(300);
    expect(satisfiesRows(model, result.x)).toBe(true);
  });

  test.each([1, 2, 3, 4, 5, 6])('seed %i (12 vendors × 60 regions, tight caps): from a poor award (each region to the vendor with most room left, in order), cheaper, within every cap, meets every row', (seed) => {
    const { data, model } = dataOf(tightSoleProblem(12, 60, seed));
    const load = new Float64Array(data.m);
    const start = new Int32Array(data.n).fill(-1);
    // A deliberately poor start: regions in their order, each to the vendor with the most room left.
    for (let j = 0; j < data.n; j++) {
      let pick = -1;
      for (let i = 0; i < data.m; i++) {
        if (!(data.cost[i * data.n + j] < Infinity) || load[i] + data.demand[j] > data.cap[i]) continue;
        if (pick < 0 || data.cap[i] - load[i] > data.cap[pick] - load[pick]) pick = i;
      }
      expect(pick).toBeGreaterThanOrEqual(0);
      start[j] = pick;
      load[pick] += data.demand[j];
    }
    const before = awardOf(data, start);
    const after = awardOf(data, improve(data, start));
    expect(withinCapacities(data, after.owner)).toBe(true);
    expect(satisfiesRows(model, after.x)).toBe(true);
    expect(after.objective).toBeLessThan(before.objective);
  });
});

describe('Lagrangian reduced-cost fixing never removes the optimum (seeded tenders, HiGHS\'s proven optimum)', () => {
  test.each([1, 2, 3, 4, 5, 6])('seed %i (8 vendors × 30 regions, tight caps): with the optimum itself as the upper limit, some pairs are fixed, none of HiGHS\'s optimal award, and HiGHS on the fixed model finds the same optimum', (seed) => {
    const problem = tightSoleProblem(8, 30, seed);
    const { data, model } = dataOf(problem);
    const exact = solveExactly(model);
    const lp = lpRelaxation(model, data.n);
    const r = subgradient(data, { upper: exact.objective, iterations: 300, start: lp.duals });
    // The optimum itself as the upper limit: the tightest case, where a wrong fixing would show.
    const fixing = lagrangianFixing(data, r.multipliers, exact.objective);
    expect(fixing.fixedPairs).toBeGreaterThan(0);
    const owner = owners(data, exact.x);
    for (let j = 0; j < data.n; j++) expect(fixing.pairs[owner[j] * data.n + j]).toBe(0);
    for (let i = 0; i < data.m; i++) if (exact.x[data.open[i]] > 0.5) expect(fixing.vendors[i]).toBe(0);
    const colUpper = Float64Array.from(model.colUpper);
    for (let i = 0; i < data.m; i++) {
      if (fixing.vendors[i]) colUpper[data.open[i]] = 0;
      for (let j = 0; j < data.n; j++) if (fixing.pairs[i * data.n + j]) colUpper[data.supply[i][j]] = 0;
    }
    const reduced = solveExactly({ ...model, colUpper: Array.from(colUpper) });
    expect(Math.abs(reduced.objective - exact.objective)).toBeLessThanOrEqual(1e-6 * exact.objective);
  });

  test('an upper limit below the optimum (no award is that cheap) rules out pairs of the optimal award: the check above would see a wrong limit', () => {
    const { data, model } = dataOf(tightSoleProblem(8, 30, 1));
    const exact = solveExactly(model);
    const r = subgradient(data, { upper: exact.objective, iterations: 300, start: lpRelaxation(model, data.n).duals });
    // Seed 1's bound meets the optimum (test above): 1 below it, every choice is ruled out.
    const fixing = lagrangianFixing(data, r.multipliers, exact.objective - 1);
    const owner = owners(data, exact.x);
    expect(Array.from(owner).some((i, j) => fixing.pairs[i * data.n + j] === 1)).toBe(true);
  });
});

const available = referenceAvailable();
if (!available) {
  // eslint-disable-next-line jest/no-disabled-tests -- skipped on purpose when the reference folder is absent, so the run says so
  describe.skip(`Lagrangian bound against published optima: ${REFERENCE_DIR} is absent, checks skipped`, () => {
    // eslint-disable-next-line jest/expect-expect -- a placeholder that is never run, named in the skipped list
    test('Holmberg p1–p10 and Yang y1 bounds are at most the published optima', () => undefined);
  });
} else {
  describe(`Lagrangian bound against published optima — needs ${REFERENCE_DIR}`, () => {
    const entries = readOptima().filter((e) => (e.set === 'holmberg' && Number(e.name.slice(1)) <= 10) || e.name === 'y1');

    test('Holmberg p1–p10 and Yang y1 are present', () => {
      expect(entries.map((e) => e.name)).toEqual(['p1', 'p2', 'p3', 'p4', 'p5', 'p6', 'p7', 'p8', 'p9', 'p10', 'y1']);
    });

    test.each(entries.map((e) => [e.name, e] as const))('%s: bound ≤ published sole optimum, and above the LP bound', (_name, entry) => {
      const { data, model } = dataOf(readInstance(entry, 'sole'));
      const lp = lpRelaxation(model, data.n);
      const r = subgradient(data, { upper: Infinity, iterations: 200, start: lp.duals });
      expect(r.bound).toBeLessThanOrEqual(entry.soleOptimum! + 1e-6 * entry.soleOptimum!);
      expect(r.bound).toBeGreaterThanOrEqual(lp.value - 1e-6 * lp.value);
    });
  });
}
