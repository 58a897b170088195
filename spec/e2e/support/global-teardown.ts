import type { ChildProcess } from 'node:child_process';
import { dropTestDatabase } from '../../support/db';

export default async function globalTeardown(): Promise<void> {
  const server = (globalThis as { __E2E_SERVER__?: ChildProcess }).__E2E_SERVER__;
  if (server && server.exitCode === null) {
    const exited = new Promise((r) => server.once('exit', r));
    server.kill('SIGTERM');
    // eslint-disable-next-line no-restricted-syntax -- a bound on the wait for the server's exit, not a pause
    await Promise.race([exited, new Promise((r) => setTimeout(r, 10_000))]);
  }
  const db = process.env['E2E_DATABASE_URL'];
  if (db) await dropTestDatabase(db);
}
