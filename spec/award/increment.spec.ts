import { isWholeMultiple, type AwardProblem, type AwardResult, type VendorAward } from '../../shared/award';
import { newBoard, publishAward } from '../../server/award/award-board';
import { buildModel } from '../../server/award/build-model';
import { extractAward } from '../../server/award/extract';
import { greedyIncumbent, satisfiesRows } from '../../server/award/heuristic';
import { AwardInputError, closeSolverPool, solveAward } from '../../server/award/index';
import { toInstance, validateProblem } from '../../server/award/instance';
import { costOf } from '../../server/award/reduced-model';
import { LNS_WORKER, runInWorker, type EngineOutcome } from '../../server/award/solve';
import { verifyAward } from '../../server/award/verify';
import { quantities, solved } from './support/solved';
import { baseProblem, largeSoleProblem } from './support/problems';

// The award increment (rules.awardIncrement): every quantity awarded to a vendor in a region is a
// whole multiple of it (server/award/MODEL.md, "Award increment"). Every expected value below is
// worked out by hand in the comment beside it.
jest.setTimeout(120_000);
afterAll(() => closeSolverPool());


/**
 * Two regions, two vendors. A 100 t, B 50 t. V1: fee 10, cap 110 t, A @1, B @2. V2: fee 20, no
 * cap, A @4, B @3. V1 saves 3 a tonne on A and 1 on B against V2, so it fills A first.
 */
function lorryLoads(awardIncrement?: number): AwardProblem {
  return {
    unit: 't',
    regions: [{ id: 'A', demand: 100 }, { id: 'B', demand: 50 }],
    vendors: [
      { id: 'V1', fixedFee: 10, capacity: 110, prices: { A: 1, B: 2 } },
      { id: 'V2', fixedFee: 20, capacity: null, prices: { A: 4, B: 3 } },
    ],
    rules: awardIncrement === undefined ? {} : { awardIncrement },
    options: { timeLimitSeconds: 20 },
  };
}

