import type { AwardProblem } from '../../shared/award';
import { closeSolverPool, solveAward } from '../../server/award/index';
import { quantities, solved } from './support/solved';
import { baseProblem } from './support/problems';

afterAll(() => closeSolverPool());

// Every expected value below is worked out by hand in the comment beside it (see baseProblem).

describe('hand-solvable awards, one per rule', () => {
  test('without rules each region goes to its cheapest vendor: 50 + 50 + 100·1 + 100·1 = 300', async () => {
    const r = await solved(baseProblem());
    expect(r.objective).toBeCloseTo(300, 6);
    expect(quantities(r)).toEqual({ V1: { A: 100 }, V2: { B: 100 } });
    expect(r.awards.map((a) => a.vendor)).toEqual(['V1', 'V2']);
    expect(r.awards[0]).toMatchObject({ fixedFee: 50, quantity: 100, value: 150, share: 0.5, lines: [{ region: 'A', quantity: 100, unitPrice: 1, cost: 100 }] });
    expect(r).toMatchObject({ fixedCost: 100, variableCost: 200, gap: 0, diagnosis: [] });
    expect(r.bound).toBeCloseTo(300, 6);
  });

  test('max vendors 1: one vendor takes both regions, 50 + 100 + 300 = 450', async () => {
    const r = await solved(baseProblem({ maxVendors: 1 }));
    expect(r.objective).toBeCloseTo(450, 6);
    expect(r.awards).toHaveLength(1);
  });

  test('min vendors 3: V3 must supply its minimum of 1 unit at 2 instead of 1, 110 + 201 = 311', async () => {
    const r = await solved(baseProblem({ minVendors: 3 }));
    expect(r.objective).toBeCloseTo(311, 6);
    expect(r.awards.find((a) => a.vendor === 'V3')!.quantity).toBeCloseTo(1, 6);
  });

  test('max vendor share 40 %: 80 units each from V1 and V2, 40 from V3 at 2, 110 + 80 + 80 + 80 = 350', async () => {
    const r = await solved(baseProblem({ maxVendorShare: 0.4 }));
    expect(r.objective).toBeCloseTo(350, 6);
    for (const a of r.awards) expect(a.share).toBeLessThanOrEqual(0.4 + 1e-9);
  });

  test('max region share 50 %: each region split, V3 second in both, 110 + 50 + 100 + 50 + 100 = 410', async () => {
    const r = await solved(baseProblem({ maxRegionShare: 0.5 }));
    expect(r.objective).toBeCloseTo(410, 6);
    expect(quantities(r)).toEqual({ V1: { A: 50 }, V2: { B: 50 }, V3: { A: 50, B: 50 } });
  });

  test('minimum award quantity 150: only one vendor fits, 450', async () => {
    const r = await solved(baseProblem({ minAwardQuantity: 150 }));
    expect(r.objective).toBeCloseTo(450, 6);
    expect(r.awards).toHaveLength(1);
  });

  test('excluding V1: V2 takes B, V3 takes A at 2, 60 + 100 + 200 = 360', async () => {
    const r = await solved(baseProblem({ exclude: ['V1'] }));
    expect(r.objective).toBeCloseTo(360, 6);
    expect(quantities(r)).toEqual({ V2: { B: 100 }, V3: { A: 100 } });
  });

  test('requiring V3: it supplies 1 unit beside V1 and V2, 311 (cheaper than dropping one of them, 360)', async () => {
    const r = await solved(baseProblem({ require: ['V3'] }));
    expect(r.objective).toBeCloseTo(311, 6);
  });

  test('SME share 30 %: V3 and one other vendor, 360 (all three would cost 370)', async () => {
    const r = await solved(baseProblem({ smeShare: 0.3 }));
    expect(r.objective).toBeCloseTo(360, 6);
    expect(r.awards.find((a) => a.vendor === 'V3')!.quantity).toBeGreaterThanOrEqual(60 - 1e-6);
  });

  test('sole award of every region: each region to one vendor, still 300 here', async () => {
    const r = await solved(baseProblem({ sourcing: 'sole' }));
    expect(r.objective).toBeCloseTo(300, 6);
  });

  test('a listed sole region that the cheap small vendor cannot cover whole costs more than splitting it', async () => {
    // V1: fee 25000, cap 12000, R01 @61.5, R02 @63; V2: fee 1000, cap 2000, bids only R02 @60.
    // Split: V2 takes 2000 of R02: 26000 + 4200·61.5 + 1000·63 + 2000·60 = 467300.
    // R02 sole: V2 cannot take all 3000, so V1 alone: 25000 + 258300 + 189000 = 472300.
    const p = (soleRegions: string[]): AwardProblem => ({
      regions: [{ id: 'R01', demand: 4200 }, { id: 'R02', demand: 3000 }],
      vendors: [
        { id: 'V1', fixedFee: 25000, capacity: 12000, prices: { R01: 61.5, R02: 63 } },
        { id: 'V2', fixedFee: 1000, capacity: 2000, prices: { R02: 60 } },
      ],
      rules: { soleRegions },
    });
    expect((await solved(p([]))).objective).toBeCloseTo(467300, 4);
    const sole = await solved(p(['R02']));
    expect(sole.objective).toBeCloseTo(472300, 4);
    expect(sole.awards.map((a) => a.vendor)).toEqual(['V1']);
  });
});

describe('the capacity-and-fee row (common practice: no supply without paying the fixed fee)', () => {
  // One region of 100 units. V1 has the cheapest price (1) but a fee of 1000 and no cap; V2 has
  // no fee and price 20. A model without the capacity-and-fee row would let V1 supply for 100
  // without its fee. The true optimum is min(1000 + 100, 0 + 2000) = 1100, fee charged.
  const feeCase = (fee: number): AwardProblem => ({
    regions: [{ id: 'R1', demand: 100 }],
    vendors: [
      { id: 'V1', fixedFee: fee, capacity: null, prices: { R1: 1 } },
      { id: 'V2', fixedFee: 0, capacity: null, prices: { R1: 20 } },
    ],
  });

  test('the vendor that supplies pays its fee: 1100, not 100', async () => {
    const r = await solved(feeCase(1000));
    expect(r.objective).toBeCloseTo(1100, 6);
    expect(r.fixedCost).toBeCloseTo(1000, 6);
    expect(r.awards).toEqual([expect.objectContaining({ vendor: 'V1', fixedFee: 1000, quantity: 100, value: 1100 })]);
  });

  test('when the fee outweighs the saving the other vendor wins: min(5100, 2000) = 2000', async () => {
    const r = await solved(feeCase(5000));
    expect(r.objective).toBeCloseTo(2000, 6);
    expect(r.awards.map((a) => a.vendor)).toEqual(['V2']);
  });
});

describe('every engine gives the same hand-checked optimum', () => {
  test.each(['glpk', 'highs', 'tendara'] as const)('%s', async (engine) => {
    const r = await solveAward(baseProblem({ minVendors: 3 }), { engine });
    expect(r.status).toBe('optimal');
    expect(r.objective).toBeCloseTo(311, 6);
    expect(r.engine).toMatch(engine === 'highs' ? /^HiGHS \d+\.\d+\.\d+ via highs \d/ : engine === 'glpk' ? /^glpk\.js \d/
      // The portfolio reports the engine whose award won, or its greedy award proven by HiGHS's LP bound.
      : /^(HiGHS \d+\.\d+\.\d+ via highs \d|glpk\.js \d|Tendara greedy award, proven by the LP bound of HiGHS \d)/);
  });
});
