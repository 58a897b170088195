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
    /** Always set: default 1 unit (or the total forecast if that is smaller). */
    minAwardQuantity: number;
    smeShare?: number;
  };
  timeLimitSeconds: number;
  relativeGap: number;
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
  };
}

/**
 * The most vendor i can usefully supply: its cap, the vendor-share rule and the regions it bid
 * (at most each region's forecast times the region-share rule). Every model and check uses this.
 */
export function effectiveCapacity(inst: AwardInstance, i: number): number {
  const v = inst.vendors[i];
  const share = inst.rules.maxRegionShare ?? 1;
  let reach = 0;
  v.prices.forEach((p, j) => {
    if (p !== null) reach += inst.regions[j].sole ? inst.regions[j].demand : inst.regions[j].demand * share;
  });
  let cap = Math.min(v.capacity, reach);
  if (inst.rules.maxVendorShare !== undefined) cap = Math.min(cap, inst.rules.maxVendorShare * inst.totalDemand);
  return cap;
}
