import type { AwardProblem } from '../../shared/award';
import { bestAward, newBoard, publishAward } from '../../server/award/award-board';
import { buildModel, fewestVendorsToCover } from '../../server/award/build-model';
import { closeSolverPool, solveAward } from '../../server/award/index';
import { toInstance, validateProblem } from '../../server/award/instance';

jest.setTimeout(60_000);
afterAll(() => closeSolverPool());

/** Four vendors of 60 units each, two sole regions of 50: no vendor can take both, so two are awarded. */
function tightProblem(rules: NonNullable<AwardProblem['rules']> = {}): AwardProblem {
  const vendor = (k: number, fee: number, a: number, b: number) => ({ id: `V${k}`, name: `Vendor ${k}`, fixedFee: fee, capacity: 60, prices: { A: a, B: b } });
  return {
    currency: 'EUR',
    unit: 't',
    regions: [{ id: 'A', name: 'Ashford depot', demand: 50 }, { id: 'B', name: 'Brenley depot', demand: 50 }],
    vendors: [vendor(1, 10, 1, 1), vendor(2, 10, 2, 2), vendor(3, 70, 1, 3), vendor(4, 70, 3, 1)],
    rules: { sourcing: 'sole', ...rules },
    options: { timeLimitSeconds: 20 },
  };
}

describe('the fewest-vendors row', () => {
  test('counts the largest capacities needed to reach the forecast', () => {
    expect(fewestVendorsToCover([20, 50, 30, 40], 50)).toBe(1);
    expect(fewestVendorsToCover([20, 50, 30, 40], 85)).toBe(2);
    expect(fewestVendorsToCover([20, 50, 30, 40], 120)).toBe(3);
    expect(fewestVendorsToCover([20, 50, 30, 40], 140)).toBe(4);
    expect(fewestVendorsToCover([20, 50, 30, 40], 141)).toBe(5);
  });

  test('is written when capacity forces several vendors, and the optimum opens at least that many', async () => {
    const { model } = buildModel(toInstance(validateProblem(tightProblem())));
    const r = model.rowNames.indexOf('fewest_vendors');
    expect(r).toBeGreaterThanOrEqual(0);
    expect(model.rowLower[r]).toBe(2);
    const result = await solveAward(tightProblem());
    // One region each for V1 (50 + fee 10) and V2 (100 + fee 10): 170. V3 or V4 in V2's place
    // would cost 50 + fee 70 = 120 > 110.
    expect(result).toMatchObject({ status: 'optimal', objective: 170 });
    expect(result.awards.map((a) => a.vendor).sort()).toEqual(['V1', 'V2']);
  });

  test('is left out when one vendor can cover the forecast or the minimum-vendors rule already asks for as many', () => {
    const roomy = tightProblem();
    roomy.vendors[0].capacity = 100;
    expect(buildModel(toInstance(validateProblem(roomy))).model.rowNames).not.toContain('fewest_vendors');
    expect(buildModel(toInstance(validateProblem(tightProblem({ minVendors: 2 })))).model.rowNames).not.toContain('fewest_vendors');
  });
});

describe('the shared award board', () => {
  test('keeps only a cheaper award and hands back a copy of it', () => {
    const { model } = buildModel(toInstance(validateProblem(tightProblem())));
    const board = newBoard(model);
    expect(bestAward(board, model.numCols)).toBeNull();
    const first = new Float64Array(model.numCols).fill(1);
    const cheaper = new Float64Array(model.numCols).fill(0.5);
    expect(publishAward(board, 200, first)).toBe(true);
    expect(publishAward(board, 250, cheaper)).toBe(false);
    expect(publishAward(board, 170, cheaper)).toBe(true);
    const best = bestAward(board, model.numCols)!;
    expect(best.objective).toBe(170);
    expect(Array.from(best.x)).toEqual(Array.from(cheaper));
    best.x[0] = 9;
    expect(bestAward(board, model.numCols)!.x[0]).toBe(0.5);
  });
});
