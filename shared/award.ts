import { z } from 'zod';
import { codeRecordSchema } from './bids';
import { plainText } from './text';

/**
 * The award problem file (version 1) and the award result, as described in DESIGN.md
 * ("The award model"). The client builds problems with these types; the server's award
 * engine validates with `awardProblemSchema` before it builds any model.
 */

const idSchema = plainText(z
  .string({ error: 'Must be a text id.' })
  .trim()
  .min(1, { error: 'Must not be empty.' })
  .max(64, { error: 'Must be at most 64 characters.' }), 'An id');

const fraction = (what: string) =>
  z
    .number({ error: `${what} must be a number between 0 and 1.` })
    .min(0, { error: `${what} must be between 0 and 1 (a fraction: 0.6 means 60 %).` })
    .max(1, { error: `${what} must be between 0 and 1 (a fraction: 0.6 means 60 %).` });

const nonNegative = (what: string) =>
  z
    .number({ error: `${what} must be a number.` })
    .refine(Number.isFinite, { error: `${what} must be a finite number.` })
    .refine((v) => v >= 0, { error: `${what} must not be negative.` });

const unitPrice = nonNegative('Unit price');

/** Region id → unit price, without a prototype, so an id such as `__proto__` or `toString` is an id like any other. */
const pricesByRegion = codeRecordSchema(z.string(), unitPrice, 'Prices must be an object of region id → unit price.');

/** A delivery region and its forecast quantity (strictly positive). */
export const awardRegionSchema = z.object({
  id: idSchema,
  name: plainText(z.string({ error: 'Name must be text.' }).max(200, { error: 'Name must be at most 200 characters.' }), 'Name').optional(),
  demand: z
    .number({ error: 'Forecast quantity must be a number.' })
    .refine(Number.isFinite, { error: 'Forecast quantity must be a finite number.' })
    .refine((v) => v > 0, { error: 'Forecast quantity must be greater than 0.' }),
});

/** A vendor's bid: fixed fee, capacity cap (null = no cap) and unit prices by region id. */
export const awardVendorSchema = z.object({
  id: idSchema,
  name: plainText(z.string({ error: 'Name must be text.' }).max(200, { error: 'Name must be at most 200 characters.' }), 'Name').optional(),
  fixedFee: nonNegative('Fixed fee').default(0),
  capacity: z
    .number({ error: 'Capacity cap must be a number, or null for no cap.' })
    .refine(Number.isFinite, { error: 'Capacity cap must be a finite number.' })
    .refine((v) => v > 0, { error: 'Capacity cap must be greater than 0 (or null for no cap).' })
    .nullable()
    .default(null),
  sme: z.boolean({ error: 'SME must be true or false.' }).default(false),
  prices: pricesByRegion,
});

/** The tender's award rules; every rule is optional. Shares are fractions (0.6 = 60 %). */
export const awardRulesSchema = z.object({
  /** `sole`: one vendor per region for every region; `split` (default): regions may be shared. */
  sourcing: z.enum(['split', 'sole'], { error: 'Sourcing must be "split" or "sole".' }).default('split'),
  /** Regions that must be sole-awarded even when sourcing is split. */
  soleRegions: z.array(idSchema, { error: 'Sole regions must be a list of region ids.' }).default([]),
  maxVendors: z.int({ error: 'Maximum number of vendors must be a whole number.' }).min(1, { error: 'Maximum number of vendors must be at least 1.' }).optional(),
  minVendors: z.int({ error: 'Minimum number of vendors must be a whole number.' }).min(0, { error: 'Minimum number of vendors must not be negative.' }).optional(),
  /** Largest share of the total forecast any one vendor may carry. */
  maxVendorShare: fraction('Maximum vendor share').optional(),
  /** Largest share of any one region's forecast a vendor may carry (dual sourcing below 1). */
  maxRegionShare: fraction('Maximum region share').optional(),
  /** Least total quantity of an awarded vendor; default 1 unit so an awarded vendor always supplies something. */
  minAwardQuantity: nonNegative('Minimum award quantity').optional(),
  exclude: z.array(idSchema, { error: 'Excluded vendors must be a list of vendor ids.' }).default([]),
  require: z.array(idSchema, { error: 'Required vendors must be a list of vendor ids.' }).default([]),
  /** Least share of the total forecast that must go to SME vendors. */
  smeShare: fraction('SME share').optional(),
  /** Quantities are awarded in whole multiples of this (e.g. 1 or 25 units); absent: any quantity. */
  awardIncrement: z
    .number({ error: 'Award increment must be a number.' })
    .refine(Number.isFinite, { error: 'Award increment must be a finite number.' })
    .refine((v) => v > 0, { error: 'Award increment must be greater than 0 (leave it out for none).' })
    .optional(),
});

export const awardOptionsSchema = z.object({
  timeLimitSeconds: z
    .number({ error: 'Time limit must be a number of seconds.' })
    .gt(0, { error: 'Time limit must be greater than 0 seconds.' })
    .max(3600, { error: 'Time limit must be at most 3600 seconds.' })
    .default(60),
  relativeGap: fraction('Relative gap').default(0),
});

/**
 * Whether `quantity` is a whole multiple (1, 2, 3 … times) of `increment`, to floating-point
 * accuracy: the quotient is within 1e-9 (relative) of a whole number of at least 1, so that
 * 0.3 counts as 3 × 0.1. The award engine's validation and verifier use it; the tender editor's
 * check at publish should use this one test too, so both refuse the same forecasts.
 */
