import { performance } from 'node:perf_hooks';
import { Client } from 'pg';
import { headersOf, type Session } from './support/http';
import { percentile, table } from './support/measure';
import type { SeededTender } from './support/seed';

/**
 * The deadline rush at scale: `before` vendors each submit a bid pricing every region of one tender
 * at moments spread over the last `beforeSeconds` before its closing time, and `after` more over
 * the `afterSeconds` after it. Counts what the API answered, then checks the database: every
 * accepted bid stored whole (all its lines) and receipted (its receipt e-mail delivered), nothing
 * stored for a refused one, no request sent after the closing time accepted, no other answer.
 */
export const RUSH_VENDORS = 600;
export const RUSH_REGIONS = 200;

export interface RushOptions {
  before: number;
  after: number;
  beforeSeconds: number;
  afterSeconds: number;
  /** How long to wait for the receipts of the accepted bids to be delivered. */
  receiptSeconds?: number;
}

export interface RushResult {
  vendors: number;
  sentBefore: number;
  sentAfter: number;
  accepted: number;
  acceptedComplete: number;
  acceptedReceipted: number;
  acceptedSentAfterClosing: number;
  refusedClosed: number;
  refusedSentBeforeClosing: number;
  refusedWithBidStored: number;
  otherErrors: string[];
  p50: number;
  p95: number;
  p99: number;
  max: number;
}

const CLOSED = /^Bidding closed at /;

export async function deadlineRush(baseUrl: string, databaseUrl: string, tender: SeededTender, sessions: Session[], o: RushOptions): Promise<RushResult> {
  const people = sessions.slice(0, o.before + o.after);
  if (people.length < o.before + o.after) throw new Error(`the rush needs ${o.before + o.after} signed-in vendors, got ${sessions.length}`);
  const db = new Client({ connectionString: databaseUrl });
  await db.connect();
  try {
    // Closing time a little ahead, by this machine's clock (the server's: it decides by its own).
    const lead = 1.5;
    const closesAt = Date.now() + Math.round((lead + o.beforeSeconds) * 1000);
    await db.query(`update tender set closes_at = $2 where id = $1`, [tender.id, new Date(closesAt)]);
    // Evenly spread over each window, in a shuffled order of vendors.
    const sendAt = (k: number) =>
      k < o.before
        ? closesAt - o.beforeSeconds * 1000 + (((k * 7919) % o.before) / o.before) * o.beforeSeconds * 1000
        : closesAt + 1 + (((k - o.before) * 7919 % o.after) / o.after) * o.afterSeconds * 1000;
    const prices = Object.fromEntries(tender.regionCodes.map((c, k) => [c, 40 + (k % 50)]));
    const outcomes = await Promise.all(
      people.map(async (s, k) => {
        await new Promise((r) => setTimeout(r, Math.max(0, sendAt(k) - Date.now())));
        const sentAt = Date.now();
        const t0 = performance.now();
        const res = await fetch(`${baseUrl}/api/tenders/${tender.id}/bid`, {
          method: 'PUT', headers: headersOf(s, true),
          body: JSON.stringify({ fixedFee: 20_000 + k, capacity: null, prices, submit: true, version: null }),
        });
        const body = (await res.json()) as { detail?: string; prices?: Record<string, number>; status?: string; digest?: string };
        return { s, sentAt, ms: performance.now() - t0, status: res.status, body };
      }),
    );
    const stored = await db.query<{ email: string; status: string; digest: string | null; lines: number }>(
      `select u.email, b.status, b.digest, (select count(*) from bid_line l where l.bid_id = b.id)::int as lines
         from bid b join app_user u on u.vendor_organisation_id = b.vendor_organisation_id
        where b.tender_id = $1`, [tender.id],
    );
    const byEmail = new Map(stored.rows.map((r) => [r.email, r]));
    const acceptedEmails = outcomes.filter((x) => x.status === 200).map((x) => x.s.email);
    const receipted = await receiptsDelivered(db, tender.reference, acceptedEmails, o.receiptSeconds ?? 120);
    const ms = outcomes.map((x) => x.ms);
    const result: RushResult = {
      vendors: people.length, sentBefore: 0, sentAfter: 0, accepted: 0, acceptedComplete: 0, acceptedReceipted: 0, acceptedSentAfterClosing: 0,
      refusedClosed: 0, refusedSentBeforeClosing: 0, refusedWithBidStored: 0, otherErrors: [],
      p50: percentile(ms, 50), p95: percentile(ms, 95), p99: percentile(ms, 99), max: Math.max(...ms),
    };
    for (const x of outcomes) {
      const before = x.sentAt < closesAt;
      if (before) result.sentBefore += 1;
      else result.sentAfter += 1;
      const row = byEmail.get(x.s.email);
      if (x.status === 200) {
        result.accepted += 1;
        if (!before) result.acceptedSentAfterClosing += 1;
        if (row?.status === 'submitted' && row.lines === tender.regionCodes.length && row.digest === x.body.digest
          && Object.keys(x.body.prices ?? {}).length === row.lines) {
          result.acceptedComplete += 1;
        }
        if (receipted.has(x.s.email)) result.acceptedReceipted += 1;
      } else if (x.status === 409 && CLOSED.test(x.body.detail ?? '')) {
        result.refusedClosed += 1;
        if (before) result.refusedSentBeforeClosing += 1;
        if (row) result.refusedWithBidStored += 1;
      } else {
        result.otherErrors.push(`${x.status} ${x.body.detail ?? ''}`.slice(0, 160));
      }
    }
    return result;
  } finally {
    await db.end();
  }
}

