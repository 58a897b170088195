import { randomBytes } from 'node:crypto';
import { Client } from 'pg';

/**
 * Each test file gets its own database, cloned from the migrated template that `npm test` made
 * (a few hundred milliseconds), so files can run in parallel and never see each other's rows.
 */
export function testPgUrl(): string {
  const url = process.env['TEST_PG_URL'];
  if (!url) throw new Error('TEST_PG_URL is not set: run the server tests through `npm test`, which starts a throwaway PostgreSQL.');
  return url;
}

async function admin<T>(fn: (c: Client) => Promise<T>): Promise<T> {
  const client = new Client({ connectionString: `${testPgUrl()}/postgres` });
  await client.connect();
  try {
    return await fn(client);
  } finally {
    await client.end();
  }
}

export async function createTestDatabase(): Promise<string> {
  const name = `t_${randomBytes(6).toString('hex')}`;
  const template = process.env['TEST_TEMPLATE_DB'] ?? 'tendara_template';
  for (let attempt = 0; ; attempt++) {
    try {
      await admin((c) => c.query(`create database "${name}" template "${template}"`));
      break;
    } catch (err) {
      // Two clones of one template at the same instant: the second waits and tries again.
      if (attempt > 20 || !String(err).includes('being accessed by other users')) throw err;
      await new Promise((r) => setTimeout(r, 200 + Math.random() * 300));
    }
  }
  return `${testPgUrl()}/${name}`;
}

export async function dropTestDatabase(url: string): Promise<void> {
  const name = new URL(url).pathname.slice(1);
  await admin((c) => c.query(`drop database if exists "${name}" with (force)`));
}