export function isWholeMultiple(quantity: number, increment: number): boolean {
  const k = quantity / increment;
  const whole = Math.round(k);
  return whole >= 1 && Math.abs(k - whole) <= 1e-9 * Math.max(1, Math.abs(k));
}

/** The problem file, version 1. Cross-references (ids in prices and rules) are checked too. */
export const awardProblemSchema = z
  .object({
    version: z.literal(1, { error: 'Version must be 1.' }).optional(),
    currency: z.string({ error: 'Currency must be text.' }).max(8, { error: 'Currency must be at most 8 characters.' }).optional(),
    unit: z.string({ error: 'Unit must be text.' }).max(16, { error: 'Unit must be at most 16 characters.' }).optional(),
    regions: z.array(awardRegionSchema, { error: 'Regions must be a list.' }).min(1, { error: 'At least one region is needed.' }),
    vendors: z.array(awardVendorSchema, { error: 'Vendors must be a list.' }),
    rules: awardRulesSchema.default({ sourcing: 'split', soleRegions: [], exclude: [], require: [] }),
    options: awardOptionsSchema.default({ timeLimitSeconds: 60, relativeGap: 0 }),
  })
  .superRefine((p, ctx) => {
    const regionIds = new Set<string>();
    p.regions.forEach((r, i) => {
      if (regionIds.has(r.id)) ctx.addIssue({ code: 'custom', path: (['regions', i, 'id']), message: `Duplicate region id "${r.id}".` });
      regionIds.add(r.id);
    });
    const vendorIds = new Set<string>();
    p.vendors.forEach((v, i) => {
      if (vendorIds.has(v.id)) ctx.addIssue({ code: 'custom', path: (['vendors', i, 'id']), message: `Duplicate vendor id "${v.id}".` });
      vendorIds.add(v.id);
      for (const region of Object.keys(v.prices)) {
        if (!regionIds.has(region)) {
          ctx.addIssue({ code: 'custom', path: (['vendors', i, 'prices', region]), message: `Unknown region "${region}": it is not in the tender's regions.` });
        }
      }
    });
    const rules = p.rules;
    rules.soleRegions.forEach((id, k) => {
      if (!regionIds.has(id)) ctx.addIssue({ code: 'custom', path: (['rules', 'soleRegions', k]), message: `Unknown region "${id}".` });
    });
    for (const key of ['exclude', 'require'] as const) {
      rules[key].forEach((id, k) => {
        if (!vendorIds.has(id)) ctx.addIssue({ code: 'custom', path: (['rules', key, k]), message: `Unknown vendor "${id}".` });
      });
    }
    const increment = rules.awardIncrement;
    // An increment refused above (zero, negative, not finite) has its own message: no forecast is judged by it.
    if (increment !== undefined && Number.isFinite(increment) && increment > 0) {
      p.regions.forEach((r, i) => {
        if (!isWholeMultiple(r.demand, increment)) {
          ctx.addIssue({ code: 'custom', path: ['regions', i, 'demand'], message: `Forecast quantity ${r.demand} is not a whole multiple of the award increment ${increment}: every quantity awarded is.` });
        }
      });
    }
    if (rules.minVendors !== undefined && rules.maxVendors !== undefined && rules.minVendors > rules.maxVendors) {
      ctx.addIssue({ code: 'custom', path: ['rules', 'minVendors'], message: `Minimum number of vendors (${rules.minVendors}) is above the maximum (${rules.maxVendors}).` });
    }
  });

/** A problem file as written by a client (defaults not yet applied). */
export type AwardProblem = z.input<typeof awardProblemSchema>;
/** A problem after validation, with every default applied. */
export type ValidAwardProblem = z.output<typeof awardProblemSchema>;
export type AwardRules = z.output<typeof awardRulesSchema>;

/**
 * optimal: proven best award; feasible: an award meeting every rule, stopped at the time limit
 * (see `gap`); infeasible: no award meets the rules (see `diagnosis`); failed: the engine broke.
 */
export type AwardStatus = 'optimal' | 'feasible' | 'infeasible' | 'failed';

/** One region's part of a vendor's award. */
export interface AwardLine {
  region: string;
  quantity: number;
  unitPrice: number;
  cost: number;
}

/** One awarded vendor: fee, total quantity, value (fee + variable cost) and share of the total forecast. */
export interface VendorAward {
  vendor: string;
  fixedFee: number;
  quantity: number;
  value: number;
  share: number;
  lines: AwardLine[];
}

/** The engine's answer, in DESIGN.md's result format (plus `boundSource` and `message`). */
export interface AwardResult {
  status: AwardStatus;
  /** Total cost = fixedCost + variableCost; null when there is no award. */
  objective: number | null;
  fixedCost: number | null;
  variableCost: number | null;
  /** Best proven lower bound on the optimum (null when none is known). */
  bound: number | null;
  /** What the bound is, in words (e.g. "HiGHS branch-and-bound dual bound"). */
  boundSource: string | null;
  /** Relative gap (objective − bound) / |objective|; 0 when optimal. */
  gap: number | null;
  solveSeconds: number;
  /** The engine (and version) that produced the award. */
  engine: string;
  /** Exactly the awarded vendors. */
  awards: VendorAward[];
  /** Reasons in words, for infeasible or failed results. */
  diagnosis: string[];
}
