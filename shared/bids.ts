import { z } from 'zod';
import { plainText } from './text';

/** Most regions one tender may have; the bid workbook and the tabulation are sized for it. */
export const MAX_REGIONS = 500;

/** Upper bound for money and quantities: far above any real contract, low enough to stay exact in a double. */
export const MAX_AMOUNT = 1e12;

/**
 * True when `value` has at most `places` decimals as written. `toFixed` rounds to the nearest
 * representable decimal, so 61.55 passes with 2 places while 0.1 + 0.2 (0.30000000000000004) does not:
 * a price computed elsewhere must be rounded by the vendor, not silently by us.
 */
export function hasAtMostDecimals(value: number, places: number): boolean {
  return Number.isFinite(value) && Number(value.toFixed(places)) === value;
}

/** Region codes as they appear in workbooks, e-mails and the award engine's problem file. */
export const REGION_CODE_PATTERN = /^[A-Za-z0-9._-]{1,20}$/;

/**
 * Names every JavaScript object already answers to (`__proto__`, `constructor`, `toString`…).
 * Region codes key prices and quantities in objects all the way to the spreadsheet and the award
 * engine; such a code would read a built-in instead of a price, so it is refused (in any case).
 */
const RESERVED_CODES = new Set([
  '__proto__', 'constructor', 'tostring', 'tolocalestring', 'valueof', 'hasownproperty', 'isprototypeof',
  'propertyisenumerable', '__definegetter__', '__definesetter__', '__lookupgetter__', '__lookupsetter__',
]);

/** True when `code` is one of the reserved words a region code must not be. */
export function isReservedCode(code: string): boolean {
  return RESERVED_CODES.has(code.trim().toLowerCase());
}

export const regionCodeSchema = z
  .string({ error: 'Region code is required.' })
  .trim()
  .min(1, { error: 'Region code is required.', abort: true })
  .max(20, { error: 'Region code must be at most 20 characters.' })
  .regex(REGION_CODE_PATTERN, { error: 'Region code may only contain letters, digits, ".", "_" and "-".' })
  .refine((code) => !isReservedCode(code), {
    error: (issue) => `Region code "${String(issue.input)}" is a reserved word; region codes are letters, digits, ".", "_" and "-", and not a word such as __proto__, constructor or toString.`,
  });

/**
 * An object keyed by region code (or any other user-chosen id) that has no prototype, so that no
 * key can reach a built-in: `prices.toString` is undefined unless a price was given for it, and a
 * `__proto__` key is stored as a key. Build every code-keyed record with this.
 */
export function recordByCode<T>(entries: Iterable<readonly [string, T]> = []): Record<string, T> {
  const record = Object.create(null) as Record<string, T>;
  for (const [key, value] of entries) record[key] = value;
  return record;
}

/**
 * A record keyed by region code (or another user-chosen id), read key by key into a record
 * without a prototype (see {@link recordByCode}). `z.record` skips a `__proto__` key without a
 * word and writes into a plain object; here every key is checked by `key`, every value by
 * `value`, and each issue carries the key as its path (`prices.R07`).
 *
 * `accepts`, optional, is the quick path for the common case, a valid entry (a bid's tens to
 * hundreds of prices, on every save): true only for an entry that `key` and `value` would both
 * accept unchanged, which is then taken as it is; every other entry goes through the schemas,
 * which word the issue. Two zod parses per entry were most of a bid save's validation (bench:api).
 */
export function codeRecordSchema<V>(key: z.ZodType<string>, value: z.ZodType<V>, error: string, accepts?: (k: string, v: unknown) => v is V) {
  return z
    .custom<Record<string, unknown>>((v) => typeof v === 'object' && v !== null && !Array.isArray(v), { error })
    .transform((record, ctx) => {
      const out = recordByCode<V>();
      for (const [rawKey, rawValue] of Object.entries(record)) {
        if (accepts?.(rawKey, rawValue)) {
          out[rawKey] = rawValue;
          continue;
        }
        const k = key.safeParse(rawKey);
        const v = value.safeParse(rawValue);
        if (!k.success) ctx.addIssue({ code: 'custom', path: [rawKey], message: k.error.issues[0]?.message ?? 'This key is not valid.', input: rawKey });
        if (!v.success) ctx.addIssue({ code: 'custom', path: [rawKey], message: v.error.issues[0]?.message ?? 'This value is not valid.', input: rawValue });
        if (k.success && v.success) out[k.data] = v.data;
      }
      return out;
    });
}

/** The value of `key` in a code-keyed record, only when it is the record's own. */
export function byCode<T>(record: Readonly<Record<string, T>> | undefined, key: string): T | undefined {
  return record !== undefined && Object.prototype.hasOwnProperty.call(record, key) ? record[key] : undefined;
}

/** A tender's region row as the buyer enters or imports it. */
export const regionInputSchema = z.object({
  code: regionCodeSchema,
  name: plainText(z
    .string({ error: 'Region name is required.' })
    .trim()
    .min(1, { error: 'Region name is required.' })
    .max(120, { error: 'Region name must be at most 120 characters.' }), 'Region name'),
  forecast: z
    .number({ error: 'Forecast must be a number above 0.' })
    .gt(0, { error: 'Forecast must be a number above 0.' })
    .lt(MAX_AMOUNT, { error: `Forecast must be below ${MAX_AMOUNT.toExponential()}.` })
    // Stored as numeric(16,4): a fifth decimal would be rounded away, and 1e-7 would become 0.
    .refine((v) => hasAtMostDecimals(v, 4), { error: 'Forecast may have at most 4 decimals (and must not round to 0).' }),
});
export type RegionInput = z.infer<typeof regionInputSchema>;

