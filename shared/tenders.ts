import { z } from 'zod';
import { emailSchema } from './auth';
import { awardRulesSchema } from './award';
import type { AbnormallyLowView, BidFlags, ComplianceView } from './compliance';
import { bidInputSchema, regionListSchema } from './bids';
import type { AmendmentView } from './procedure';
import { plainText } from './text';

/**
 * A tender's life: draft → open (published) → closed (bids unsealed) → awarded (approved; standstill
 * end fixed) → notified (letters sent) → contracted (every awarded vendor's contract recorded after
 * the standstill); draft or open → cancelled.
 */
export const TENDER_STATUSES = ['draft', 'open', 'closed', 'awarded', 'notified', 'contracted', 'cancelled'] as const;
export type TenderStatus = (typeof TENDER_STATUSES)[number];

/** A bid's life: draft → submitted → revised (submitted again) / withdrawn; locked at closing. */
export const BID_STATUSES = ['draft', 'submitted', 'revised', 'withdrawn'] as const;
export type BidStatus = (typeof BID_STATUSES)[number];

/**
 * The product's core rules, in one place for server and client (SQL included: `sqlList` in
 * server/services/sql.ts). A bid counts — it is tabulated, opened, evaluated, answered with a notice — when it
 * is submitted, or submitted again.
 */
export const LIVE_BID_STATUSES = ['submitted', 'revised'] as const satisfies readonly BidStatus[];
export const isLiveBid = (status: BidStatus): boolean => (LIVE_BID_STATUSES as readonly BidStatus[]).includes(status);

/**
 * Bids are sealed while the tender is in one of these: no figure, nor anything computed from one,
 * leaves the server. A cancelled tender never opens its bids.
 */
export const SEALED_TENDER_STATUSES = ['draft', 'open', 'cancelled'] as const satisfies readonly TenderStatus[];
export const isSealed = (status: TenderStatus): boolean => (SEALED_TENDER_STATUSES as readonly TenderStatus[]).includes(status);

/** Every move a tender may make (from → to); each is a guarded transition on the server. */
export const TENDER_TRANSITIONS = {
  draft: ['open', 'cancelled'],
  open: ['closed', 'cancelled'],
  closed: ['awarded'],
  awarded: ['notified'],
  notified: ['contracted'],
  contracted: [],
  cancelled: [],
} as const satisfies Record<TenderStatus, readonly TenderStatus[]>;

/** Every status a tender reaches after `from`, by any path (not `from` itself). */
export function statusesAfter(from: TenderStatus): TenderStatus[] {
  const seen = new Set<TenderStatus>();
  const walk = (s: TenderStatus) => { for (const next of TENDER_TRANSITIONS[s] as readonly TenderStatus[]) if (!seen.has(next)) { seen.add(next); walk(next); } };
  walk(from);
  return [...seen];
}

/** The statuses a tender may move to `to` from. */
export function statusesBefore(to: TenderStatus): TenderStatus[] {
  return TENDER_STATUSES.filter((from) => (TENDER_TRANSITIONS[from] as readonly TenderStatus[]).includes(to));
}

const text = (label: string, max: number) =>
  plainText(z.string({ error: `${label} is required.` }).trim().min(1, { error: `${label} is required.` }).max(max, { error: `${label} must be at most ${max} characters.` }), label);

/**
 * The award basis published with the tender: the engine's rules (same field names) that are fixed
 * before bids arrive. Which vendors are excluded or required is not part of it: exclusions come
 * from the compliance check of each bid, with its ground.
 */
export const awardBasisSchema = awardRulesSchema.omit({ exclude: true, require: true });
export type AwardBasis = z.output<typeof awardBasisSchema>;
export const DEFAULT_AWARD_BASIS: AwardBasis = { sourcing: 'split', soleRegions: [] };

/** The contracting authority named in notices and exports. */
export const buyingBodySchema = z.object({
  name: text('Buying body name', 200),
  address: plainText(z.string({ error: 'Address must be text.' }).trim().max(500, { error: 'Address must be at most 500 characters.' }), 'Address', true).default(''),
  email: emailSchema,
  /** ISO 3166-1 alpha-2. */
  country: z.string({ error: 'Country is required.' }).regex(/^[A-Z]{2}$/, { error: 'Country must be a two-letter ISO 3166-1 code such as IE.' }),
});
export type BuyingBody = z.output<typeof buyingBodySchema>;

/**
 * Locales a letter may be written with: they give its number and date formats (Intl); the text
 * itself is English and says so. A short list on purpose: each is checked by a test.
 */
export const LETTER_LOCALES = ['en-IE', 'en-GB', 'en-US', 'de-DE', 'fr-FR', 'nl-NL', 'es-ES', 'it-IT', 'pl-PL'] as const;
export type LetterLocale = (typeof LETTER_LOCALES)[number];