describe('hand-worked awards with an award increment', () => {
  test('without an increment the optimum splits 110/40: V1 takes A and 10 t of B; 30 + 100 + 20 + 120 = 270', async () => {
    const r = await solved(lorryLoads());
    expect(r.objective).toBeCloseTo(270, 6);
    expect(quantities(r)).toEqual({ V1: { A: 100, B: 10 }, V2: { B: 40 } });
  });

  test('with an increment of 25 t V1 carries at most 4 loads (100 t): V1 takes A, V2 all of B; 30 + 100 + 150 = 280', async () => {
    // V1's cap 110 t is ⌊110/25⌋ = 4 loads = 100 t. Giving V1 A (saves 3 × 100 = 300) beats
    // A 75 + B 25 (saves 225 + 25 = 250); V2 alone would cost 20 + 400 + 150 = 570. The 10 t of B
    // move from V1 (@2) to V2 (@3): 10 more than without the increment.
    const r = await solved(lorryLoads(25));
    expect(r.objective).toBeCloseTo(280, 6);
    expect(quantities(r)).toEqual({ V1: { A: 100 }, V2: { B: 50 } });
    expect(r.awards.map((a) => a.quantity)).toEqual([100, 50]);
  });

  test.each(['glpk', 'highs', 'tendara'] as const)('every engine gives the same 280 with the increment: %s', async (engine) => {
    const r = await solveAward(lorryLoads(25), { engine });
    expect(r).toMatchObject({ status: 'optimal', diagnosis: [] });
    expect(r.objective).toBeCloseTo(280, 6);
    expect(quantities(r)).toEqual({ V1: { A: 100 }, V2: { B: 50 } });
  });

  test('maximum region share 60 % in loads of 25 t is 50 t a vendor a region: 410 instead of 390', async () => {
    // baseProblem: A and B 100 t; V1 fee 50, A @1, B @3; V2 fee 50, A @3, B @1; V3 fee 10, cap 100, @2.
    // No increment: V1 60 of A, V2 60 of B, V3 the other 40 + 40: 110 + 60 + 60 + 160 = 390.
    // Loads of 25: 60 % of 100 is 2.4 loads, so 2 loads = 50 t. V1 50 of A, V2 50 of B, V3 50 + 50
    // (its cap 100): 110 + 50 + 50 + 200 = 410; without V3, 50 t of each region at 3: 100 + 400 = 500.
    expect((await solved(baseProblem({ maxRegionShare: 0.6 }))).objective).toBeCloseTo(390, 6);
    const r = await solved(baseProblem({ maxRegionShare: 0.6, awardIncrement: 25 }));
    expect(r.objective).toBeCloseTo(410, 6);
    expect(quantities(r)).toEqual({ V1: { A: 50 }, V2: { B: 50 }, V3: { A: 50, B: 50 } });
  });

  test('the minimum award quantity is rounded up to whole loads: 30 t becomes 50 t, 360 instead of 340', async () => {
    // Three vendors must be awarded, so V3 supplies its minimum at 2 instead of 1.
    // No increment: V3 30 t: 110 + 170 · 1 + 30 · 2 = 340. Loads of 25: ⌈30/25⌉ = 2 loads = 50 t:
    // 110 + 150 · 1 + 50 · 2 = 360.
    expect((await solved(baseProblem({ minVendors: 3, minAwardQuantity: 30 }))).objective).toBeCloseTo(340, 6);
    const r = await solved(baseProblem({ minVendors: 3, minAwardQuantity: 30, awardIncrement: 25 }));
    expect(r.objective).toBeCloseTo(360, 6);
    expect(r.awards.find((a) => a.vendor === 'V3')!.quantity).toBe(50);
  });

  test('the default minimum of 1 t is one load of 25 t: a third vendor required costs 335 instead of 311', async () => {
    // Requiring V3: it supplies 1 load at 2 instead of 1: 110 + 175 · 1 + 25 · 2 = 335 (without
    // the increment 1 t: 110 + 199 + 2 = 311, rules.spec.ts).
    const r = await solved(baseProblem({ require: ['V3'], awardIncrement: 25 }));
    expect(r.objective).toBeCloseTo(335, 6);
    expect(r.awards.find((a) => a.vendor === 'V3')!.quantity).toBe(25);
  });

  test('sole-award regions are whole multiples already: the same 300 as without the increment', async () => {
    const r = await solved(baseProblem({ sourcing: 'sole', awardIncrement: 25 }));
    expect(r.objective).toBeCloseTo(300, 6);
    expect(quantities(r)).toEqual({ V1: { A: 100 }, V2: { B: 100 } });
  });

  test('a decimal increment of 0.1 t gives quantities as exact decimals (0.6, not 0.6000000000000001), cost 1.65', async () => {
    // A 0.3 t, B 0.7 t; V1 cap 0.45 t, A @1, B @1.5; V2 no cap, @2; no fees; minimum 0.1 t.
    // V1 carries ⌊0.45/0.1⌋ = 4 × 0.1 t; it saves 1 on A and 0.5 on B: A 0.3 and B 0.1.
    // V2 the other 0.6 of B. 0.3 + 0.15 + 1.2 = 1.65 (without the increment V1 would take 0.15
    // of B: 1.625).
    const p: AwardProblem = {
      regions: [{ id: 'A', demand: 0.3 }, { id: 'B', demand: 0.7 }],
      vendors: [
        { id: 'V1', capacity: 0.45, prices: { A: 1, B: 1.5 } },
        { id: 'V2', capacity: null, prices: { A: 2, B: 2 } },
      ],
      rules: { awardIncrement: 0.1, minAwardQuantity: 0.1 },
    };
    const r = await solved(p);
    expect(r.objective).toBeCloseTo(1.65, 9);
    expect(quantities(r)).toEqual({ V1: { A: 0.3, B: 0.1 }, V2: { B: 0.6 } });
    expect(6 * 0.1).not.toBe(0.6);
  });

  test('a vendor total of decimal lines is reported exactly too: 0.1 t + 0.2 t is 0.3 t, not 0.30000000000000004', async () => {
    // One vendor, A 0.1 t and B 0.2 t at 10 a tonne: 0.3 t for 3.
    const r = await solved({
      regions: [{ id: 'A', demand: 0.1 }, { id: 'B', demand: 0.2 }],
      vendors: [{ id: 'V1', capacity: null, prices: { A: 10, B: 10 } }],
      rules: { awardIncrement: 0.1, minAwardQuantity: 0.1 },
    });
    expect(r.objective).toBeCloseTo(3, 9);
    expect(r.awards.map((a) => ({ vendor: a.vendor, quantity: a.quantity }))).toEqual([{ vendor: 'V1', quantity: 0.3 }]);
    expect(0.1 + 0.2).not.toBe(0.3);
  });
});

