import type { ClientBase, Pool, PoolClient } from 'pg';
import type PgBoss from 'pg-boss';

/**
 * Runs `work` in a transaction on one client of the plain pg pool (no ORM): BEGIN, the work's
 * statements, COMMIT — or ROLLBACK when it throws, and the error goes on. For the hot write paths
 * (the bid save, the audit appender) where MikroORM's `transactional` and `execute` cost more CPU
 * than the statements. A client whose rollback failed is destroyed rather than given back.
 */
export async function inPoolTransaction<T>(pool: Pool, work: (client: PoolClient) => Promise<T>): Promise<T> {
  const client = await pool.connect();
  let broken: Error | undefined;
  try {
    await client.query('begin');
    try {
      const result = await work(client);
      await client.query('commit');
      return result;
    } catch (error) {
      await client.query('rollback').catch((rollbackError: unknown) => {
        broken = rollbackError instanceof Error ? rollbackError : new Error(String(rollbackError));
      });
      throw error;
    }
  } finally {
    client.release(broken);
  }
}

/** The client as pg-boss's `db` option (`send(…, { db })`): a job queued inside the client's transaction. */
export function bossDbOf(client: ClientBase): PgBoss.Db {
  return { executeSql: (text, values) => client.query(text, values) };
}
