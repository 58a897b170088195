import { awardProblemSchema, type ValidAwardProblem } from '../../shared/award';
import { AwardInputError } from './errors';
import { fieldPath } from '@shared/field-path';

/** A vendor after normalisation: indices instead of ids, caps made explicit. */
export interface InstanceVendor {
  id: string;
  name: string;
  fee: number;
  /** The stated cap, or the total forecast when none was stated (the smallest cap that never binds). */
  capacity: number;
  capped: boolean;
  sme: boolean;
  /** Unit price per region index; null where the vendor did not bid. */
  prices: (number | null)[];
  excluded: boolean;
  required: boolean;
}

export interface InstanceRegion {
  id: string;
  name: string;
  demand: number;
  /** Must be awarded to exactly one vendor. */
  sole: boolean;
}

/** The validated, normalised problem every later stage works from (no raw JSON past this point). */
export interface AwardInstance {
  regions: InstanceRegion[];
  vendors: InstanceVendor[];
  totalDemand: number;
  unit: string;
  rules: {
    maxVendors?: number;
    minVendors?: number;
    maxVendorShare?: number;
    maxRegionShare?: number;
    /** Always set: default 1 unit (or the total forecast if that is smaller); with an award increment, rounded up to whole increments by `inIncrements`. */
    minAwardQuantity: number;
    smeShare?: number;
  };
  timeLimitSeconds: number;
  relativeGap: number;
  /** The award increment (`rules.awardIncrement`) in the problem's unit; absent: any quantity. */
  increment?: number;
  /**
   * Set only on the solver's view of an instance with an increment (`inIncrements`): every
   * quantity here counts whole increments of this size, and awarded quantities are integers.
   */
  unitSize?: number;
}

/** Validates a problem file; throws AwardInputError naming every refused field. */
export function validateProblem(input: unknown): ValidAwardProblem {
  const parsed = awardProblemSchema.safeParse(input);
  if (!parsed.success) {
    throw new AwardInputError(parsed.error.issues.map((i) => ({ field: fieldPath(i.path), message: i.message })));
  }
  return parsed.data;
}

/** Validates and normalises: uncapped vendors get the total forecast as cap, rules get their defaults. */
export function toInstance(problem: ValidAwardProblem): AwardInstance {
  const totalDemand = problem.regions.reduce((s, r) => s + r.demand, 0);
  const soleIds = new Set(problem.rules.soleRegions);
  const allSole = problem.rules.sourcing === 'sole';
  const regionIndex = new Map(problem.regions.map((r, j) => [r.id, j]));
  const excluded = new Set(problem.rules.exclude);
  const required = new Set(problem.rules.require);
  const regions = problem.regions.map((r) => ({ id: r.id, name: r.name ?? r.id, demand: r.demand, sole: allSole || soleIds.has(r.id) }));
  const vendors = problem.vendors.map((v) => {
    const prices: (number | null)[] = regions.map(() => null);
    for (const [region, price] of Object.entries(v.prices)) prices[regionIndex.get(region)!] = price;
    return {
      id: v.id,
      name: v.name ?? v.id,
      fee: v.fixedFee,
      capacity: v.capacity ?? totalDemand,
      capped: v.capacity !== null,
      sme: v.sme,
      prices,
      excluded: excluded.has(v.id),
      required: required.has(v.id),
    };
  });
  const r = problem.rules;
  return {
    regions,
    vendors,
    totalDemand,
    unit: problem.unit ?? 'units',
    rules: {
      maxVendors: r.maxVendors,
      minVendors: r.minVendors,
      maxVendorShare: r.maxVendorShare,
      maxRegionShare: r.maxRegionShare,
      minAwardQuantity: r.minAwardQuantity ?? Math.min(1, totalDemand),
      smeShare: r.smeShare,
    },
    timeLimitSeconds: problem.options.timeLimitSeconds,
    relativeGap: problem.options.relativeGap,
    ...(r.awardIncrement !== undefined ? { increment: r.awardIncrement } : {}),
  };
}

// Quotients within this (relative) of a whole number are that number: 0.3 / 0.1 is 3, not 2.999….
const WHOLE = 1e-9;
const floorWhole = (x: number) => Math.floor(x + WHOLE * Math.max(1, Math.abs(x)));
const ceilWhole = (x: number) => Math.ceil(x - WHOLE * Math.max(1, Math.abs(x)));

/**
 * The instance the models are built from (MODEL.md, "Award increment"): with an increment u,
 * every quantity counted in whole increments — forecasts d/u (whole: validation checks it),
 * caps ⌊K/u⌋, the minimum award ⌈m/u⌉, unit prices p·u per increment, so costs are unchanged —
 * and `unitSize` = u tells the model builder that quantities are integers. Without an
 * increment, the instance itself. Fees, shares and vendor counts are the same in both.
 */
export function inIncrements(inst: AwardInstance): AwardInstance {
  const u = inst.increment;
  if (u === undefined || inst.unitSize !== undefined) return inst;
  const regions = inst.regions.map((r) => ({ ...r, demand: Math.round(r.demand / u) }));
  const totalDemand = regions.reduce((s, r) => s + r.demand, 0);
  const vendors = inst.vendors.map((v) => ({
    ...v,
    capacity: v.capped ? floorWhole(v.capacity / u) : totalDemand,
    prices: v.prices.map((p) => (p === null ? null : p * u)),
  }));
  const rules = { ...inst.rules, minAwardQuantity: Math.max(0, ceilWhole(inst.rules.minAwardQuantity / u)) };
  return { ...inst, regions, vendors, totalDemand, rules, increment: undefined, unitSize: u };
}

/**
 * The most vendor i can usefully supply: its cap, the vendor-share rule and the regions it bid
 * (at most each region's forecast times the region-share rule). Every model and check uses this.
 */
export function effectiveCapacity(inst: AwardInstance, i: number): number {
  const v = inst.vendors[i];
  let reach = 0;
  v.prices.forEach((p, j) => {
    if (p !== null) reach += inst.regions[j].sole ? inst.regions[j].demand : regionLimit(inst, j);
  });
  let cap = Math.min(v.capacity, reach);
  if (inst.rules.maxVendorShare !== undefined) cap = Math.min(cap, inst.rules.maxVendorShare * inst.totalDemand);
  // In whole increments a vendor's quantities are integers, and so is their sum.
  return inst.unitSize === undefined ? cap : floorWhole(cap);
}

/** The most vendor i may carry of a split region j under the region-share rule (whole increments in the solver's view). */
export function regionLimit(inst: AwardInstance, j: number): number {
  const limit = inst.regions[j].demand * (inst.rules.maxRegionShare ?? 1);
  return inst.unitSize === undefined ? limit : floorWhole(limit);
}
