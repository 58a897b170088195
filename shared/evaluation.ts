import { z } from 'zod';
import { awardRulesSchema, type AwardResult, type AwardRules } from './award';
import { plainText } from './text';

/**
 * Evaluation of a closed tender: scenarios (named sets of award rules), runs of the award engine,
 * comparison, resilience, the recommendation and its approval, and the audit trail.
 * In rules, vendor ids are vendor organisation ids and region ids are region codes.
 */

export const RUN_STATUSES = ['queued', 'solving', 'optimal', 'feasible', 'infeasible', 'failed', 'cancelled'] as const;
export type RunStatus = (typeof RUN_STATUSES)[number];
export const FINISHED_RUN_STATUSES: readonly RunStatus[] = ['optimal', 'feasible', 'infeasible', 'failed', 'cancelled'];

export const RECOMMENDATION_STATUSES = ['recommended', 'approved', 'returned'] as const;
export type RecommendationStatus = (typeof RECOMMENDATION_STATUSES)[number];

const text = (label: string, max: number, multiline = false) =>
  plainText(z.string({ error: `${label} is required.` }).trim().min(1, { error: `${label} is required.` }).max(max, { error: `${label} must be at most ${max} characters.` }), label, multiline);

/** POST /api/tenders/:id/scenarios and PUT /api/scenarios/:id */
export const scenarioInputSchema = z.object({
  name: text('Name', 120),
  rules: awardRulesSchema,
  /** Seconds the engine may take (default 60). */
  timeLimitSeconds: z.number({ error: 'Time limit must be a number of seconds.' }).int().min(1).max(600, { error: 'Time limit must be at most 600 seconds.' }).default(60),
});
export type ScenarioInput = z.input<typeof scenarioInputSchema>;

/** POST /api/tenders/:id/recommendation */
export const recommendationInputSchema = z.object({
  runId: z.uuid({ error: 'Choose a run.' }),
  justification: text('Justification', 4000, true),
});
/** POST /api/tenders/:id/recommendation/approve and …/return */
export const decisionInputSchema = z.object({
  comment: plainText(z.string({ error: 'Comment must be text.' }).trim().max(4000, { error: 'Comment must be at most 4000 characters.' }), 'Comment', true).default(''),
});
export const returnInputSchema = z.object({ comment: text('Comment', 4000, true) });

/** GET /api/tenders/:id/compare?runs=a,b,c */
export const compareQuerySchema = z.object({
  runs: z
    .string({ error: 'List the runs to compare.' })
    .transform((s) => s.split(',').map((x) => x.trim()).filter(Boolean))
    .pipe(z.array(z.uuid({ error: 'Each run must be a valid id.' })).min(2, { error: 'Compare at least two runs.' }).max(8, { error: 'Compare at most eight runs.' })),
});

export interface ScenarioView {
  id: string;
  tenderId: string;
  name: string;
  rules: AwardRules;
  timeLimitSeconds: number;
  /** The ready-made scenarios every closed tender starts with: its published award basis, all split, all sole. */
  builtIn: 'published' | 'split' | 'sole' | null;
  /** True when the rules are the published award basis (the only runs that can be recommended); false: a what-if. */
  awardable: boolean;
  /** For a what-if: which rule differs from the published basis, in words (null when awardable). */
  whatIf: string | null;
  createdAt: string;
  latestRun: RunSummary | null;
}

export interface RunSummary {
  id: string;
  scenarioId: string;
  scenarioName: string;
  /** The rules this run solved are the published award basis; false: a what-if (see `whatIf`). */
  awardable: boolean;
  whatIf: string | null;
  status: RunStatus;
  queuedAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  timeLimitSeconds: number;
  objective: number | null;
  /** When a vendor was taken out for a resilience check: its id. */
  droppedVendor: string | null;
}

/** GET /api/runs/:id */
export interface RunView extends RunSummary {
  tenderId: string;
  currency: string;
  unit: string;
  /** SHA-256 of the exact problem solved (bids and rules). */
  inputDigest: string;
  result: AwardResult | null;
  /** A re-solve of another run (drop-out or forecast sensitivity): that run's id; else null. */
  parentRunId: string | null;
  /** Forecast sensitivity re-solve: the change in per cent, and the one region changed (null: all). */
  forecastChangePercent: number | null;
  scaledRegion: string | null;
  /** Names for the ids in `result`. */
  vendors: Record<string, { name: string; sme: boolean }>;
  regions: Record<string, { name: string; forecast: number }>;
}

/** One column of the compare screen. */
export interface ComparedRun {
  runId: string;
  scenarioName: string;
  awardable: boolean;
  whatIf: string | null;
  status: RunStatus;
  objective: number | null;
  fixedCost: number | null;
  variableCost: number | null;
  vendorsAwarded: number;
  largestShare: number | null;
  /** Regions supplied by more than one vendor. */
  regionsSplit: number;
  /** objective − the split baseline's objective (null without a feasible baseline). */
  priceOverSplit: number | null;
  /** A fraction: 0.05 means 5 %. */
  priceOverSplitPercent: number | null;
}

