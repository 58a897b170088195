import type { EntityManager } from '@mikro-orm/postgresql';

/**
 * Records that the data set `name` is loaded, unless it already was: true when recorded now. The
 * new row stays locked until the caller's transaction ends, so two concurrent starts load it once.
 */
export async function recordSeedOnce(tx: EntityManager, name: string): Promise<boolean> {
  const inserted = await tx.execute<{ name: string }[]>(
    `insert into seed_history (name) values (?) on conflict do nothing returning name`, [name],
  );
  return inserted.length > 0;
}