/** The vendors whose receipt for this tender reached the mail catcher, waiting up to `seconds` for all. */
async function receiptsDelivered(db: Client, reference: string, emails: string[], seconds: number): Promise<Set<string>> {
  const deadline = Date.now() + seconds * 1000;
  for (;;) {
    const { rows } = await db.query<{ email: string }>(
      `select distinct lower(unnest(to_addresses)) as email from mail_message where subject like $1`, [`Receipt: your bid on ${reference} %`],
    );
    const got = new Set(rows.map((r) => r.email));
    if (emails.every((e) => got.has(e.toLowerCase())) || Date.now() > deadline) return got;
    await new Promise((r) => setTimeout(r, 1000));
  }
}

export function rushTable(r: RushResult): string {
  return table(['deadline rush', 'count'], [
    ['vendors', r.vendors],
    ['sent before closing', r.sentBefore],
    ['sent after closing', r.sentAfter],
    ['accepted (200)', r.accepted],
    ['  of which stored complete', r.acceptedComplete],
    ['  of which receipted', r.acceptedReceipted],
    ['  of which sent after closing', r.acceptedSentAfterClosing],
    ['refused 409 "Bidding closed"', r.refusedClosed],
    ['  of which sent before closing', r.refusedSentBeforeClosing],
    ['  of which a bid was stored', r.refusedWithBidStored],
    ['other errors', r.otherErrors.length],
    ['save ms p50', Math.round(r.p50)],
    ['save ms p95', Math.round(r.p95)],
    ['save ms p99', Math.round(r.p99)],
    ['save ms max', Math.round(r.max)],
  ]) + (r.otherErrors.length ? `other errors: ${[...new Set(r.otherErrors)].slice(0, 5).join(' | ')}\n` : '');
}

/** The rule the rush must keep. */
export function rushHolds(r: RushResult): boolean {
  return r.accepted === r.acceptedComplete && r.accepted === r.acceptedReceipted && r.acceptedSentAfterClosing === 0
    && r.refusedWithBidStored === 0 && r.otherErrors.length === 0 && r.accepted + r.refusedClosed === r.vendors && r.sentAfter > 0 && r.accepted > 0;
}
