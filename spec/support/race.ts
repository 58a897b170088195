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
