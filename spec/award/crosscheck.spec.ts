import type { AwardProblem } from '../../shared/award';
import loadHighs from 'highs';
import { closeSolverPool, solveAward } from '../../server/award/index';
import { validateProblem } from '../../server/award/instance';
import { verifyAward } from '../../server/award/verify';
import { prng } from './support/problems';
import { referenceLp } from './support/reference-lp';

// HiGHS as reference solver: the `highs` package solves an independently written LP text of each
// random problem (support/reference-lp.ts), and the engine must agree on status and optimum.
jest.setTimeout(120_000);
afterAll(() => closeSolverPool());

const RULES = ['maxVendors', 'minVendors', 'maxVendorShare', 'maxRegionShare', 'minAwardQuantity', 'exclude', 'require', 'smeShare', 'soleRegions', 'sole'] as const;

/** A random problem with a random mix of rules; the first ten seeds each carry one rule alone. */
function randomProblem(seed: number): AwardProblem {
  const rnd = prng(seed);
  const int = (a: number, b: number) => a + Math.floor(rnd() * (b - a + 1));
  const nv = int(3, 6);
  const nr = int(2, 6);
  const regions = Array.from({ length: nr }, (_, j) => ({ id: `R${j}`, demand: int(10, 60) }));
  const total = regions.reduce((s, r) => s + r.demand, 0);
  const vendors = Array.from({ length: nv }, (_, i) => ({
    id: `V${i}`,
    fixedFee: int(0, 300),
    capacity: rnd() < 0.3 ? null : int(Math.ceil(total / nv), total),
    sme: rnd() < 0.4,
    prices: Object.fromEntries(regions.filter(() => rnd() < 0.85).map((r) => [r.id, int(5, 40) + int(0, 9) / 10])),
  }));
  const rules: NonNullable<AwardProblem['rules']> = {};
  const chosen = seed < RULES.length ? [RULES[seed]] : RULES.filter(() => rnd() < 0.3);
  for (const rule of chosen) {
    if (rule === 'maxVendors') rules.maxVendors = int(1, nv);
    if (rule === 'minVendors') rules.minVendors = int(1, 3);
    if (rule === 'maxVendorShare') rules.maxVendorShare = int(3, 10) / 10;
    if (rule === 'maxRegionShare') rules.maxRegionShare = int(5, 10) / 10;
    if (rule === 'minAwardQuantity') rules.minAwardQuantity = int(5, 40);
    if (rule === 'exclude') rules.exclude = [`V${int(0, nv - 1)}`];
    if (rule === 'require') rules.require = [`V${int(0, nv - 1)}`];
    if (rule === 'smeShare') rules.smeShare = int(1, 5) / 10;
    if (rule === 'soleRegions') rules.soleRegions = regions.filter(() => rnd() < 0.5).map((r) => r.id);
    if (rule === 'sole') rules.sourcing = 'sole';
  }
  if (rules.minVendors !== undefined && rules.maxVendors !== undefined && rules.minVendors > rules.maxVendors) rules.minVendors = rules.maxVendors;
  return { regions, vendors, rules, options: { timeLimitSeconds: 30 } };
}

/**
 * The engine and HiGHS on the independently written model (support/reference-lp.ts) agree: both
 * infeasible (the engine then says why), or both optimal with the same objective and an award the
 * verifier (server/award/verify.ts) accepts.
 */
async function expectAgreesWithHighs(highs: Awaited<ReturnType<typeof loadHighs>>, problem: AwardProblem): Promise<void> {
  const reference = highs.solve(referenceLp(problem), { output_flag: false, mip_rel_gap: 0 });
  const result = await solveAward(problem);
  if (reference.Status === 'Infeasible') {
    expect(result.status).toBe('infeasible');
    expect(result.diagnosis.length).toBeGreaterThan(0);
  } else {
    expect(reference.Status).toBe('Optimal');
    expect(result.status).toBe('optimal');
    expect(result.objective!).toBeCloseTo(reference.ObjectiveValue, 4);
    expect(verifyAward(validateProblem(problem), result.awards, result.objective!)).toEqual([]);
  }
}

describe('random problems with every rule and mixes of rules agree with HiGHS used directly', () => {
  let highs: Awaited<ReturnType<typeof loadHighs>>;
  beforeAll(async () => { highs = await loadHighs(); });

  const seeds = Array.from({ length: 40 }, (_, k) => k);
  test.each(seeds)('random problem, seed %i', async (seed) => {
    const problem = randomProblem(seed);
    await expectAgreesWithHighs(highs, problem);
  });

  test('the random set covers both feasible and infeasible problems', () => {
    const statuses = seeds.map((s) => highs.solve(referenceLp(randomProblem(s)), { output_flag: false }).Status);
    expect(statuses).toContain('Optimal');
    expect(statuses).toContain('Infeasible');
  });
});

// Increments from a lorry-load size down to a decimal one (0.1 is not exact in binary floating point).
const INCREMENTS = [1, 5, 10, 25, 0.1, 2.5];

/**
 * A random problem of the kind above with an award increment u: forecasts rounded to whole
 * multiples of u (at least one), caps and the minimum award quantity left as drawn, so most are
 * not multiples and the engine has to round them (caps down, the minimum up).
 */
function randomIncrementProblem(seed: number): AwardProblem {
  const base = randomProblem(seed);
  const increment = INCREMENTS[seed % INCREMENTS.length];
  const regions = base.regions.map((r) => ({ ...r, demand: increment * Math.max(1, Math.round(r.demand / increment)) }));
  return { ...base, regions, rules: { ...base.rules, awardIncrement: increment } };
}

describe('random problems with an award increment agree with HiGHS on the plain statement q = u · n (support/reference-lp.ts)', () => {
  let highs: Awaited<ReturnType<typeof loadHighs>>;
  beforeAll(async () => { highs = await loadHighs(); });

  const seeds = Array.from({ length: 30 }, (_, k) => k);
  test.each(seeds)('random problem with an award increment, seed %i: same status and optimum, every quantity a whole multiple', async (seed) => {
    const problem = randomIncrementProblem(seed);
    // The independent verifier (server/award/verify.ts) refuses any quantity that is not a whole multiple.
    await expectAgreesWithHighs(highs, problem);
  });

  test('the increment set covers feasible and infeasible problems, optima the increment raises above the plain ones and problems it makes infeasible', () => {
    const solve = (p: AwardProblem) => highs.solve(referenceLp(p), { output_flag: false, mip_rel_gap: 0 });
    const outcomes = seeds.map((s) => {
      const withIncrement = randomIncrementProblem(s);
      const plain = { ...withIncrement, rules: { ...withIncrement.rules, awardIncrement: undefined } };
      return { withIncrement: solve(withIncrement), plain: solve(plain) };
    });
    expect(outcomes.map((o) => o.withIncrement.Status)).toEqual(expect.arrayContaining(['Optimal', 'Infeasible']));
    const raised = outcomes.filter((o) => o.withIncrement.Status === 'Optimal' && o.plain.Status === 'Optimal'
      && o.withIncrement.ObjectiveValue > o.plain.ObjectiveValue + 1e-6);
    expect(raised.length).toBeGreaterThan(3);
    // …and problems only the increment makes infeasible (the engine must say so, with a diagnosis).
    expect(outcomes.filter((o) => o.withIncrement.Status === 'Infeasible' && o.plain.Status === 'Optimal').length).toBeGreaterThan(0);
  });
});
