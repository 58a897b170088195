import { z } from 'zod';
import { LABEL } from './award-basis';

/**
 * "Why this award" and the losing vendors' debrief of one finished run (GET /api/runs/:id/explanation).
 * Every figure is re-computed by the award engine (server/award/explain.ts), never estimated:
 * - per region, the cheapest compliant unit price that was not awarded there, and the extra total
 *   cost if that vendor were made to supply the whole region (a re-solve with that assignment
 *   forced: the other bids for the region are set aside);
 * - per vendor, the unit price at which it would have been awarded each region it bid but did not
 *   win (all else equal), and for a vendor with no award the uniform cut of all its prices (unit
 *   prices and fixed fee) at which it would have won anything.
 * Buyer and compliance only: never shown to vendors.
 */

/** Why the cheapest unawarded bid of a region was not awarded it. */
export const EXPLANATION_REASONS = [
  /** Its capacity is used elsewhere (or its cap is below the region's forecast). */
  'capacity',
  /** Its fixed fee would not be recovered by the lower unit price. */
  'fixedFee',
  /** All costs counted, it is dearer (its unit price is not the lowest once capacity and fees are settled). */
  'price',
  /** The re-solve found no award within its time limit: nothing can be said. */
  'unsettled',
  // A rule of the scenario, by the engine's own rule name (shared/award.ts).
  'maxVendors', 'minVendors', 'maxVendorShare', 'maxRegionShare', 'soleRegions', 'minAwardQuantity', 'awardIncrement', 'smeShare', 'require',
] as const;
export type ExplanationReason = (typeof EXPLANATION_REASONS)[number];

export const EXPLANATION_STATUSES = ['not-started', 'queued', 'running', 'done', 'failed'] as const;
export type ExplanationStatus = (typeof EXPLANATION_STATUSES)[number];

const money = z.number();

export const regionChallengerSchema = z.object({
  vendor: z.string(),
  vendorName: z.string(),
  unitPrice: z.number(),
  reason: z.enum(EXPLANATION_REASONS),
  /** The reason in the buyer's words, with the figure. */
  words: z.string(),
  /** Forced total − the run's total; null when the vendor cannot be made to supply the region. */
  extraCost: money.nullable(),
  /** True when both the run and the forced re-solve are proven best: `extraCost` is exact. */
  exact: z.boolean(),
  /** When not exact: the least the extra cost can be (from the forced re-solve's proven bound). */
  extraCostAtLeast: money.nullable(),
});

export const regionExplanationSchema = z.object({
  region: z.string(),
  regionName: z.string(),
  forecast: z.number(),
  awarded: z.array(z.object({ vendor: z.string(), vendorName: z.string(), quantity: z.number(), unitPrice: z.number() })),
  /** The cheapest compliant bid for the region that got none of it; null when there is none. */
  challenger: regionChallengerSchema.nullable(),
});

export const TOLERANCES = ['cent', 'percent'] as const;

export const debriefRegionSchema = z.object({
  region: z.string(),
  regionName: z.string(),
  unitPrice: z.number(),
  /**
   * The highest unit price (to the tolerance) at which the vendor would have been awarded the
   * region, all else equal; null when no price would do (see `reason`).
   */
  neededPrice: z.number().nullable(),
  /** `cent`: to one cent per unit; `percent`: to 0.5 % of its bid price (whichever is larger). */
  tolerance: z.enum(TOLERANCES),
  reason: z.enum(EXPLANATION_REASONS).nullable(),
  words: z.string(),
});

export const vendorDebriefSchema = z.object({
  vendor: z.string(),
  vendorName: z.string(),
  awarded: z.boolean(),
  regions: z.array(debriefRegionSchema),
  /**
   * For a vendor with no award: the uniform cut of all its prices (a fraction: 0.08 = 8 %) at which
   * it would have won anything; null when no cut would do, absent (null object) for awarded vendors.
   */
  uniformReduction: z.object({
    fraction: z.number().nullable(),
    /** `percent`: to 0.5 percentage points; `cent`: to a cent of its lowest unit price, when that is larger. */
    tolerance: z.enum(TOLERANCES),
    words: z.string(),
  }).nullable(),
});

/** A vendor whose debrief can be asked for (POST /api/runs/:id/debrief/:vendorId). */
export const debriefVendorSchema = z.object({
  vendor: z.string(),
  vendorName: z.string(),
  /** It won something (its debrief covers the regions it bid and did not win). */
  awarded: z.boolean(),
});

export const explanationResultSchema = z.object({
  currency: z.string(),
  unit: z.string(),
  objective: z.number(),
  /** The run is the proven best award (else extra costs are stated against its own total, with bounds). */
  runProven: z.boolean(),
  regions: z.array(regionExplanationSchema),
  /** The vendors with a debrief to ask for, one at a time (computed on demand, not here). */
  debriefVendors: z.array(debriefVendorSchema),
  /** How many re-solves the figures took, and how long in all. */
  solves: z.number(),
  seconds: z.number(),
  /** The time the re-solves were allowed (a multiple of the run's solve time). */
  budgetSeconds: z.number(),
  /** Regions whose extra cost is a range (its re-solve not proven within its share of the time). */
  ranges: z.number(),
});