describe('an award increment in the problem file', () => {
  async function refusal(problem: unknown): Promise<AwardInputError> {
    const err = await solveAward(problem).then(() => null, (e: unknown) => e);
    expect(err).toBeInstanceOf(AwardInputError);
    return err as AwardInputError;
  }

  test('a forecast that is not a whole multiple of the increment is refused, naming the region', async () => {
    const p = lorryLoads(25);
    p.regions[0].demand = 110;
    p.regions[1].demand = 10;
    const err = await refusal(p);
    expect(err.errors).toEqual([
      { field: 'regions[0].demand', message: 'Forecast quantity 110 is not a whole multiple of the award increment 25: every quantity awarded is.' },
      { field: 'regions[1].demand', message: 'Forecast quantity 10 is not a whole multiple of the award increment 25: every quantity awarded is.' },
    ]);
  });

  test('an increment of zero or below is refused at rules.awardIncrement', async () => {
    const err = await refusal(lorryLoads(0));
    expect(err.errors).toEqual([{ field: 'rules.awardIncrement', message: 'Award increment must be greater than 0 (leave it out for none).' }]);
  });

  test('whole multiples are judged to floating-point accuracy: 0.3 and 0.7 are 3 and 7 × 0.1; 0.35, 110 and 10 are not multiples of 0.1 and 25', () => {
    const cases: [number, number][] = [[0.3, 0.1], [0.7, 0.1], [6 * 0.1, 0.1], [100, 25], [2.5e6, 2.5], [0.35, 0.1], [110, 25], [10, 25], [100.000001, 25]];
    expect(cases.map(([q, u]) => isWholeMultiple(q, u))).toEqual([true, true, true, true, true, false, false, false, false]);
  });

  test('the model counts whole increments: integer quantities, forecasts, caps and prices per load', () => {
    const inst = toInstance(validateProblem(lorryLoads(25)));
    const { model, map } = buildModel(inst);
    const q = map.supply[0][0];
    expect(model.integer[q]).toBe(true);
    // q_V1_A: ⌊110/25⌋ = 4 loads at most; price 25 × 1 per load.
    expect({ upper: model.colUpper[q], cost: model.colCost[q] }).toEqual({ upper: 4, cost: 25 });
    const demand = model.rowNames.indexOf('demand_0');
    expect([model.rowLower[demand], model.rowUpper[demand]]).toEqual([4, 4]);
    const capacity = model.rowNames.indexOf('capacity_0');
    const entries = model.rowIndex.slice(model.rowStarts[capacity], model.rowStarts[capacity + 1]);
    expect(model.rowValue[model.rowStarts[capacity] + entries.indexOf(map.open[0])]).toBe(-4);
    // Without the increment, the same column is a continuous quantity in tonnes.
    const plain = buildModel(toInstance(validateProblem(lorryLoads())));
    expect({ integer: plain.model.integer[q], upper: plain.model.colUpper[q], cost: plain.model.colCost[q] }).toEqual({ integer: false, upper: 100, cost: 1 });
  });
});