/**
 * Codes that repeat an earlier one, compared without regard to case and surrounding spaces; blank
 * codes are skipped (they are reported as missing instead). Exported so an importer can report
 * duplicates even when other fields of the list are invalid, which stops the schema's own check.
 */
export function findDuplicateRegionCodes(regions: ReadonlyArray<{ code: string }>): Array<{ index: number; message: string }> {
  const firstIndex = new Map<string, number>();
  const duplicates: Array<{ index: number; message: string }> = [];
  regions.forEach((region, i) => {
    const code = region.code.trim();
    if (code === '') return;
    const first = firstIndex.get(code.toUpperCase());
    if (first === undefined) firstIndex.set(code.toUpperCase(), i);
    else duplicates.push({ index: i, message: `Region code "${code}" is used twice (first at region ${first + 1}).` });
  });
  return duplicates;
}

/**
 * A tender's full list of regions: 1 to 500, codes unique. Codes are compared without regard to
 * case, because "r07" and "R07" in one workbook would confuse every reader. A duplicate is reported
 * at its own index (path `[i, 'code']`) and names the index it repeats.
 */
export const regionListSchema = z
  .array(regionInputSchema, { error: 'Regions must be a list.' })
  .min(1, { error: 'A tender needs at least one region.' })
  .max(MAX_REGIONS, { error: `A tender has at most ${MAX_REGIONS} regions.` })
  .superRefine((regions, ctx) => {
    for (const duplicate of findDuplicateRegionCodes(regions)) {
      ctx.addIssue({ code: 'custom', path: [duplicate.index, 'code'], message: duplicate.message });
    }
  });
export type RegionList = z.infer<typeof regionListSchema>;

/** Fixed fee: 0 or more, at most 2 decimals. */
export const fixedFeeSchema = z
  .number({ error: 'Fixed fee must be a number (0 if there is none).' })
  .min(0, { error: 'Fixed fee must be 0 or more.' })
  .lt(MAX_AMOUNT, { error: `Fixed fee must be below ${MAX_AMOUNT.toExponential()}.` })
  .refine((v) => hasAtMostDecimals(v, 2), { error: 'Fixed fee may have at most 2 decimals.' });

/** Capacity cap over the whole contract; null means no cap. */
export const capacitySchema = z
  .number({ error: 'Capacity cap must be a number above 0, or empty for no cap.' })
  .gt(0, { error: 'Capacity cap must be a positive number (leave it empty for no cap).' })
  .lt(MAX_AMOUNT, { error: `Capacity cap must be below ${MAX_AMOUNT.toExponential()}.` })
  // Stored as numeric(16,4), like the forecast.
  .refine((v) => hasAtMostDecimals(v, 4), { error: 'Capacity cap may have at most 4 decimals (and must not round to 0).' })
  .nullable();

/** A delivered unit price for one region: above 0, at most 4 decimals. */
export const unitPriceSchema = z
  .number({ error: 'Unit price must be a number above 0.' })
  .gt(0, { error: 'Unit price must be a positive number.' })
  .lt(MAX_AMOUNT, { error: `Unit price must be below ${MAX_AMOUNT.toExponential()}.` })
  .refine((v) => hasAtMostDecimals(v, 4), { error: 'Unit price may have at most 4 decimals.' });

/**
 * True only for a region code and a unit price that `regionCodeSchema` and `unitPriceSchema`
 * accept unchanged (the code needs no trimming and is no reserved word; the price is a number
 * above 0, below MAX_AMOUNT, with at most 4 decimals): the quick path of a bid's prices.
 */
export function isPlainPrice(code: string, price: unknown): price is number {
  return REGION_CODE_PATTERN.test(code) && !isReservedCode(code)
    && typeof price === 'number' && price > 0 && price < MAX_AMOUNT && hasAtMostDecimals(price, 4);
}

/**
 * PUT /api/tenders/:id/bid. `prices` maps region code → unit price; a region left out is not
 * offered. `capacity: null` means no cap. Issues on a price carry the path `prices.<code>`.
 * Whether each code belongs to the tender is checked by the service, which knows the regions.
 */
export const bidInputSchema = z
  .object({
    fixedFee: fixedFeeSchema,
    capacity: capacitySchema,
    prices: codeRecordSchema(regionCodeSchema, unitPriceSchema, 'Prices must map region codes to unit prices.', isPlainPrice),
    submit: z.boolean({ error: 'Submit must be true or false.' }),
  })
  .superRefine((bid, ctx) => {
    const offered = Object.keys(bid.prices).length;
    if (offered > MAX_REGIONS) {
      ctx.addIssue({ code: 'custom', path: ['prices'], message: `A bid prices at most ${MAX_REGIONS} regions.` });
    }
    // A draft may be saved empty; a submitted bid that offers nothing could never be awarded.
    if (bid.submit && offered === 0) {
      ctx.addIssue({ code: 'custom', path: ['prices'], message: 'Enter a unit price for at least one region before submitting.' });
    }
  });
export type BidInput = z.infer<typeof bidInputSchema>;

/** The figures of a bid, without the draft/submit switch: what a workbook carries. */
export type BidFigures = Omit<BidInput, 'submit'>;