export const DEBRIEF_STATUSES = ['queued', 'running', 'done', 'failed'] as const;

/** One vendor's debrief as asked for: where its job is, and its figures once done. */
export const debriefViewSchema = z.object({
  vendor: z.string(),
  status: z.enum(DEBRIEF_STATUSES),
  progress: z.object({ done: z.number(), total: z.number() }),
  result: vendorDebriefSchema.nullable(),
  error: z.string().nullable(),
  computedAt: z.string().nullable(),
});

/**
 * One region worked out exactly on demand (POST /api/runs/:id/explanation/regions/:region): its
 * forced re-solve given the run's whole time limit. Once done, its figures replace the region's in
 * `result.regions` (and `result.ranges` counts again); the explanation as first computed is kept.
 */
export const regionCheckViewSchema = z.object({
  region: z.string(),
  status: z.enum(DEBRIEF_STATUSES),
  result: regionExplanationSchema.nullable(),
  error: z.string().nullable(),
  queuedAt: z.string(),
  computedAt: z.string().nullable(),
});

/** GET /api/runs/:id/explanation */
export const explanationViewSchema = z.object({
  runId: z.string(),
  status: z.enum(EXPLANATION_STATUSES),
  progress: z.object({ done: z.number(), total: z.number() }),
  result: explanationResultSchema.nullable(),
  error: z.string().nullable(),
  /** When it was first asked for, and when its figures were stored. */
  queuedAt: z.string().nullable(),
  computedAt: z.string().nullable(),
  /** The debriefs asked for so far (per vendor, cached per run). */
  debriefs: z.array(debriefViewSchema),
  /** The regions asked to be worked out exactly so far (their figures are already in `result`). */
  regionChecks: z.array(regionCheckViewSchema),
});

export type RegionChallenger = z.infer<typeof regionChallengerSchema>;
export type RegionExplanation = z.infer<typeof regionExplanationSchema>;
export type DebriefRegion = z.infer<typeof debriefRegionSchema>;
export type VendorDebrief = z.infer<typeof vendorDebriefSchema>;
export type DebriefVendor = z.infer<typeof debriefVendorSchema>;
export type DebriefView = z.infer<typeof debriefViewSchema>;
export type ExplanationResult = z.infer<typeof explanationResultSchema>;
export type ExplanationView = z.infer<typeof explanationViewSchema>;
export type RegionCheckView = z.infer<typeof regionCheckViewSchema>;

/** Words for the figures: money in the tender's currency, quantities in its unit. */
export interface WordsContext {
  currency: string;
  unit: string;
}

const moneyFormat = (currency: string) => {
  try {
    return new Intl.NumberFormat('en-GB', { style: 'currency', currency, minimumFractionDigits: 2, maximumFractionDigits: 2 });
  } catch {
    return new Intl.NumberFormat('en-GB', { minimumFractionDigits: 2, maximumFractionDigits: 2 });
  }
};
const qty = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 4 });
const pct = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 1 });

/** The reason alone, in the buyer's words (rules named as the published basis names them). */
export function reasonWords(reason: ExplanationReason, facts: { capacity?: number | null; forecast?: number; unit: string; fullElsewhere?: boolean }): string {
  switch (reason) {
    case 'capacity':
      if (facts.capacity !== undefined && facts.capacity !== null && facts.forecast !== undefined && facts.capacity < facts.forecast) {
        const cap = `its capacity cap (${qty.format(facts.capacity)} ${facts.unit})`;
        return facts.fullElsewhere
          ? `${cap} is used in full in other regions where it saves more, and is below this region's forecast (${qty.format(facts.forecast)} ${facts.unit})`
          : `${cap} is below the region's forecast (${qty.format(facts.forecast)} ${facts.unit})`;
      }
      return 'its capacity is used in other regions where it saves more';
    case 'fixedFee':
      return 'its fixed fee would not be recovered by its lower unit price';
    case 'price':
      return 'all costs counted, its offer is dearer';
    case 'unsettled':
      return 'working the award out again with it did not finish within the time limit';
    case 'soleRegions':
      return `the region goes to one vendor (${LABEL.soleRegions}), and it cannot take the whole region`;
    case 'require':
      return 'a vendor the scenario requires would then have to be awarded elsewhere at a higher cost';
    default:
      return `the ${LABEL[reason]} rule keeps it out`;
  }
}

/** "Would have cost €1,200.00 more" (or the range when not proven best; or why it cannot). */
export function extraCostWords(c: Pick<RegionChallenger, 'extraCost' | 'exact' | 'extraCostAtLeast'>, ctx: WordsContext): string {
  const m = moneyFormat(ctx.currency);
  if (c.extraCost === null) return 'it could not have been made to supply the whole region under the rules';
  if (c.exact) return `it would have cost ${m.format(c.extraCost)} more`;
  return `it would have cost between ${m.format(Math.max(0, c.extraCostAtLeast ?? 0))} and ${m.format(c.extraCost)} more`;
}

export function moneyWords(amount: number, ctx: WordsContext): string {
  return moneyFormat(ctx.currency).format(amount);
}

export function percentWords(fraction: number): string {
  return `${pct.format(fraction * 100)} %`;
}
