import loadHighs from 'highs';
import { costOf, randomSource, satisfiesRows } from '../../server/award/kernel';
import { awardOf, improve, relaxed, subgradient, totalOf, type SoleData } from '../../server/award/lagrangian';
import { searchOpenSets } from '../../server/award/open-set-search';
import { readInstance, readOptima, REFERENCE_DIR, referenceAvailable } from '../../server/bench/reference';
import { referenceLp } from './support/reference-lp';
import { dataOf, owners, tightSoleProblem, withinCapacities } from './support/sole';

// The search over the vendors that serve (server/award/open-set-search.ts) and the shift chains of
// the local search (lagrangian.ts, improve) find awards, never proofs: each check compares with
// HiGHS from npm on the independently written model (support/reference-lp.ts) or with a published
// optimum. Runs are bounded by rounds and steps, never by time, and seeded: each is repeatable.
jest.setTimeout(300_000);

let highs: Awaited<ReturnType<typeof loadHighs>>;
beforeAll(async () => { highs = await loadHighs(); });

describe('shift chains in the local search', () => {
  test('hand-worked: Eastmoor to Brook (full) once Brook\'s Fenwick moves on to Cliff: 160 → 120, which no single shift or swap reaches', () => {
    // Vendors A, B (capacity 10 each), C (15); no fees. Costs of the whole region:
    //   Eastmoor (10): A 100, B 50, C 200;  Fenwick (10): A 200, B 50, C 60;  Glen (5): A 100, B 100, C 10.
    // Start: Eastmoor A, Fenwick B, Glen C = 160. Best: Eastmoor B, Fenwick C, Glen C = 50 + 60 + 10 = 120.
    const cost = Float64Array.of(100, 200, 100, 50, 50, 100, 200, 60, 10);
    const data: SoleData = {
      m: 3, n: 3, fee: new Float64Array(3), cap: Float64Array.of(10, 10, 15), demand: Float64Array.of(10, 10, 5), required: new Uint8Array(3),
      cost, totalDemand: 25, fewestVendors: 0, integral: true, numCols: 12, open: [0, 1, 2], supply: [[3, 4, 5], [6, 7, 8], [9, 10, 11]],
    };
    const after = improve(data, Int32Array.of(0, 1, 2));
    expect(Array.from(after)).toEqual([1, 2, 2]);
    expect(totalOf(data, after)).toBe(120);
  });
});

describe('search over the vendors that serve, on seeded random sole tenders, against HiGHS\'s proven optimum', () => {
  const seeds = [1, 2, 3, 4, 5, 6];
  const reached: number[] = [];
  const gained: number[] = [];

  test.each(seeds)('seed %i (8 vendors × 30 regions, tight caps): from the Lagrangian heuristic\'s award after 100 steps, 300 rounds: no dearer, within every cap, meets every row, never below the optimum', (seed) => {
    const problem = tightSoleProblem(8, 30, seed);
    const reference = highs.solve(referenceLp(problem), { output_flag: false, mip_rel_gap: 0 });
    expect(reference.Status).toBe('Optimal');
    const optimum = reference.ObjectiveValue;
    const { data, model } = dataOf(problem);
    const lagrangian = subgradient(data, { upper: Infinity, iterations: 100, lpFirst: true });
    expect(lagrangian.best).not.toBeNull();
    const start = owners(data, lagrangian.best!.x);
    const r = searchOpenSets(data, start, { worth: relaxed(data, lagrangian.multipliers).worth, random: randomSource(seed), rounds: 300 });
    expect(r.rounds).toBe(300);
    expect(withinCapacities(data, r.owner)).toBe(true);
    const award = awardOf(data, r.owner);
    expect(satisfiesRows(model, award.x)).toBe(true);
    // The search's own total agrees with the model's cost of the award's columns (kernel.ts, costOf).
    expect(costOf(model, award.x)).toBeCloseTo(r.total, 6);
    expect(r.total).toBeLessThanOrEqual(lagrangian.best!.objective + 1e-6);
    expect(r.total).toBeGreaterThanOrEqual(optimum - 1e-6 * optimum);
    if (r.total <= optimum + 1e-6 * optimum) reached.push(seed);
    if (r.total < lagrangian.best!.objective - 1e-6) gained.push(seed);
  });

  test('it reaches HiGHS\'s proven optimum on at least 4 of the 6 seeds, on two of them from a dearer start', () => {
    // Measured when written (seeded, so repeatable): optimum on seeds 1–4, from a dearer start on
    // 2 and 4; seed 5 ends 0.76 % above, seed 6 0.11 %.
    expect(reached.length).toBeGreaterThanOrEqual(4);
    expect(gained.filter((s) => reached.includes(s)).length).toBeGreaterThanOrEqual(2);
  });
});

const available = referenceAvailable();
if (!available) {
  // eslint-disable-next-line jest/no-disabled-tests -- skipped on purpose when the reference folder is absent, so the run says so
  describe.skip(`Search over the vendors that serve against published optima: ${REFERENCE_DIR} is absent, checks skipped`, () => {
    // eslint-disable-next-line jest/expect-expect -- a placeholder that is never run, named in the skipped list
    test('Yang y1 within 1 % of its published optimum, never below', () => undefined);
  });
} else {
  describe(`Search over the vendors that serve against published optima — needs ${REFERENCE_DIR}`, () => {
    test('Yang y1 (30 × 200, Yang, Chu & Chen 2012): 200 subgradient steps and 1,500 rounds end within 1 % of the published optimum 30,181, never below it', () => {
      const entry = readOptima().find((e) => e.name === 'y1')!;
      expect(entry.soleOptimum).toBe(30181);
      const { data } = dataOf(readInstance(entry, 'sole'));
      const lagrangian = subgradient(data, { upper: Infinity, iterations: 200, lpFirst: true });
      const r = searchOpenSets(data, owners(data, lagrangian.best!.x), { worth: relaxed(data, lagrangian.multipliers).worth, random: randomSource(1), rounds: 1500 });
      expect(withinCapacities(data, r.owner)).toBe(true);
      expect(r.total).toBeGreaterThanOrEqual(30181 - 0.01);
      expect(r.total).toBeLessThanOrEqual(30181 * 1.01);
    });
  });
}