/** A calendar date, "2026-03-17", that exists. */
export const isoDateSchema = z
  .string({ error: 'Date must be text (YYYY-MM-DD).' })
  .regex(/^\d{4}-\d{2}-\d{2}$/, { error: 'Date must be written YYYY-MM-DD.', abort: true })
  .refine((d) => { const t = new Date(`${d}T00:00:00Z`); return !Number.isNaN(t.getTime()) && t.toISOString().slice(0, 10) === d; }, { error: 'This date does not exist.' });

/** Days the buying body is closed beyond public holidays (a standstill never ends on one). */
export const closureDaysSchema = z
  .array(isoDateSchema, { error: 'Closure days must be a list of dates.' })
  .max(60, { error: 'At most 60 closure days.' })
  .refine((days) => new Set(days).size === days.length, { error: 'Each closure day may be listed once.' })
  .transform((days) => [...days].sort());

/** Why no standstill period applies (required when the standstill is 0 days). */
export const standstillExemptionSchema = plainText(
  z.string({ error: 'Exemption ground must be text.' }).trim().max(500, { error: 'Exemption ground must be at most 500 characters.' }), 'Exemption ground',
).nullable().default(null);

/** An IANA time zone name the runtime knows (Europe/Dublin, UTC…). */
export const timeZoneSchema = z
  .string({ error: 'Time zone must be text.' })
  .max(64, { error: 'Time zone must be at most 64 characters.' })
  .refine((tz) => { try { new Intl.DateTimeFormat('en', { timeZone: tz }); return /^[A-Za-z_]+(\/[A-Za-z0-9_+-]+)*$/.test(tz); } catch { return false; } }, { error: 'Time zone must be an IANA name such as Europe/Dublin.' });

/** POST /api/tenders and PUT /api/tenders/:id (drafts only). */
export const tenderInputSchema = z.object({
  reference: z
    .string({ error: 'Reference is required.' })
    .trim()
    .min(1, { error: 'Reference is required.', abort: true })
    .max(40, { error: 'Reference must be at most 40 characters.' })
    .regex(/^[A-Za-z0-9][A-Za-z0-9/._-]*$/, { error: 'Reference may only contain letters, digits, "/", ".", "_" and "-".' }),
  title: text('Title', 200),
  commodity: text('Commodity', 120),
  unit: text('Unit of measure', 20),
  currency: z
    .string({ error: 'Currency is required.' })
    .regex(/^[A-Z]{3}$/, { error: 'Currency must be a three-letter ISO 4217 code such as EUR.' }),
  /** ISO 8601 with an offset or Z; stored in UTC. */
  closesAt: z.iso.datetime({ offset: true, error: 'Closing time must be a date and time (ISO 8601 with a time zone).' }),
  standstillDays: z
    .number({ error: 'Standstill period must be a whole number of days.' })
    .int({ error: 'Standstill period must be a whole number of days.' })
    .min(0, { error: 'Standstill period cannot be negative.' })
    .max(90, { error: 'Standstill period must be at most 90 days.' }),
  /** Locale of the letters (number and date formats), one of LETTER_LOCALES. */
  locale: z.enum(LETTER_LOCALES, { error: `Letter locale must be one of ${LETTER_LOCALES.join(', ')}.` }).default('en-GB'),
  /** Required when standstillDays is 0 (checked by the server: 400 naming it). */
  standstillExemption: standstillExemptionSchema,
  /** The buying body's own closure days: a standstill moves past them. */
  closureDays: closureDaysSchema.default([]),
  description: plainText(z.string({ error: 'Description must be text.' }).max(5000, { error: 'Description must be at most 5000 characters.' }), 'Description', true).default(''),
  regions: regionListSchema,
  /** The award rules vendors bid against; locked at publish. */
  awardBasis: awardBasisSchema.default(DEFAULT_AWARD_BASIS),
  buyingBody: buyingBodySchema.nullable().default(null),
  /** Closing times are entered and shown in this zone. */
  timeZone: timeZoneSchema.default('UTC'),
  /** Pre-tender estimate of the contract value, in the tender's currency; never shown to vendors. */
  estimatedValue: z
    .number({ error: 'Estimated value must be a number.' })
    .refine(Number.isFinite, { error: 'Estimated value must be a finite number.' })
    .min(0, { error: 'Estimated value must not be negative.' })
    .max(1e13, { error: 'Estimated value must be below 10,000,000,000,000.' })
    .nullable()
    .default(null),
  /** Days after closing during which bids must stay valid (90 is common practice). */
  bidValidityDays: z
    .number({ error: 'Bid validity must be a whole number of days.' })
    .int({ error: 'Bid validity must be a whole number of days.' })
    .min(1, { error: 'Bid validity must be at least 1 day.' })
    .max(730, { error: 'Bid validity must be at most 730 days.' })
    .default(90),
  /** Last time for vendors' questions; absent: 5 days before closing. */
  clarificationsCloseAt: z.iso.datetime({ offset: true, error: 'Clarification deadline must be a date and time (ISO 8601 with a time zone).' }).nullable().default(null),
  /** A unit price or bid total this many percent below the median is flagged as abnormally low. */
  abnormallyLowPercent: z
    .number({ error: 'Abnormally low threshold must be a number of percent.' })
    .min(1, { error: 'Abnormally low threshold must be at least 1 %.' })
    .max(90, { error: 'Abnormally low threshold must be at most 90 %.' })
    .default(20),
});
export type TenderInput = z.infer<typeof tenderInputSchema>;
/** A tender body as a client sends it (fields with a default may be left out). */
export type TenderInputBody = z.input<typeof tenderInputSchema>;

