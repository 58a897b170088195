import type { EntityManager } from '@mikro-orm/postgresql';
import type { Pool } from 'pg';
import { WORKLIST_SECTIONS, type Worklist, type WorklistItem, type WorklistKind } from '@shared/worklist';
import type { User } from '../entities';
import type { SeenMarkKind } from '../entities/seen-mark.entity';
import { CLOSING_SOON_HOURS, upsertSeenMark, worklistRows, type WorklistRow } from './queries/worklist.queries';

/**
 * The home page's worklist: what waits for the signed-in person, by role, computed in one statement
 * (queries/worklist.queries.ts) and put into words here. A buyer sees only its own tenders, a vendor
 * only what concerns its organisation; before closing nothing of a bid but the count of bids.
 */
export async function worklistOf(pool: Pool, user: User, now = new Date()): Promise<Worklist> {
  const rows = await rowsOf(pool, user);
  const sections = WORKLIST_SECTIONS[user.role].map((s) => {
    const items = rows.filter((r) => r.kind === s.kind).map((r) => itemOf(r, now));
    return { kind: s.kind, title: s.title, empty: s.empty, count: items.length, items };
  });
  return { sections, total: sections.reduce((sum, s) => sum + s.count, 0) };
}

/** The number the navigation shows: the items of every section. */
export async function worklistCount(pool: Pool, user: User): Promise<{ total: number }> {
  return { total: (await rowsOf(pool, user)).length };
}

/**
 * Records that `user` has just seen the tender's clarifications, or verified its audit chain, as of
 * `at` (taken before the read, so anything written during it still counts as new).
 */
export async function markSeen(em: EntityManager, user: User, tenderId: string, kind: SeenMarkKind, at: Date): Promise<void> {
  await upsertSeenMark(em, user.id, tenderId, kind, at);
}

function rowsOf(pool: Pool, user: User): Promise<WorklistRow[]> {
  switch (user.role) {
    case 'vendor':
      if (!user.vendorOrganisation) return Promise.resolve([]);
      return worklistRows(pool, { role: 'vendor', vendorOrganisationId: user.vendorOrganisation.id, userId: user.id });
    case 'buyer':
    case 'compliance':
      return worklistRows(pool, { role: user.role, userId: user.id });
    case 'admin':
      return worklistRows(pool, { role: 'admin' });
  }
}

const iso = (d: Date | string | null): string | null => (d === null ? null : new Date(d).toISOString());
const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

/** "2 days", "5 hours", "less than an hour": how long something has waited. */
export function age(since: Date | string, now: Date): string {
  const hours = Math.floor((now.getTime() - new Date(since).getTime()) / 3_600_000);
  if (hours >= 48) return plural(Math.floor(hours / 24), 'day');
  if (hours >= 1) return plural(hours, 'hour');
  return 'less than an hour';
}

const LETTER_WORDS: Record<string, string> = { award: 'Award letter', regret: 'Regret letter', exclusion: 'Exclusion notice' };

