import { AwardInputError, closeSolverPool, solveAward } from '../../server/award/index';
import { baseProblem } from './support/problems';

afterAll(() => closeSolverPool());

async function refusal(problem: unknown): Promise<AwardInputError> {
  const err = await solveAward(problem).then(() => null, (e: unknown) => e);
  expect(err).toBeInstanceOf(AwardInputError);
  return err as AwardInputError;
}

describe('problem validation', () => {
  test('a price for a region the tender does not have is refused, naming the vendor and region', async () => {
    const p = baseProblem();
    (p.vendors[1].prices).R07 = 12;
    const err = await refusal(p);
    expect(err.errors).toEqual([{ field: 'vendors[1].prices.R07', message: 'Unknown region "R07": it is not in the tender\'s regions.' }]);
  });

  test('a negative price and a price given as text are refused with their fields', async () => {
    const p = baseProblem();
    (p.vendors[0].prices).A = -1;
    (p.vendors[2].prices).B = '2.5';
    const err = await refusal(p);
    expect(err.errors).toEqual(expect.arrayContaining([
      { field: 'vendors[0].prices.A', message: 'Unit price must not be negative.' },
      { field: 'vendors[2].prices.B', message: 'Unit price must be a number.' },
    ]));
  });

  test('a forecast quantity of zero or below is refused', async () => {
    const p = baseProblem();
    p.regions[0].demand = 0;
    p.regions[1].demand = -5;
    const err = await refusal(p);
    expect(err.errors.map((e) => e.field)).toEqual(['regions[0].demand', 'regions[1].demand']);
    expect(err.errors[0].message).toBe('Forecast quantity must be greater than 0.');
  });

  test('shares outside 0..1 are refused, naming the rule', async () => {
    const err = await refusal(baseProblem({ maxVendorShare: 1.5, smeShare: -0.1, maxRegionShare: 2 }));
    expect(err.errors.map((e) => e.field).sort()).toEqual(['rules.maxRegionShare', 'rules.maxVendorShare', 'rules.smeShare']);
    expect(err.errors.find((e) => e.field === 'rules.maxVendorShare')!.message).toMatch(/between 0 and 1/);
  });

  test('duplicate region and vendor ids are refused at the duplicate', async () => {
    const p = baseProblem();
    p.regions.push({ id: 'A', demand: 5 });
    p.vendors.push({ ...p.vendors[0] });
    const err = await refusal(p);
    expect(err.errors).toEqual(expect.arrayContaining([
      { field: 'regions[2].id', message: 'Duplicate region id "A".' },
      { field: 'vendors[3].id', message: 'Duplicate vendor id "V1".' },
    ]));
  });

  test('a rule naming an unknown vendor or region is refused', async () => {
    const err = await refusal(baseProblem({ exclude: ['V9'], require: ['V1', 'X'], soleRegions: ['Z'] }));
    expect(err.errors).toEqual(expect.arrayContaining([
      { field: 'rules.exclude[0]', message: 'Unknown vendor "V9".' },
      { field: 'rules.require[1]', message: 'Unknown vendor "X".' },
      { field: 'rules.soleRegions[0]', message: 'Unknown region "Z".' },
    ]));
  });

  test('the error message lists every field, and a non-object problem is refused as a whole', async () => {
    const err = await refusal(baseProblem({ maxVendors: 0 }));
    expect(err.message).toContain('rules.maxVendors');
    const whole = await refusal('not a problem');
    expect(whole.errors[0].field).toBe('');
  });
});
