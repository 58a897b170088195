import fc from 'fast-check';
import type { AwardProblem, AwardResult } from '../../shared/award';
import { closeSolverPool, solveAward } from '../../server/award/index';
import { validateProblem } from '../../server/award/instance';
import { verifyAward } from '../../server/award/verify';

// Property tests (fast-check) for the facts DESIGN.md says must always hold.
jest.setTimeout(180_000);
afterAll(() => closeSolverPool());

const RUNS = { numRuns: 12, seed: 20260 };

const problemArb: fc.Arbitrary<AwardProblem> = fc
  .record({
    demands: fc.array(fc.integer({ min: 5, max: 50 }), { minLength: 1, maxLength: 4 }),
    vendors: fc.array(
      fc.record({
        fee: fc.integer({ min: 0, max: 200 }),
        capFactor: fc.option(fc.double({ min: 0.3, max: 1.2, noNaN: true }), { nil: null }),
        sme: fc.boolean(),
        prices: fc.array(fc.option(fc.integer({ min: 1, max: 30 }), { nil: null, freq: 5 }), { minLength: 4, maxLength: 4 }),
      }),
      { minLength: 2, maxLength: 4 },
    ),
  })
  .map(({ demands, vendors }) => {
    const total = demands.reduce((s, d) => s + d, 0);
    return {
      regions: demands.map((d, j) => ({ id: `R${j}`, demand: d })),
      vendors: vendors.map((v, i) => ({
        id: `V${i}`,
        fixedFee: v.fee,
        capacity: v.capFactor === null ? null : Math.ceil(v.capFactor * total),
        sme: v.sme,
        prices: Object.fromEntries(demands.flatMap((_, j) => (v.prices[j] === null ? [] : [[`R${j}`, v.prices[j]]]))),
      })),
      options: { timeLimitSeconds: 20 },
    };
  });

const ruleArb = fc.oneof(
  fc.integer({ min: 1, max: 3 }).map((n) => ({ maxVendors: n })),
  fc.integer({ min: 1, max: 3 }).map((n) => ({ minVendors: n })),
  fc.integer({ min: 3, max: 9 }).map((n) => ({ maxVendorShare: n / 10 })),
  fc.integer({ min: 5, max: 9 }).map((n) => ({ maxRegionShare: n / 10 })),
  fc.integer({ min: 2, max: 30 }).map((n) => ({ minAwardQuantity: n })),
  fc.constant({ exclude: ['V0'] as string[] }),
  fc.constant({ require: ['V1'] as string[] }),
  fc.integer({ min: 1, max: 5 }).map((n) => ({ smeShare: n / 10 })),
  fc.constant({ soleRegions: ['R0'] as string[] }),
  fc.constant({ sourcing: 'sole' as const }),
);

const withRules = (p: AwardProblem, rules: NonNullable<AwardProblem['rules']>): AwardProblem => ({ ...p, rules: { ...p.rules, ...rules } });
const cost = (r: AwardResult) => (r.status === 'infeasible' ? Infinity : r.objective!);
const TOL = 1e-6;

function expectSolved(r: AwardResult): void {
  expect(['optimal', 'infeasible']).toContain(r.status);
}

