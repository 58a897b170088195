import { z } from 'zod';
import type { Role } from './roles';

/**
 * What waits for the signed-in person (GET /api/worklist): one section per kind of item, in the
 * order the home page shows them. Each section has its heading and the sentence its empty state
 * says (what will appear there and when), here once for the server and the home page.
 */
export const WORKLIST_SECTIONS = {
  vendor: [
    { kind: 'invitation', title: 'Invitations to answer', empty: 'When a buyer invites your organisation to an open tender, it appears here until you start a bid.' },
    { kind: 'bid-returned', title: 'Bids returned by an amendment', empty: 'If an amendment adds a region after you submitted, your bid returns to draft and appears here until you submit it again.' },
    { kind: 'draft-closing', title: 'Draft bids closing within 72 hours', empty: 'A bid you saved as a draft appears here once its tender closes within 72 hours: a draft is not opened.' },
    { kind: 'clarification-answered', title: 'Clarifications answered', empty: 'When the buyer publishes an answer to a clarification on a tender you are invited to, it appears here until you read it.' },
    { kind: 'letter', title: 'Letters received', empty: 'Award letters, regret letters and exclusion notices appear here once the buyer sends them after approval.' },
  ],
  buyer: [
    { kind: 'questions', title: 'Questions to answer', empty: 'When an invited vendor asks a clarification question on one of your open tenders, it appears here until you answer it.' },
    { kind: 'closing-soon', title: 'Closing within 72 hours', empty: 'Your open tenders appear here in their last 72 hours, with the number of bids submitted so far.' },
    { kind: 'to-evaluate', title: 'Closed tenders to evaluate', empty: 'After closing, a tender appears here until every bid has its compliance check and an award scenario has been run.' },
    { kind: 'returned', title: 'Recommendations returned', empty: 'When compliance returns one of your recommendations, it appears here with their comment.' },
    { kind: 'letters-due', title: 'Letters to send', empty: 'Once compliance approves an award, the tender appears here until every bidder has been sent its letter.' },
    { kind: 'standstill', title: 'Standstill periods running', empty: 'After the letters are sent, the tender appears here until its standstill period ends.' },
    { kind: 'contracts', title: 'Contracts to record', empty: 'When a standstill period has ended, the tender appears here until each awarded vendor’s contract is recorded.' },
    { kind: 'draft', title: 'Drafts not published', empty: 'Tenders you have created but not yet published appear here.' },
  ],
  compliance: [
    { kind: 'approval', title: 'Recommendations awaiting approval', empty: 'When a buyer recommends an award, it appears here, with how long it has waited, until it is approved or returned.' },
    { kind: 'audit-verify', title: 'Audit trails to verify', empty: 'A tender appears here when its audit trail has new entries since you last verified it.' },
  ],
  admin: [
    { kind: 'failed-mail', title: 'E-mails that failed', empty: 'An e-mail or letter the mail server did not accept appears here with its error.' },
    { kind: 'deactivated-session', title: 'Deactivated accounts still signed in', empty: 'A deactivated account that still has a live session appears here (normally there is none).' },
    { kind: 'pending-invitation', title: 'Invitations not yet accepted', empty: 'People you invited appear here until they set their password.' },
  ],
} as const satisfies Record<Role, readonly { kind: string; title: string; empty: string }[]>;

export type WorklistKind = (typeof WORKLIST_SECTIONS)[Role][number]['kind'];
const KINDS = Object.values(WORKLIST_SECTIONS).flatMap((sections) => sections.map((s) => s.kind)) as [WorklistKind, ...WorklistKind[]];

export const worklistItemSchema = z.object({
  kind: z.enum(KINDS),
  /** What it is, in words ("NHP-2026-014 · Road salt for the northern depots"). */
  what: z.string(),
  /** Why it is waiting now ("Your bid is still a draft."). */
  why: z.string(),
  /** When it is due (ISO 8601), if it has a due time: closing, standstill end, link expiry. */
  dueAt: z.string().nullable(),
  /** What the due time is ("Closes", "Standstill ends"…). */
  dueLabel: z.string().nullable(),
  /** The procedure's IANA zone, in which the due time is shown (null: the viewer's own). */
  timeZone: z.string().nullable(),
  /** The client route that deals with it. */
  link: z.string(),
  /** The tender it is about, if any. */
  tenderId: z.string().nullable(),
});
export type WorklistItem = z.infer<typeof worklistItemSchema>;

export const worklistSectionSchema = z.object({
  kind: z.enum(KINDS),
  title: z.string(),
  /** What will appear in this section, and when (its empty state). */
  empty: z.string(),
  count: z.number().int(),
  items: z.array(worklistItemSchema),
});
export type WorklistSection = z.infer<typeof worklistSectionSchema>;

/** GET /api/worklist */
export const worklistSchema = z.object({
  sections: z.array(worklistSectionSchema),
  /** Items in every section. */
  total: z.number().int(),
});
export type Worklist = z.infer<typeof worklistSchema>;

/** GET /api/worklist/count: the number the navigation shows. */
export const worklistCountSchema = z.object({ total: z.number().int() });
export type WorklistCount = z.infer<typeof worklistCountSchema>;