/** Tenders per page of the list: the sizes the list screen offers (the server takes any from 1 to 100). */
export const TENDER_PAGE_SIZES = [10, 25, 50, 100] as const;
export const TENDER_PAGE_SIZE = 25;
/** The columns the tender list can be ordered by (on the server: the list comes a page at a time). */
export const TENDER_SORTS = ['closesAt', 'reference', 'title', 'status'] as const;
export type TenderSort = (typeof TENDER_SORTS)[number];

const pageMessage = 'Page must be a whole number from 1 to 100,000.';
const sizeMessage = 'Page size must be a whole number from 1 to 100.';

/** GET /api/tenders?status=&q=&page=&size=&sort=&dir= — one page of the tenders the person may see. */
export const tenderListQuerySchema = z.object({
  status: z.enum(TENDER_STATUSES, { error: 'Unknown status.' }).optional(),
  q: plainText(z.string().max(100, { error: 'Search must be at most 100 characters.' }), 'Search').optional(),
  page: z.coerce.number({ error: pageMessage }).int({ error: pageMessage }).min(1, { error: pageMessage }).max(100_000, { error: pageMessage }).default(1),
  size: z.coerce.number({ error: sizeMessage }).int({ error: sizeMessage }).min(1, { error: sizeMessage }).max(100, { error: sizeMessage }).default(TENDER_PAGE_SIZE),
  sort: z.enum(TENDER_SORTS, { error: `Sort must be one of ${TENDER_SORTS.join(', ')}.` }).default('closesAt'),
  /** Closing time sorts newest first by default; the other columns A to Z (draft first for status). */
  dir: z.enum(['asc', 'desc'], { error: 'Direction must be asc or desc.' }).optional(),
});
export type TenderListQuery = z.infer<typeof tenderListQuerySchema>;

export const tenderSummarySchema = z.object({
  id: z.uuid(),
  reference: z.string(),
  title: z.string(),
  commodity: z.string(),
  unit: z.string(),
  currency: z.string(),
  status: z.enum(TENDER_STATUSES),
  closesAt: z.iso.datetime(),
  timeZone: z.string(),
  regionCount: z.number().int(),
  totalForecast: z.number(),
  myBidStatus: z.enum(BID_STATUSES).nullable().optional(),
});

/** GET /api/tenders: one page of the tenders that match, and how many match in all. */
export const tenderPageSchema = z.object({
  items: z.array(tenderSummarySchema),
  total: z.number().int(),
  page: z.number().int(),
  size: z.number().int(),
});
export interface TenderPage {
  items: TenderSummary[];
  total: number;
  page: number;
  size: number;
}

/** POST /api/tenders/:id/invitations: existing organisations and/or a new vendor contact. */
export const invitationInputSchema = z
  .object({
    vendorOrganisationIds: z.array(z.uuid({ error: 'Must be a valid id.' })).max(200).default([]),
    newVendor: z
      .object({
        organisationName: text('Organisation name', 160),
        registrationNumber: text('Registration number', 40),
        sme: z.boolean({ error: 'SME must be true or false.' }),
        contactName: text('Contact name', 120),
        contactEmail: emailSchema,
      })
      .optional(),
  })
  .refine((v) => v.vendorOrganisationIds.length > 0 || v.newVendor, {
    error: 'Choose at least one vendor organisation or enter a new vendor contact.',
    path: ['vendorOrganisationIds'],
  });
export type InvitationInput = z.infer<typeof invitationInputSchema>;

export const tenderIdParamSchema = z.object({ id: z.uuid({ error: 'Must be a valid id.' }) });

/** PUT /api/tenders/:id/closure-days: the buying body's closure days, until the award is approved. */
export const closureDaysInputSchema = z.object({ closureDays: closureDaysSchema });

export interface RegionView {
  code: string;
  name: string;
  forecast: number;
}

