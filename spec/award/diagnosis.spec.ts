import type { AwardProblem } from '../../shared/award';
import { closeSolverPool, solveAward } from '../../server/award/index';
import { baseProblem } from './support/problems';

afterAll(() => closeSolverPool());

async function infeasible(problem: AwardProblem): Promise<string[]> {
  const r = await solveAward(problem);
  expect(r).toMatchObject({ status: 'infeasible', objective: null, awards: [] });
  expect(r.diagnosis.length).toBeGreaterThan(0);
  return r.diagnosis;
}

describe('diagnosis of infeasible problems, in words', () => {
  test('a region nobody bid is named', async () => {
    const p = baseProblem();
    p.regions.push({ id: 'W', name: 'Wexcombe', demand: 40 });
    expect(await infeasible(p)).toContain('region W (Wexcombe): no vendor bid it.');
  });

  test('a region only excluded vendors bid is named as such', async () => {
    const p = baseProblem({ exclude: ['V1', 'V2', 'V3'] });
    expect(await infeasible(p)).toContain('region A (Ashford depot): only excluded vendors bid it.');
  });

  test('total capacity below total forecast gives both quantities', async () => {
    const p = baseProblem();
    p.vendors.forEach((v) => { v.capacity = 60; });
    expect(await infeasible(p)).toContain('total capacity 180 t is below total forecast 200 t.');
  });

  test('a sole-award region that no single bidder can cover', async () => {
    const p = baseProblem({ soleRegions: ['A'] });
    p.regions[0].demand = 6200;
    p.vendors.forEach((v) => { v.capacity = 5000; });
    expect(await infeasible(p)).toContain('sole-award region A (Ashford depot) needs 6,200 t but no bidder there can supply more than 5,000 t.');
  });

  test('sole award with a maximum region share below 1 is a conflict of rules', async () => {
    const msgs = await infeasible(baseProblem({ sourcing: 'sole', maxRegionShare: 0.7 }));
    expect(msgs).toContain('region A (Ashford depot) must be sole-awarded, but the maximum region share is 70 %: one vendor cannot take the whole region.');
  });

  test('too few vendors allowed to cover the forecast', async () => {
    const p = baseProblem({ maxVendors: 1 });
    p.vendors.forEach((v) => { v.capacity = 150; });
    expect(await infeasible(p)).toContain('at most 1 vendor(s) may be awarded, but the 1 largest together can supply only 150 t of the total forecast 200 t.');
  });

  test('an SME share above SME capacity', async () => {
    expect(await infeasible(baseProblem({ smeShare: 0.6 }))).toContain('the SME share of 60 % needs 120 t from SME vendors, but SME capacity is only 100 t.');
  });

  test('a required vendor that is also excluded', async () => {
    expect(await infeasible(baseProblem({ require: ['V2'], exclude: ['V2'] }))).toContain('vendor V2 (Eastmoor Minerals) is both required and excluded.');
  });

  test('when only the solver can tell, a general message says the rules together are too tight', async () => {
    // SME share 50 % needs 100 t from V3 (its whole cap) but a single vendor may be awarded and V3
    // cannot cover 200 t: every cheap check passes on its own.
    const r = await solveAward(baseProblem({ smeShare: 0.5, maxVendors: 1 }));
    expect(r.status).toBe('infeasible');
    expect(r.diagnosis).toHaveLength(1);
    expect(r.diagnosis[0]).toMatch(/^No award meets all the rules together/);
    expect(r.engine).not.toBe('pre-solve checks');
  });
});