describe('the verifier (server/award/verify.ts) and the increment', () => {
  const line = (region: string, quantity: number, unitPrice: number) => ({ region, quantity, unitPrice, cost: quantity * unitPrice });
  const vendor = (id: string, fixedFee: number, lines: VendorAward['lines']): VendorAward => {
    const quantity = lines.reduce((s, l) => s + l.quantity, 0);
    return { vendor: id, fixedFee, quantity, value: fixedFee + lines.reduce((s, l) => s + l.cost, 0), share: quantity / 200, lines };
  };
  // baseProblem, every other rule met: V1 90 t of A, V3 10 t of A, V2 all of B.
  const awards = [vendor('V1', 50, [line('A', 90, 1)]), vendor('V2', 50, [line('B', 100, 1)]), vendor('V3', 10, [line('A', 10, 2)])];
  const objective = 110 + 90 + 100 + 20;

  test('an award whose quantities are not whole multiples of the increment is rejected, naming vendor and region', () => {
    expect(verifyAward(validateProblem(baseProblem({ awardIncrement: 25 })), awards, objective)).toEqual([
      'vendor V1, region A: quantity 90 is not a whole multiple of the award increment 25',
      'vendor V3, region A: quantity 10 is not a whole multiple of the award increment 25',
    ]);
  });

  test('the same award meets every rule when there is no increment', () => {
    expect(verifyAward(validateProblem(baseProblem()), awards, objective)).toEqual([]);
  });

  test('a multiple computed in floating point (6 × 0.1 = 0.6000000000000001) is a whole multiple', () => {
    // V1 99.4 t of A, V3 6 × 0.1 t of A, V2 all of B; minimum award 0.1 t.
    const p = baseProblem({ awardIncrement: 0.1, minAwardQuantity: 0.1 });
    const decimal = [vendor('V1', 50, [line('A', 994 * 0.1, 1)]), vendor('V2', 50, [line('B', 100, 1)]), vendor('V3', 10, [line('A', 6 * 0.1, 2)])];
    expect(decimal[2].quantity).not.toBe(0.6);
    expect(verifyAward(validateProblem(p), decimal, 110 + 99.4 + 100 + 1.2)).toEqual([]);
  });
});

describe('infeasibility with an award increment names the binding rule', () => {
  async function infeasible(problem: AwardProblem): Promise<AwardResult> {
    const r = await solveAward(problem);
    expect(r.status).toBe('infeasible');
    return r;
  }

  test('caps counted in whole loads: 110 t and 90 t in loads of 25 t are 175 t, below the 200 t forecast', async () => {
    // Without the increment the caps reach exactly 200 t: V1 110 @1 + V2 90 @2 = 290.
    const p = (awardIncrement?: number): AwardProblem => ({
      unit: 't',
      regions: [{ id: 'A', demand: 100 }, { id: 'B', demand: 100 }],
      vendors: [
        { id: 'V1', capacity: 110, prices: { A: 1, B: 1 } },
        { id: 'V2', capacity: 90, prices: { A: 2, B: 2 } },
      ],
      rules: awardIncrement === undefined ? {} : { awardIncrement },
    });
    expect((await solved(p())).objective).toBeCloseTo(290, 6);
    const r = await infeasible(p(25));
    expect(r.engine).toBe('pre-solve checks');
    expect(r.diagnosis).toEqual(['total capacity 175 t (in whole award increments of 25 t) is below total forecast 200 t.']);
  });

  test('a region share in whole loads: 60 % of 150 t in loads of 50 t is one load a vendor, two bidders reach 100 t', async () => {
    const p = (awardIncrement?: number): AwardProblem => ({
      unit: 't',
      regions: [{ id: 'A', demand: 150 }],
      vendors: [{ id: 'V1', capacity: null, prices: { A: 1 } }, { id: 'V2', capacity: null, prices: { A: 2 } }],
      rules: { maxRegionShare: 0.6, ...(awardIncrement === undefined ? {} : { awardIncrement }) },
    });
    // Without the increment: V1 90 t @1, V2 60 t @2 = 210.
    expect((await solved(p())).objective).toBeCloseTo(210, 6);
    const r = await infeasible(p(50));
    expect(r.diagnosis).toEqual([
      'region A needs 150 t but its 2 bidder(s), each limited to 60 % of the region (50 t in whole award increments of 50 t), can supply only 100 t.',
      'total capacity 100 t (in whole award increments of 50 t) is below total forecast 150 t.',
    ]);
  });

  test('when only the solver can tell, the general message names the increment among the rules', async () => {
    // One region of 50 t = 2 loads of 25 t, but three vendors must be awarded, each at least one
    // load: no award exists. Every cheap check passes (each vendor can take a load on its own).
    // Without the increment: 1 t each from V2 and V3, 48 t from V1: 48 + 2 + 3 = 53.
    const p = (awardIncrement?: number): AwardProblem => ({
      unit: 't',
      regions: [{ id: 'A', demand: 50 }],
      vendors: [{ id: 'V1', capacity: null, prices: { A: 1 } }, { id: 'V2', capacity: null, prices: { A: 2 } }, { id: 'V3', capacity: null, prices: { A: 3 } }],
      rules: { minVendors: 3, ...(awardIncrement === undefined ? {} : { awardIncrement }) },
    });
    expect((await solved(p())).objective).toBeCloseTo(53, 6);
    const r = await infeasible(p(25));
    expect(r.engine).not.toBe('pre-solve checks');
    expect(r.diagnosis).toEqual(['No award meets all the rules together, although each cheap check passes on its own: the combination of rules (sole regions, vendor counts, shares, minimum award quantity, SME share, award increment of 25 t: every quantity a whole multiple of it) is too tight. Relax one rule at a time to find the one that binds.']);
  });
});

