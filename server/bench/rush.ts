import { performance } from 'node:perf_hooks';
import { Client } from 'pg';
import { headersOf, type Session } from './support/http';
import { percentile, table } from './support/measure';
import type { SeededTender } from './support/seed';

/**
 * The deadline rush: every vendor saves (submits) its bid at a moment spread over the last seconds
 * before the closing time and a little after it. Counts what the API answered and then checks the
 * database: every accepted bid stored whole (all its lines), nothing stored for a refused one, and
 * no request sent after the closing time accepted.
 */
export interface RushOptions {
  /** Seconds of the window before the closing time. */
  before: number;
  /** Seconds of the window after it. */
  after: number;
}

export interface RushResult {
  vendors: number;
  sentBefore: number;
  sentAfter: number;
  accepted: number;
  acceptedComplete: number;
  refusedClosed: number;
  refusedWithBidStored: number;
  acceptedSentAfterClosing: number;
  otherErrors: string[];
  p95: number;
}

const CLOSED = /^Bidding closed at /;

export async function deadlineRush(baseUrl: string, databaseUrl: string, tender: SeededTender, sessions: Session[], o: RushOptions): Promise<RushResult> {
  const db = new Client({ connectionString: databaseUrl });
  await db.connect();
  try {
    // Closing time a little ahead, by the database's clock (the one the server decides by).
    const lead = 1.5;
    const { rows } = await db.query<{ closes_at: Date }>(
      `update tender set closes_at = clock_timestamp() + make_interval(secs => $2) where id = $1 returning closes_at`,
      [tender.id, lead + o.before],
    );
    const closesAt = rows[0].closes_at.getTime();
    const windowStart = closesAt - o.before * 1000;
    const span = (o.before + o.after) * 1000;
    const prices = Object.fromEntries(tender.regionCodes.map((c, k) => [c, 40 + k]));
    const outcomes = await Promise.all(
      sessions.map(async (s, k) => {
        // Evenly spread over the window, in a shuffled order of vendors.
        const at = windowStart + (((k * 7919) % sessions.length) / sessions.length) * span;
        await new Promise((r) => setTimeout(r, Math.max(0, at - Date.now())));
        const sentAt = Date.now();
        const t0 = performance.now();
        const res = await fetch(`${baseUrl}/api/tenders/${tender.id}/bid`, {
          method: 'PUT', headers: headersOf(s, true),
          body: JSON.stringify({ fixedFee: 20_000 + k, capacity: null, prices, submit: true, version: null }),
        });
        const body = (await res.json()) as { detail?: string; prices?: Record<string, number>; status?: string };
        return { s, sentAt, ms: performance.now() - t0, status: res.status, body };
      }),
    );
    const stored = await db.query<{ email: string; status: string; lines: number }>(
      `select u.email, b.status, (select count(*) from bid_line l where l.bid_id = b.id)::int as lines
         from bid b join app_user u on u.vendor_organisation_id = b.vendor_organisation_id
        where b.tender_id = $1`, [tender.id],
    );
    const byEmail = new Map(stored.rows.map((r) => [r.email, r]));
    const result: RushResult = {
      vendors: sessions.length, sentBefore: 0, sentAfter: 0, accepted: 0, acceptedComplete: 0, refusedClosed: 0,
      refusedWithBidStored: 0, acceptedSentAfterClosing: 0, otherErrors: [], p95: percentile(outcomes.map((x) => x.ms), 95),
    };
    for (const x of outcomes) {
      if (x.sentAt < closesAt) result.sentBefore += 1;
      else result.sentAfter += 1;
      const row = byEmail.get(x.s.email);
      if (x.status === 200) {
        result.accepted += 1;
        if (x.sentAt >= closesAt) result.acceptedSentAfterClosing += 1;
        if (row?.status === 'submitted' && row.lines === tender.regionCodes.length && Object.keys(x.body.prices ?? {}).length === row.lines) {
          result.acceptedComplete += 1;
        }
      } else if (x.status === 409 && CLOSED.test(x.body.detail ?? '')) {
        result.refusedClosed += 1;
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

export function rushTable(r: RushResult): string {
  return table(['deadline rush', 'count'], [
    ['vendors', r.vendors],
    ['sent before closing', r.sentBefore],
    ['sent after closing', r.sentAfter],
    ['accepted (200)', r.accepted],
    ['  of which stored complete', r.acceptedComplete],
    ['  of which sent after closing', r.acceptedSentAfterClosing],
    ['refused 409 "Bidding closed"', r.refusedClosed],
    ['  of which a bid was stored', r.refusedWithBidStored],
    ['other errors', r.otherErrors.length],
    ['p95 ms of the saves', Math.round(r.p95)],
  ]) + (r.otherErrors.length ? `other errors: ${[...new Set(r.otherErrors)].slice(0, 5).join(' | ')}\n` : '');
}

/** The rule the rush must keep. */
export function rushHolds(r: RushResult): boolean {
  return r.accepted === r.acceptedComplete && r.acceptedSentAfterClosing === 0 && r.refusedWithBidStored === 0
    && r.otherErrors.length === 0 && r.accepted + r.refusedClosed === r.vendors && r.sentAfter > 0 && r.accepted > 0;
}
