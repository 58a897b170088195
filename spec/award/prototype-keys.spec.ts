import { closeSolverPool, solveAward } from '../../server/award/index';

afterAll(() => closeSolverPool());

/**
 * Region ids that every JavaScript object already answers to. Tendara refuses them as region
 * codes at entry; the engine must still handle a problem file that uses them, read as JSON.
 */
const problem = JSON.parse(`{
  "regions": [
    { "id": "__proto__", "demand": 100 },
    { "id": "constructor", "demand": 50 },
    { "id": "toString", "demand": 30 }
  ],
  "vendors": [
    { "id": "A", "fixedFee": 10, "capacity": null, "prices": { "__proto__": 2, "constructor": 9, "toString": 9 } },
    { "id": "B", "fixedFee": 10, "capacity": null, "prices": { "constructor": 3 } },
    { "id": "C", "fixedFee": 10, "capacity": null, "prices": { "toString": 4 } }
  ],
  "rules": { "sourcing": "split" }
}`);

describe('region ids that are names of built-in object properties', () => {
  test('are kept, priced and awarded like any other id, and a region a vendor did not bid stays unbid', async () => {
    const result = await solveAward(problem);
    expect(result.status).toBe('optimal');
    // A: 100 × 2 + 10; B: 50 × 3 + 10; C: 30 × 4 + 10. A priced every region at 9 elsewhere, so each region goes to its cheapest bidder.
    expect(result.objective).toBeCloseTo(210 + 160 + 130, 6);
    const lines = Object.fromEntries(result.awards.map((a) => [a.vendor, a.lines.map((l) => [l.region, l.quantity, l.unitPrice])]));
    expect(lines).toEqual({
      A: [['__proto__', 100, 2]],
      B: [['constructor', 50, 3]],
      C: [['toString', 30, 4]],
    });
  });

  test('a region nobody bid is diagnosed, even when its id is "toString"', async () => {
    // Nobody bids "toString" now: a plain object would still answer prices.toString with a function.
    const unbid = JSON.parse(JSON.stringify(problem).replace(/"toString": ?9/, '"R9": 9'));
    unbid.regions.push({ id: 'R9', demand: 1 });
    unbid.vendors[2].prices = {};
    const result = await solveAward(unbid);
    expect(result.status).toBe('infeasible');
    expect(result.diagnosis).toEqual(['region toString: no vendor bid it.']);
  });
});