/**
 * A 14-vendor × 70-region split tender in loads of 5 t (forecasts 25–170 t), a 60 % region share
 * (3 loads of a 5-load region), caps and the minimum award not in whole loads: every path of the
 * engine has to round them.
 */
function loadsProblem(seed: number): AwardProblem {
  const base = largeSoleProblem(14, 70, seed);
  return {
    ...base,
    regions: base.regions.map((r) => ({ ...r, demand: r.demand * 5 })),
    vendors: base.vendors.map((v) => ({ ...v, capacity: (v.capacity ?? 0) * 5 + 3 })),
    rules: { sourcing: 'split', maxRegionShare: 0.6, minAwardQuantity: 42, awardIncrement: 5 },
  };
}

describe('the search paths keep quantities in whole increments', () => {
  test('the greedy award and the neighbourhood search give awards in whole loads that meet every rule', async () => {
    const valid = validateProblem(loadsProblem(3));
    const inst = toInstance(valid);
    const { model, map } = buildModel(inst);
    const greedy = await greedyIncumbent(inst, model, map, 2000);
    expect(greedy).not.toBeNull();
    // satisfiesRows also holds every integer column (the loads) to a whole number.
    expect(satisfiesRows(model, greedy!)).toBe(true);
    const fromGreedy = extractAward(inst, map, greedy!);
    expect(verifyAward(valid, fromGreedy.awards, fromGreedy.objective)).toEqual([]);

    const board = newBoard(model);
    publishAward(board, costOf(model, greedy!), greedy!);
    const outcome = await runInWorker<EngineOutcome>(LNS_WORKER, {
      model, structure: { open: map.open, supply: map.supply }, board, timeLimitSeconds: 40, maxRounds: 8, randomSeed: 3,
    });
    expect(outcome.status).toBe('feasible');
    expect(outcome.objective!).toBeLessThanOrEqual(costOf(model, greedy!) + 1e-6);
    expect(satisfiesRows(model, outcome.values!)).toBe(true);
    const fromSearch = extractAward(inst, map, outcome.values!);
    expect(verifyAward(valid, fromSearch.awards, fromSearch.objective)).toEqual([]);
    expect(fromSearch.awards.flatMap((a) => a.lines).every((l) => Number.isInteger(l.quantity / 5))).toBe(true);
  });

  test('the Tendara engine on the larger tender returns an award in whole loads that the verifier accepts', async () => {
    const problem = loadsProblem(5);
    const r = await solveAward(problem, { timeLimitSeconds: 10 });
    expect(['optimal', 'feasible']).toContain(r.status);
    expect(verifyAward(validateProblem(problem), r.awards, r.objective!)).toEqual([]);
    const lines = r.awards.flatMap((a) => a.lines);
    expect(lines.length).toBeGreaterThan(70);
    expect(lines.filter((l) => !Number.isInteger(l.quantity / 5))).toEqual([]);
  });
});
