import { bidInputSchema, isPlainPrice, regionCodeSchema, regionListSchema, unitPriceSchema } from '@shared/bids';

function issues(result: { success: boolean; error?: { issues: Array<{ path: PropertyKey[]; message: string }> } }) {
  return (result.error?.issues ?? []).map((i) => ({ path: i.path.join('.'), message: i.message }));
}

describe('bid input schema (PUT /api/tenders/:id/bid)', () => {
  it('accepts a bid with no cap and regions left out', () => {
    const bid = { fixedFee: 25000.5, capacity: null, prices: { R01: 61.1234 }, submit: true };
    expect(bidInputSchema.parse(bid)).toEqual(bid);
  });

  it('names each bad field, prices by region code', () => {
    const result = bidInputSchema.safeParse({ fixedFee: -1, capacity: 0, prices: { R01: 0, R02: 1.23456, 'bad code': 5 }, submit: false });
    expect(issues(result)).toEqual(expect.arrayContaining([
      { path: 'fixedFee', message: 'Fixed fee must be 0 or more.' },
      { path: 'capacity', message: 'Capacity cap must be a positive number (leave it empty for no cap).' },
      { path: 'prices.R01', message: 'Unit price must be a positive number.' },
      { path: 'prices.R02', message: 'Unit price may have at most 4 decimals.' },
    ]));
    expect(issues(result).some((i) => i.path === 'prices.bad code')).toBe(true);
  });

  it('refuses infinite and huge amounts, fees with more than 2 decimals, and an empty submitted bid', () => {
    expect(issues(bidInputSchema.safeParse({ fixedFee: Infinity, capacity: 1e12, prices: {}, submit: true }))).toEqual([
      { path: 'fixedFee', message: 'Fixed fee must be a number (0 if there is none).' },
      { path: 'capacity', message: 'Capacity cap must be below 1e+12.' },
    ]);
    expect(issues(bidInputSchema.safeParse({ fixedFee: 1.005, capacity: null, prices: {}, submit: false }))).toEqual([
      { path: 'fixedFee', message: 'Fixed fee may have at most 2 decimals.' },
    ]);
    expect(issues(bidInputSchema.safeParse({ fixedFee: 0, capacity: null, prices: {}, submit: true }))).toEqual([
      { path: 'prices', message: 'Enter a unit price for at least one region before submitting.' },
    ]);
  });
});

describe('the quick path of a bid\'s prices (isPlainPrice)', () => {
  it('takes exactly the entries both schemas accept unchanged, so every other one is worded by the schemas', () => {
    const codes = ['R01', 'north-2.b_x', 'A'.repeat(20), 'A'.repeat(21), ' R01', 'R01 ', '', 'bad code', 'x/y', '__proto__', 'toString', 'CONSTRUCTOR', 'NULL'];
    const prices: unknown[] = [1, 61.1234, 0.0001, 1e12 - 0.5, 0, -1, 1.23456, 0.00001, 1e12, NaN, Infinity, '5', null, undefined, true];
    const pairs = codes.flatMap((code) => prices.map((price) => ({ code, price })));
    expect(pairs.length).toBe(195);
    const differing = pairs.filter(({ code, price }) => {
      const k = regionCodeSchema.safeParse(code);
      const v = unitPriceSchema.safeParse(price);
      const bySchemas = k.success && v.success && k.data === code && v.data === price;
      return isPlainPrice(code, price) !== bySchemas;
    });
    expect(differing).toEqual([]);
    // The quick path is taken for the ordinary entries (else it would save nothing): the codes R01,
    // north-2.b_x, 20 A's and NULL with the prices 1, 61.1234, 0.0001 and 1e12 - 0.5.
    expect(pairs.filter(({ code, price }) => isPlainPrice(code, price)).length).toBe(4 * 4);
  });

  it('words a bad price next to quick-path ones as before, and keeps the good ones', () => {
    const result = bidInputSchema.safeParse({ fixedFee: 10, capacity: null, prices: { R01: 5, R02: 0, ' R03': 7, toString: 2 }, submit: false });
    expect(issues(result)).toEqual([
      { path: 'prices.R02', message: 'Unit price must be a positive number.' },
      { path: 'prices.toString', message: expect.stringMatching(/^Region code "toString" is a reserved word/) },
    ]);
    const ok = bidInputSchema.parse({ fixedFee: 10, capacity: null, prices: { R01: 5, ' R03': 7 }, submit: false });
    expect({ ...ok.prices }).toEqual({ R01: 5, R03: 7 });
    expect(Object.getPrototypeOf(ok.prices)).toBeNull();
  });
});

describe('region list schema', () => {
  it('names a duplicate code by its index, ignoring case', () => {
    const result = regionListSchema.safeParse([
      { code: 'R01', name: 'Ashcombe', forecast: 10 },
      { code: 'r01', name: 'Birchley', forecast: 10 },
    ]);
    expect(issues(result)).toEqual([{ path: '1.code', message: 'Region code "r01" is used twice (first at region 1).' }]);
  });

  it('refuses an empty list and a code with spaces', () => {
    expect(issues(regionListSchema.safeParse([]))).toEqual([{ path: '', message: 'A tender needs at least one region.' }]);
    expect(issues(regionListSchema.safeParse([{ code: 'R 1', name: 'X', forecast: 1 }]))).toEqual([
      { path: '0.code', message: 'Region code may only contain letters, digits, ".", "_" and "-".' },
    ]);
  });
});
