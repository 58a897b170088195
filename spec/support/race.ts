import { Client } from 'pg';
import type { Response } from 'supertest';
import { auditLockKey } from '../../server/services/audit.service';
import type { TestApp } from './app';
import { waitFor } from './wait';

/**
 * Runs `requests` at once while the tender's audit-chain lock is held (the last thing every decision
 * takes before it commits) from a connection of its own; releases it once all are waiting for a
 * lock or have answered. A race made certain, not lucky.
 */
export async function race(t: TestApp, tenderId: string, requests: (() => PromiseLike<Response>)[]): Promise<Response[]> {
  const hold = new Client({ connectionString: t.config.databaseUrl });
  await hold.connect();
  try {
    await hold.query('begin');
    await hold.query('select pg_advisory_xact_lock(hashtext($1))', [auditLockKey(tenderId)]);
    let answered = 0;
    const pending = requests.map((r) => Promise.resolve(r()).then((res) => { answered += 1; return res; }));
    let waiting = 0;
    await waitFor('every request to wait for the lock or to have answered', async () => {
      // pg_stat_activity is read once per transaction and then kept: clear that snapshot each time.
      await hold.query('select pg_stat_clear_snapshot()');
      const { rows } = await hold.query<{ n: number }>(
        `select count(*)::int as n from pg_stat_activity where datname = current_database() and wait_event_type = 'Lock' and pid <> pg_backend_pid()`,
      );
      waiting = rows[0].n;
      return waiting + answered >= requests.length;
    }, { timeoutMs: 30_000, everyMs: 10 }).catch(async (error: Error) => {
      const activity = await hold.query(`select state, wait_event_type, wait_event, left(query, 120) as query from pg_stat_activity where datname = current_database() and pid <> pg_backend_pid()`);
      throw new Error(`${error.message}: only ${waiting} waiting and ${answered} answered of ${requests.length}: ${JSON.stringify(activity.rows)}`);
    });
    await hold.query('commit');
    return await Promise.all(pending);
  } finally {
    await hold.end();
  }
}

/**
 * Runs `request` while a decision on the tender is under way: from a connection of its own, the
 * tender row locked FOR NO KEY UPDATE (as a decision, an amendment or closing, locks it), `change`
 * made in that transaction; once the request waits for a lock (or has answered), commits. What the
 * request then reads after its tender lock must include `change`.
 */
export async function whileDecisionHoldsTender(
  t: TestApp, tenderId: string, change: (tx: Client) => Promise<unknown>, request: () => PromiseLike<Response>,
): Promise<Response> {
  const hold = new Client({ connectionString: t.config.databaseUrl });
  await hold.connect();
  try {
    await hold.query('begin');
    await hold.query('select 1 from tender where id = $1 for no key update', [tenderId]);
    await change(hold);
    let answered = false;
    const pending = Promise.resolve(request()).then((res) => { answered = true; return res; });
    await waitFor('the request to wait for the tender lock', async () => {
      await hold.query('select pg_stat_clear_snapshot()');
      const { rows } = await hold.query<{ n: number }>(
        `select count(*)::int as n from pg_stat_activity where datname = current_database() and wait_event_type = 'Lock' and pid <> pg_backend_pid()`,
      );
      return answered || rows[0].n > 0;
    }, { timeoutMs: 30_000, everyMs: 10 });
    await hold.query('commit');
    return await pending;
  } finally {
    await hold.end();
  }
}
