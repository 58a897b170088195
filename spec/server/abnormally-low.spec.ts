import { abnormallyLowFlags, median } from '../../server/services/evaluation/abnormally-low';

/** The first screen for abnormally low prices, on hand-worked examples (no database). */

const REGIONS = [{ code: 'R01', forecast: 1000 }, { code: 'R02', forecast: 2000 }, { code: 'R03', forecast: 3000 }];
const bid = (vendor: string, fixedFee: number, prices: Record<string, number>, excluded = false) => ({ vendor, excluded, fixedFee, prices });

test('the median is the middle value, and with an even count the mean of the two middle values', () => {
  expect(median([54, 30, 50])).toBe(50);
  expect(median([50, 52, 30, 54])).toBe(51);
  expect(median([7])).toBe(7);
  expect(median([])).toBeUndefined();
});

test('a price more than 20 % below the median of its region is flagged with the median and threshold shown (even count: 30, 50, 52, 54 → median 51, threshold 40.8)', () => {
  const flags = abnormallyLowFlags([
    bid('A', 1000, { R01: 50, R02: 50, R03: 50 }),
    bid('B', 1000, { R01: 52, R02: 52, R03: 52 }),
    bid('C', 1000, { R01: 30, R02: 51, R03: 51 }),
    bid('D', 1000, { R01: 54, R02: 54, R03: 54 }),
  ], REGIONS, 20);
  expect(flags.get('C')).toEqual({ percent: 20, prices: [{ region: 'R01', price: 30, median: 51, threshold: 40.8 }], total: null, totalCompared: true });
  expect(flags.get('A')).toEqual({ percent: 20, prices: [], total: null, totalCompared: true });
  // Totals at the forecast: A 301,000, B 313,000, C 286,000, D 325,000; median (301,000 + 313,000) / 2 = 307,000,
  // threshold 245,600: no total is flagged.
  expect([...flags.values()].filter((f) => f.total !== null)).toEqual([]);
});

test('a price exactly at the threshold is not flagged ("more than" 20 % below): median 50, threshold 40', () => {
  const flags = abnormallyLowFlags([
    bid('A', 0, { R01: 50 }), bid('B', 0, { R01: 40 }), bid('C', 0, { R01: 60 }),
  ], [{ code: 'R01', forecast: 10 }], 20);
  expect(flags.get('B')!.prices).toEqual([]);
  const lower = abnormallyLowFlags([
    bid('A', 0, { R01: 50 }), bid('B', 0, { R01: 39.99 }), bid('C', 0, { R01: 60 }),
  ], [{ code: 'R01', forecast: 10 }], 20);
  expect(lower.get('B')!.prices).toEqual([{ region: 'R01', price: 39.99, median: 50, threshold: 40 }]);
});

test('excluded bids are left out of the medians and get no flags (A 50, B 52, C 39: median 50, threshold 40; with X at 10 counted it would be 44.5 and 35.6)', () => {
  const flags = abnormallyLowFlags([
    bid('A', 0, { R01: 50 }), bid('B', 0, { R01: 52 }), bid('C', 0, { R01: 39 }), bid('X', 0, { R01: 10 }, true),
  ], [{ code: 'R01', forecast: 1 }], 20);
  expect(flags.get('C')!.prices).toEqual([{ region: 'R01', price: 39, median: 50, threshold: 40 }]);
  expect(flags.get('X')).toEqual({ percent: 20, prices: [], total: null, totalCompared: false });
  const counted = abnormallyLowFlags([
    bid('A', 0, { R01: 50 }), bid('B', 0, { R01: 52 }), bid('C', 0, { R01: 39 }), bid('X', 0, { R01: 10 }),
  ], [{ code: 'R01', forecast: 1 }], 20);
  expect(counted.get('C')!.prices).toEqual([]);
  expect(counted.get('X')!.prices).toEqual([{ region: 'R01', price: 10, median: 44.5, threshold: 35.6 }]);
});

test('a total more than the percentage below the median total of the complete bids is flagged; a partial bid is not compared', () => {
  // Totals: A 1000 + 100 × 6000 = 601,000; B 1000 + 100 × 6000 = 601,000; C 1000 + 70 × 6000 = 421,000 (prices 70 each,
  // within 30 % of 100); P prices R01 only: 1000 + 100 × 1000 = 101,000, lower because it covers less.
  const flags = abnormallyLowFlags([
    bid('A', 1000, { R01: 100, R02: 100, R03: 100 }),
    bid('B', 1000, { R01: 100, R02: 100, R03: 100 }),
    bid('C', 1000, { R01: 70, R02: 70, R03: 70 }),
    bid('P', 1000, { R01: 100 }),
  ], REGIONS, 25);
  // Median total of A, B, C: 601,000; threshold at 25 %: 450,750. C's 421,000 is below; its prices (70 < 75) too.
  expect(flags.get('C')!.total).toEqual({ total: 421000, median: 601000, threshold: 450750 });
  expect(flags.get('C')!.prices.map((p) => [p.region, p.threshold])).toEqual([['R01', 75], ['R02', 75], ['R03', 75]]);
  expect(flags.get('P')).toEqual({ percent: 25, prices: [], total: null, totalCompared: false });
});