describe('facts that must always hold', () => {
  test('a sole-award optimum is never below the split-award optimum for the same bids', async () => {
    await fc.assert(fc.asyncProperty(problemArb, async (p) => {
      const split = await solveAward(p);
      const sole = await solveAward(withRules(p, { sourcing: 'sole' }));
      expectSolved(split);
      expectSolved(sole);
      if (split.status === 'infeasible') expect(sole.status).toBe('infeasible');
      else expect(cost(sole)).toBeGreaterThanOrEqual(cost(split) - TOL * Math.max(1, cost(split)));
    }), RUNS);
  });

  test('adding a rule never lowers the optimum', async () => {
    await fc.assert(fc.asyncProperty(problemArb, ruleArb, async (p, rule) => {
      const before = await solveAward(p);
      const after = await solveAward(withRules(p, rule));
      expectSolved(before);
      expectSolved(after);
      if (before.status === 'infeasible') expect(after.status).toBe('infeasible');
      else expect(cost(after)).toBeGreaterThanOrEqual(cost(before) - TOL * Math.max(1, cost(before)));
    }), RUNS);
  });

  test('every returned award meets every rule, by the independent verifier', async () => {
    await fc.assert(fc.asyncProperty(problemArb, fc.array(ruleArb, { maxLength: 3 }), async (p, rules) => {
      const problem = withRules(p, Object.assign({}, ...rules));
      const r = await solveAward(problem);
      expectSolved(r);
      if (r.status === 'optimal') {
        expect(verifyAward(validateProblem(problem), r.awards, r.objective!)).toEqual([]);
        expect(r.awards.every((a) => a.quantity > 0)).toBe(true);
      }
    }), RUNS);
  });

  test('an award increment never lowers the optimum, nor does a coarser one (a multiple of the finer), and every award under one verifies', async () => {
    // Every quantity allowed in loads of 4u is allowed in loads of u, and every one of those is
    // allowed without an increment: each set of awards contains the next, so the optima rise.
    await fc.assert(fc.asyncProperty(problemArb, fc.constantFrom(1, 2.5, 5), async (p, fine) => {
      const coarse = 4 * fine;
      // Forecasts whole multiples of the coarse increment; caps scaled alike but 1 short, so rounding them down matters.
      const base: AwardProblem = {
        ...p,
        regions: p.regions.map((r) => ({ ...r, demand: r.demand * coarse })),
        vendors: p.vendors.map((v) => ({ ...v, capacity: v.capacity === null || v.capacity === undefined ? null : v.capacity * coarse - 1 })),
      };
      const chain = [await solveAward(base), await solveAward(withRules(base, { awardIncrement: fine })), await solveAward(withRules(base, { awardIncrement: coarse }))];
      chain.forEach(expectSolved);
      for (let k = 1; k < chain.length; k++) {
        if (chain[k - 1].status === 'infeasible') expect(chain[k].status).toBe('infeasible');
        else expect(cost(chain[k])).toBeGreaterThanOrEqual(cost(chain[k - 1]) - TOL * Math.max(1, cost(chain[k - 1])));
      }
      const [, withFine, withCoarse] = chain;
      if (withFine.status === 'optimal') expect(verifyAward(validateProblem(withRules(base, { awardIncrement: fine })), withFine.awards, withFine.objective!)).toEqual([]);
      if (withCoarse.status === 'optimal') expect(verifyAward(validateProblem(withRules(base, { awardIncrement: coarse })), withCoarse.awards, withCoarse.objective!)).toEqual([]);
    }), RUNS);
  });

  test('an uncapped vendor solves the same as one capped at the total forecast', async () => {
    await fc.assert(fc.asyncProperty(problemArb, fc.nat(), async (p, pick) => {
      const total = p.regions.reduce((s, r) => s + r.demand, 0);
      const k = pick % p.vendors.length;
      const uncapped = { ...p, vendors: p.vendors.map((v, i) => (i === k ? { ...v, capacity: null } : v)) };
      const capped = { ...p, vendors: p.vendors.map((v, i) => (i === k ? { ...v, capacity: total } : v)) };
      const a = await solveAward(uncapped);
      const b = await solveAward(capped);
      expect(a.status).toBe(b.status);
      if (a.status === 'optimal') expect(a.objective!).toBeCloseTo(b.objective!, 6);
    }), RUNS);
  });
});

describe('the verifier itself catches broken awards', () => {
  const problem: AwardProblem = {
    regions: [{ id: 'A', demand: 10 }],
    vendors: [{ id: 'V1', fixedFee: 5, capacity: 8, prices: { A: 2 } }, { id: 'V2', fixedFee: 0, capacity: null, prices: { A: 3 } }],
    rules: { sourcing: 'sole' },
  };
  test('over capacity, a split sole region and an uncharged fee are each reported', () => {
    const violations = verifyAward(validateProblem(problem), [
      { vendor: 'V1', fixedFee: 0, quantity: 9, value: 18, share: 0.9, lines: [{ region: 'A', quantity: 9, unitPrice: 2, cost: 18 }] },
      { vendor: 'V2', fixedFee: 0, quantity: 1, value: 3, share: 0.1, lines: [{ region: 'A', quantity: 1, unitPrice: 3, cost: 3 }] },
    ]);
    expect(violations).toEqual(expect.arrayContaining([
      'vendor V1: fee 0 charged, bid 5',
      'vendor V1 supplies 9, above its cap 8',
      'sole-award region A has 2 vendors',
    ]));
  });
});
