import { z } from 'zod';
import { plainText } from './text';

/**
 * After closing, before evaluation: the buyer checks each bid. An excluded bid is out of every
 * scenario's problem; its vendor receives an exclusion notice, not a regret letter.
 */
export const COMPLIANCE_DECISIONS = ['compliant', 'excluded'] as const;
export type ComplianceDecision = (typeof COMPLIANCE_DECISIONS)[number];

/** The fixed list of exclusion grounds (API codes). */
export const EXCLUSION_GROUNDS = ['late-or-incomplete', 'qualification', 'conflict-of-interest', 'abnormally-low', 'other'] as const;
export type ExclusionGround = (typeof EXCLUSION_GROUNDS)[number];

/** The buyer's words for each ground (screens, notices, exports). */
export const EXCLUSION_GROUND_LABELS: Record<ExclusionGround, string> = {
  'late-or-incomplete': 'Late or incomplete',
  qualification: 'Fails the qualification criteria',
  'conflict-of-interest': 'Conflict of interest',
  'abnormally-low': 'Abnormally low and not justified',
  other: 'Other',
};

const note = (label: string) =>
  plainText(
    z.string({ error: `${label} is required.` }).trim().min(1, { error: `${label} is required.` }).max(2000, { error: `${label} must be at most 2000 characters.` }),
    label, true,
  );

/** PUT /api/tenders/:id/bids/:bidId/compliance */
export const complianceInputSchema = z
  .object({
    decision: z.enum(COMPLIANCE_DECISIONS, { error: 'Decision must be compliant or excluded.' }),
    ground: z.enum(EXCLUSION_GROUNDS, { error: `Ground must be one of: ${EXCLUSION_GROUNDS.join(', ')}.` }).nullable().optional(),
    note: note('Note'),
  })
  .superRefine((v, ctx) => {
    if (v.decision === 'excluded' && !v.ground) ctx.addIssue({ code: 'custom', path: ['ground'], message: 'An exclusion needs a ground from the list.' });
    if (v.decision === 'compliant' && v.ground) ctx.addIssue({ code: 'custom', path: ['ground'], message: 'A compliant bid has no exclusion ground.' });
  });
export type ComplianceInput = z.output<typeof complianceInputSchema>;

/** PUT /api/tenders/:id/bids/:bidId/abnormally-low */
export const abnormallyLowInputSchema = z.object({
  explanationRequestedAt: z.iso.datetime({ offset: true, error: 'When the explanation was asked for must be a date and time (ISO 8601 with a time zone).' }).nullable().optional(),
  accepted: z.boolean({ error: 'Accepted must be true or false.' }),
  note: note('Note'),
});
export type AbnormallyLowInput = z.output<typeof abnormallyLowInputSchema>;

/** POST /api/tenders/:id/bid/validity-extension: until when (absent: one more validity period). */
export const validityExtensionInputSchema = z.object({
  until: z.iso.datetime({ offset: true, error: 'Until must be a date and time (ISO 8601 with a time zone).' }).optional(),
});

/** When a closed tender's bids stop being valid: the closing time plus the bid validity period (days). */
export function bidsValidUntil(closesAt: Date, bidValidityDays: number): Date {
  return new Date(closesAt.getTime() + bidValidityDays * 86_400_000);
}

export const bidIdParamsSchema = z.object({
  id: z.uuid({ error: 'Must be a valid id.' }),
  bidId: z.uuid({ error: 'Must be a valid id.' }),
});

export interface ComplianceView {
  /** null: not yet checked. */
  decision: ComplianceDecision | null;
  ground: ExclusionGround | null;
  note: string | null;
  decidedAt: string | null;
}

export interface AbnormallyLowView {
  explanationRequestedAt: string | null;
  accepted: boolean;
  note: string;
  decidedAt: string;
}

/** A unit price more than the threshold below the median of the compliant bids' prices in its region. */
export interface PriceFlag {
  region: string;
  price: number;
  /** Median of the compliant (not excluded) bids' prices in the region. */
  median: number;
  /** median × (1 − percent / 100): a price below it is flagged. */
  threshold: number;
}

/** A bid total at the forecast (fixed fee + Σ price × forecast) more than the threshold below the median total. */
export interface TotalFlag {
  total: number;
  median: number;
  threshold: number;
}

export interface BidFlags {
  /** The tender's threshold, in percent. */
  percent: number;
  prices: PriceFlag[];
  /** null: not flagged (or not comparable: see `totalCompared`). */
  total: TotalFlag | null;
  /**
   * Whether the bid's total was compared: only bids that price every region are (a bid for fewer
   * regions covers less volume, so its total is lower without being abnormally low).
   */
  totalCompared: boolean;
}

/** One row of the opening record. */
export interface OpeningRecordBid {
  vendor: { id: string; name: string };
  /** When the last submission arrived in full, by the server's clock. */
  receivedAt: string;
  revision: number;
  /** The receipt's commitment (DEVELOPERS.md, "Sealed bids"). */
  digest: string;
}

export interface OpeningRecordContent {
  tender: { id: string; reference: string; title: string };
  closesAt: string;
  openedAt: string;
  bids: OpeningRecordBid[];
  withdrawn: { vendor: { id: string; name: string }; withdrawnAt: string }[];
}

/** GET /api/tenders/:id/opening-record: `digest` is the SHA-256 of the canonical JSON of `record`. */
export interface OpeningRecordView {
  record: OpeningRecordContent;
  digest: string;
  algorithm: 'sha256-canonical-json';
}