/** GET /api/tenders/:id/compare */
export interface Comparison {
  currency: string;
  runs: ComparedRun[];
  /** The plain all-split run used as the baseline (the tender's built-in split scenario, latest finished run). */
  baseline: { runId: string; objective: number } | null;
  /**
   * Cost of sole award: built-in sole − built-in split, never negative; a range when either run is
   * not proven best (`soleAwardCostRange` in shared/award-wording.ts).
   */
  costOfSoleAward: SoleAwardCost | null;
}

/**
 * What sole award costs over split award, as far as the two runs prove it: `low` … `high` (equal
 * when both runs are proven best). Percentages are fractions of the split run's total.
 */
export interface SoleAwardCost {
  low: number;
  high: number;
  lowPercent: number;
  highPercent: number;
  /** Both runs proven best: `low` = `high` is the exact cost. */
  exact: boolean;
}

/** GET /api/runs/:id/resilience: the award re-solved without each awarded vendor in turn. */
export interface ResilienceView {
  runId: string;
  objective: number | null;
  rows: {
    vendor: string;
    vendorName: string;
    status: RunStatus;
    objective: number | null;
    /** objective without the vendor − the run's objective. */
    increase: number | null;
    /** A fraction of the run's objective: 0.05 means 5 %. */
    increasePercent: number | null;
    diagnosis: string[];
    worst: boolean;
    /**
     * The scenario requires this vendor (rule `require`): it cannot be dropped, so nothing is
     * re-solved for it (`status` is then the run's own) and it is never the worst case.
     */
    required: boolean;
  }[];
}

/** The forecast changes every sensitivity check tries, in per cent. */
export const FORECAST_STEPS = [-20, -10, 10, 20] as const;

/** POST /api/runs/:id/sensitivity: all regions, or one region alone (`regionCode`). */
export const sensitivityInputSchema = z.object({
  regionCode: plainText(z.string({ error: 'Region code must be text.' }).trim().min(1, { error: 'Choose a region.' }).max(64, { error: 'Region code must be at most 64 characters.' }), 'Region code').optional(),
});
export type SensitivityInput = z.input<typeof sensitivityInputSchema>;

/** One re-solve of the run with the forecasts changed by `changePercent`. */
export interface SensitivityCase {
  changePercent: number;
  runId: string;
  status: RunStatus;
  /** Total cost of the re-solved award (null while solving, or with no award). */
  objective: number | null;
  vendorsAwarded: number | null;
  /** The same vendors win the same regions as in the run (null until solved). */
  sameAward: boolean | null;
  /** What changes, in words ("Vendor X is no longer awarded", "Vendor Y also supplies Depot 3"). */
  changes: string[];
}

/** One scaling (all regions, or one region alone) tried at every step of FORECAST_STEPS. */
export interface SensitivityCheck {
  /** null: every region's forecast scaled together. */
  regionCode: string | null;
  regionName: string | null;
  cases: SensitivityCase[];
  /** The widest range of tested changes around 0 % in which the same vendors win the same regions. */
  stableFrom: number | null;
  stableTo: number | null;
  /** That range in one sentence, or what is still running. */
  summary: string;
  /** Re-solves still queued or solving. */
  pending: number;
}

/** GET /api/runs/:id/sensitivity */
export interface SensitivityView {
  runId: string;
  objective: number | null;
  vendorsAwarded: number;
  steps: number[];
  /** The award increment the scaled forecasts were rounded to (null: rounded to 4 decimals). */
  awardIncrement: number | null;
  /** The all-regions check first (null when not started), then each region checked alone. */
  all: SensitivityCheck | null;
  regions: SensitivityCheck[];
}

export interface RecommendationView {
  id: string;
  tenderId: string;
  runId: string;
  status: RecommendationStatus;
  justification: string;
  recommendedBy: { id: string; name: string };
  recommendedAt: string;
  decidedBy: { id: string; name: string } | null;
  decidedAt: string | null;
  comment: string | null;
}

export interface AuditEntryView {
  /** Position in its own chain (the tender's, or the administration's): 1, 2, 3… with no gaps. */
  number: number;
  /** The store's global sequence, shared by every chain: for engineers, not for reading. */
  seq: number;
  /** What happened, in words, with names (a bid's vendor only once the tender is no longer sealed). */
  description: string;
  at: string;
  actor: { id: string; name: string; role: string } | null;
  action: string;
  subject: string;
  detail: Record<string, unknown>;
  beforeDigest: string | null;
  afterDigest: string | null;
  hash: string;
}

/** GET /api/tenders/:id/audit/verify */
export interface AuditVerification {
  ok: boolean;
  entries: number;
  /** The first entry whose hash does not match, if any (its `number`). */
  brokenAt: number | null;
  message: string;
}
