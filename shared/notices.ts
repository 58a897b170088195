import { z } from 'zod';

/** A notice is one letter to one bidder about one award: queued → sent (or failed after retries). */
export const NOTICE_STATUSES = ['queued', 'sent', 'failed'] as const;
export type NoticeStatus = (typeof NOTICE_STATUSES)[number];
/** An excluded bidder gets an exclusion notice (its ground and note), not a regret letter. */
export const NOTICE_KINDS = ['award', 'regret', 'exclusion'] as const;
export type NoticeKind = (typeof NOTICE_KINDS)[number];

export const noticeListQuerySchema = z.object({
  tenderId: z.uuid({ error: 'Must be a valid id.' }).optional(),
  status: z.enum(NOTICE_STATUSES, { error: 'Unknown status.' }).optional(),
});

export interface NoticeSummary {
  id: string;
  tenderId: string;
  tenderReference: string;
  tenderTitle: string;
  vendor: { id: string; name: string };
  kind: NoticeKind;
  subject: string;
  status: NoticeStatus;
  attempts: number;
  lastError: string | null;
  queuedAt: string;
  sentAt: string | null;
  /** The standstill end fixed at approval (the same on every letter of the tender). */
  standstillEndsAt: string;
  /** The procedure's IANA zone and the letters' locale: the reader shows the letter's own dates in them. */
  timeZone: string;
  locale: string;
}

/** GET /api/notices/:id: the letter itself. */
export interface NoticeView extends NoticeSummary {
  html: string;
  text: string;
}

/** GET /api/tenders/:id/notices/preview: every letter as it would be sent, nothing stored. */
export interface NoticePreview {
  vendor: { id: string; name: string };
  kind: NoticeKind;
  to: string[];
  subject: string;
  html: string;
  text: string;
}
