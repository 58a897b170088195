import { waitFor as pollUntil } from '../../src/app/testing/wait-for';
import type { TestApp } from './app';

/**
 * Polls `check` until it returns something other than `undefined`, `null` or `false`, and returns
 * that; fails after `timeoutMs` naming `what`. The way a test waits: for a condition, never a fixed
 * time (the lint forbids plain sleeps in specs). The component tests' helper
 * (`src/app/testing/wait-for.ts`) with the defaults of server and browser tests (60 s, every 100 ms).
 */
export function waitFor<T>(
  what: string,
  check: () => Promise<T | undefined | null | false> | T | undefined | null | false,
  { timeoutMs = 60_000, everyMs = 100 }: { timeoutMs?: number; everyMs?: number } = {},
): Promise<T> {
  return pollUntil(what, check, { timeoutMs, everyMs });
}

/**
 * Waits until pg-boss queue `name` has no job waiting, retrying or running: every job given to it
 * so far has been done. How a test proves that something was NOT sent (drain, then look), instead
 * of sleeping and hoping the worker would have been quick enough.
 */
export async function drainQueue(t: TestApp, name: string, timeoutMs = 60_000): Promise<void> {
  await waitFor(`queue ${name} to drain`, async () => {
    const [row] = await t.em().getConnection().execute<{ pending: number }[]>(
      `select count(*)::int as pending from pgboss.job where name = ? and state in ('created', 'retry', 'active')`, [name],
    );
    return row?.pending === 0;
  }, { timeoutMs });
}
