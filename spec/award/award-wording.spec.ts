import { awardStatusWords, marginAboveBest, PROVEN_BEST, soleAwardCostRange } from '@shared/award-wording';

/** The plain-words status and the cost of sole award as the bounds allow it (shared/award-wording.ts). */

const optimal = (objective: number) => ({ status: 'optimal' as const, objective, bound: objective });
const feasible = (objective: number, bound: number | null) => ({ status: 'feasible' as const, objective, bound });

describe('status in the buyer\'s words', () => {
  test('a proven optimum is "Best possible award (proven)"', () => {
    expect(awardStatusWords(optimal(1000))).toBe('Best possible award (proven)');
    expect(PROVEN_BEST).toBe('Best possible award (proven)');
  });

  test('total 110 with a lower limit of 100 is at most 10 % above the best possible (the engine\'s gap, 10/110 = 9.09 %, would understate it)', () => {
    expect(marginAboveBest(feasible(110, 100))).toBe(0.1);
    expect(awardStatusWords(feasible(110, 100))).toBe('Best award found in the time limit: at most 10 % above the best possible');
  });

  test('the margin is rounded up to 0.01 %, never down: 100,531 over 100,000 is 0.531 % → "at most 0.54 %"', () => {
    expect(marginAboveBest(feasible(100_531, 100_000))).toBe(0.0054);
    expect(awardStatusWords(feasible(100_531, 100_000))).toBe('Best award found in the time limit: at most 0.54 % above the best possible');
  });

  test('without a bound the margin is said to be unknown; without an award there are no words', () => {
    expect(awardStatusWords(feasible(100, null))).toBe('Best award found in the time limit: how far it is above the best possible is not known');
    expect(awardStatusWords({ status: 'infeasible', objective: null, bound: null })).toBeNull();
  });
});

describe('cost of sole award', () => {
  test('both proven: sole 1,100 − split 1,000 = 100 exactly, 10 % of split', () => {
    expect(soleAwardCostRange(optimal(1000), optimal(1100))).toEqual({ low: 100, high: 100, lowPercent: 0.1, highPercent: 0.1, exact: true });
  });

  test('split found 1,050 (lower limit 1,000), sole found 1,020 (lower limit 990): the best split is at most 1,020 (every sole award is a split award), so the cost lies between max(0, 990 − 1,020) = 0 and 1,020 − 1,000 = 20, never negative', () => {
    const range = soleAwardCostRange(feasible(1050, 1000), feasible(1020, 990))!;
    expect([range.low, range.high, range.exact]).toEqual([0, 20, false]);
    expect(range.highPercent).toBeCloseTo(20 / 1050, 12);
  });

  test('sole proven at 1,200, split found 1,000 with lower limit 950: between 1,200 − 1,000 = 200 and 1,200 − 950 = 250', () => {
    expect(soleAwardCostRange(feasible(1000, 950), optimal(1200))).toEqual({ low: 200, high: 250, lowPercent: 0.2, highPercent: 0.25, exact: false });
  });

  test('a split run not proven best without any bound counts its lower limit as 0 (costs are never negative)', () => {
    expect(soleAwardCostRange(feasible(1000, null), optimal(1200))).toMatchObject({ low: 200, high: 1200, exact: false });
  });

  test('no award in either run: no figure', () => {
    expect(soleAwardCostRange({ status: 'infeasible', objective: null, bound: null }, optimal(1000))).toBeNull();
    expect(soleAwardCostRange(optimal(1000), null)).toBeNull();
  });
});