export interface TenderSummary {
  id: string;
  reference: string;
  title: string;
  commodity: string;
  unit: string;
  currency: string;
  status: TenderStatus;
  closesAt: string;
  /** The procedure's IANA time zone: closing times are shown in it, the zone named. */
  timeZone: string;
  regionCount: number;
  totalForecast: number;
  /** For vendors: the state of their own bid, if any. */
  myBidStatus?: BidStatus | null;
}

export interface TenderView extends TenderSummary {
  description: string;
  locale: string;
  standstillDays: number;
  /** Why no standstill applies, when standstillDays is 0. */
  standstillExemption: string | null;
  closureDays: string[];
  /** Fixed at approval: the end of the standstill (23:59 in the tender's zone), null before. */
  standstillEndsAt: string | null;
  publishedAt: string | null;
  closedAt: string | null;
  regions: RegionView[];
  awardBasis: AwardBasis;
  buyingBody: BuyingBody | null;
  bidValidityDays: number;
  /** When vendors' questions close (the stored one, or 5 days before closing). */
  clarificationsCloseAt: string;
  abnormallyLowPercent: number;
  /** The amendments issued while the tender was open, in order (everyone who sees the tender). */
  amendments: AmendmentView[];
  /** When and why the buyer cancelled the procedure, if it did. */
  cancellation: { at: string; reason: string } | null;
  /** Buyer, compliance and admin only: the pre-tender estimate. */
  estimatedValue?: number | null;
  /** Buyer, compliance and admin only. */
  invitations?: { vendorOrganisation: { id: string; name: string; sme: boolean }; invitedAt: string }[];
  /** Buyer, compliance and admin: how many vendors have a submitted bid (never what they bid before closing). */
  submittedBids?: number;
}

export interface BidView {
  id: string;
  status: BidStatus;
  fixedFee: number;
  capacity: number | null;
  prices: Record<string, number>;
  revision: number;
  version: number;
  submittedAt: string | null;
  /** The receipt: a commitment to the figures of the last submission (null for a draft or a withdrawn bid). */
  digest: string | null;
  /** The commitment's key, shown to the vendor once the tender is closed (absent before). */
  nonce?: string | null;
  updatedAt: string;
  document: { id: string; filename: string; size: number; digest: string } | null;
  /** After closing: until when the bid must stay valid (closing + bid validity), and the vendor's confirmed extension. */
  validity?: { validUntil: string; extendedUntil: string | null };
  /** The amendment the last submission answered (0: the original documents). */
  answersAmendment: number;
  /** What an amendment did to this bid ("Amendment 2 added region …"), until the vendor submits again. */
  amendmentNote: string | null;
  /** The vendor's own prices for regions an amendment removed after it submitted (part of its receipt, never evaluated). */
  removedPrices?: Record<string, number>;
}

export interface TabulatedBid {
  /** The bid's id (the compliance check and the abnormally-low decision are recorded against it). */
  id: string;
  vendor: { id: string; name: string; sme: boolean };
  fixedFee: number;
  capacity: number | null;
  prices: Record<string, number>;
  /** When the bid's request arrived in full, by the server's clock. */
  submittedAt: string;
  revision: number;
  /** The receipt's commitment: hex HMAC-SHA-256 of the bid's content keyed with `nonce` (DEVELOPERS.md, "Sealed bids"). */
  digest: string;
  /** The 256-bit key of the commitment, hex; revealed at opening. */
  nonce: string | null;
  /**
   * Prices this bid gave for regions an amendment removed after it was submitted: part of what its
   * receipt commits to, never evaluated. Absent when there are none.
   */
  removedPrices?: Record<string, number>;
  /** The server recomputed the commitment from the stored figures (`prices` and `removedPrices`) and `nonce`, and it equals `digest`. */
  receiptVerified: boolean;
  documentId: string | null;
  /** The buyer's compliance check (decision null: not yet checked). */
  compliance: ComplianceView;
  /** The buyer's decision on this bid's abnormally low flags, if recorded. */
  abnormallyLow: AbnormallyLowView | null;
  /** Abnormally low prices and total (empty for an excluded bid), computed by the server from the figures here. */
  flags: BidFlags;
}

/** GET /api/tenders/:id/bids */
export type BidsAnswer = { submitted: number } | { submitted: number; bids: TabulatedBid[] };

/**
 * The body of PUT /api/tenders/:id/bid: the bid (see `bidInputSchema`) plus the `version` the vendor
 * loaded (null for a first save), so that two tabs cannot overwrite each other silently, and the
 * uploaded workbook the figures came from, if any.
 */
export const bidSaveSchema = bidInputSchema.and(
  z.object({
    version: z.number({ error: 'Version must be a number.' }).int().min(1).nullable().optional(),
    documentId: z.uuid({ error: 'Must be a valid id.' }).nullable().optional(),
  }),
);
export type BidSave = z.infer<typeof bidSaveSchema>;