function itemOf(r: WorklistRow, now: Date): WorklistItem {
  const tender = r.reference ? `${r.reference} · ${r.title ?? ''}` : '';
  const n = Number(r.n ?? 0);
  const m = Number(r.m ?? 0);
  const base = { kind: r.kind as WorklistKind, what: tender, dueAt: iso(r.due_at), timeZone: r.time_zone, link: `/tenders/${r.tender_id}`, tenderId: r.tender_id };
  switch (r.kind) {
    case 'invitation':
      return { ...base, why: 'Your organisation is invited to bid and has no bid yet.', dueLabel: 'Closes' };
    case 'bid-returned':
      return { ...base, why: r.note ?? 'An amendment returned your bid to draft: submit it again before closing.', dueLabel: 'Closes' };
    case 'draft-closing':
      return { ...base, why: `Your bid is still a draft and closing is within ${CLOSING_SOON_HOURS} hours: a draft is not opened.`, dueLabel: 'Closes' };
    case 'clarification-answered':
      return { ...base, why: `${plural(n, 'clarification answer')} published since you last read the clarifications.`, dueLabel: 'Closes' };
    case 'letter':
      return { ...base, link: `/notices/${r.ref_id}`, why: `${LETTER_WORDS[r.note ?? ''] ?? 'Letter'} received.`, dueLabel: r.due_at ? 'Standstill ends' : null };
    case 'questions':
      return { ...base, why: `${plural(n, 'question')} from vendors waiting for your answer.`, dueLabel: 'Answers possible until closing' };
    case 'closing-soon':
      // The count of bids only: before closing nothing else about them leaves the server (sealed).
      return { ...base, why: `${n === 0 ? 'No bid' : plural(n, 'bid')} submitted so far.`, dueLabel: 'Closes' };
    case 'to-evaluate': {
      const parts = [n > 0 ? `${plural(n, 'bid')} without a compliance check` : null, m === 0 ? 'no award scenario run yet' : null].filter(Boolean);
      const why = parts.join('; ');
      return { ...base, link: n > 0 ? base.link : `/tenders/${r.tender_id}/evaluation`, why: `${why.charAt(0).toUpperCase()}${why.slice(1)}.`, dueLabel: null };
    }
    case 'returned':
      return {
        ...base, link: `/tenders/${r.tender_id}/evaluation/recommendation`, dueLabel: null,
        why: `Returned by ${r.detail ?? 'compliance'}${r.note ? `: “${r.note}”` : '.'} Revise and recommend again.`,
      };
    case 'letters-due':
      return {
        ...base, link: `/tenders/${r.tender_id}/notices`, dueLabel: null,
        why: n === 0 ? 'The award is approved: no bidder has been sent its letter yet.' : `${plural(n - m, 'letter')} of ${n} not yet delivered.`,
      };
    case 'standstill':
      return { ...base, why: 'Letters sent; contracts may be signed once the standstill period ends.', dueLabel: 'Standstill ends' };
    case 'contracts':
      return { ...base, why: `The standstill period has ended: ${plural(n, 'contract')} of ${m} to record.`, dueLabel: 'Standstill ended' };
    case 'draft':
      return { ...base, link: `/tenders/${r.tender_id}`, why: 'Not published: invited vendors cannot see it yet.', dueLabel: 'Planned closing' };
    case 'approval':
      return {
        ...base, link: `/tenders/${r.tender_id}/evaluation/recommendation`, dueLabel: null,
        why: `Recommended by ${r.detail ?? 'the buyer'}, waiting ${age(r.since!, now)} for your decision.`,
      };
    case 'audit-verify':
      return {
        ...base, link: `/tenders/${r.tender_id}/evaluation/audit`, dueLabel: null,
        why: r.since ? `${plural(n, 'new entry', 'new entries')} since you last verified the trail.` : `${plural(n, 'entry', 'entries')}, never verified by you.`,
      };
    case 'failed-mail':
      return {
        ...base, what: r.note ?? 'An e-mail', link: r.tender_id ? '/notices' : '/outbox', timeZone: null, dueLabel: null,
        why: `Not delivered${r.detail ? `: ${r.detail}` : '.'}`,
      };
    case 'deactivated-session':
      return { ...base, what: `${r.note} (${r.detail})`, link: '/people', timeZone: null, dueLabel: null, why: `Deactivated, yet ${plural(n, 'session is', 'sessions are')} still live.` };
    case 'pending-invitation':
      return {
        ...base, what: `${r.note} (${r.detail})`, link: '/people', timeZone: null,
        dueLabel: r.due_at && new Date(r.due_at) > now ? 'Link expires' : r.due_at ? 'Link expired' : null,
        why: r.due_at && new Date(r.due_at) <= now ? 'Invited, no password set, and the link has expired: send a fresh one.' : 'Invited; no password set yet.',
      };
    default:
      throw new Error(`worklist kind without words: ${r.kind}`);
  }
}
