import loadHighs from 'highs';
import type { AwardProblem } from '../../shared/award';
import { buildModel } from '../../server/award/build-model';
import { toInstance, validateProblem } from '../../server/award/instance';
import { satisfiesRows } from '../../server/award/kernel';
import { knapsack, relaxed, repair, soleData, subgradient, type SoleData } from '../../server/award/lagrangian';
import { createHighsModel } from '../../server/award/workers/highs-model';
import { readInstance, readOptima, REFERENCE_DIR, referenceAvailable } from '../../server/bench/reference';
import { largeSoleProblem } from './support/problems';
import { referenceLp } from './support/reference-lp';

// The Lagrangian bound for sole award (server/award/lagrangian.ts) is a lower bound: never above
// an optimum proven by HiGHS from npm on the independently written model (support/reference-lp.ts)
// nor above a published optimum. Runs are bounded by a number of subgradient steps, never by time.
jest.setTimeout(300_000);

let highs: Awaited<ReturnType<typeof loadHighs>>;
beforeAll(async () => { highs = await loadHighs(); });

/** largeSoleProblem with tight capacities (1.2–1.5 × an even share of the forecast): where the LP is weak. */
function tightSoleProblem(vendors: number, regions: number, seed: number): AwardProblem {
  const base = largeSoleProblem(vendors, regions, seed);
  const total = base.regions.reduce((s, r) => s + r.demand, 0);
  return { ...base, vendors: base.vendors.map((v, i) => ({ ...v, capacity: Math.ceil((total / vendors) * (1.2 + 0.1 * (i % 4))) })) };
}

function dataOf(problem: AwardProblem): { data: SoleData; model: ReturnType<typeof buildModel>['model'] } {
  const { model, map } = buildModel(toInstance(validateProblem(problem)));
  const data = soleData(model, map);
  expect(data).not.toBeNull();
  return { data: data!, model };
}

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
    const none = { bound: 0, open: new Float64Array(data.m), taken: new Uint8Array(data.m * data.n), exact: true };
    expect(repair(data, none)).toBeNull();
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
