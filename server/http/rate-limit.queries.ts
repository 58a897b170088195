import type { Pool } from 'pg';

/** A sign-in counter after a hit: the hits in its window and when the window ends. */
export interface RateLimitHitRow {
  hits: number;
  reset_at: Date;
}

/**
 * Counts one hit on `key` (one statement): a new key, or one whose window has passed, starts again
 * from one with a window of `windowMs` from now (the database's clock, the same for every process).
 */
export async function countRateLimitHit(pool: Pool, key: string, windowMs: number): Promise<RateLimitHitRow> {
  const { rows } = await pool.query<RateLimitHitRow>(
    `insert into rate_limit_hit (key, hits, reset_at) values ($1, 1, clock_timestamp() + make_interval(secs => $2::float8 / 1000))
     on conflict (key) do update set
       hits = case when rate_limit_hit.reset_at <= clock_timestamp() then 1 else rate_limit_hit.hits + 1 end,
       reset_at = case when rate_limit_hit.reset_at <= clock_timestamp() then excluded.reset_at else rate_limit_hit.reset_at end
     returning hits, reset_at`,
    [key, windowMs],
  );
  return rows[0];
}

/** Takes one hit back (never below zero). */
export async function uncountRateLimitHit(pool: Pool, key: string): Promise<void> {
  await pool.query(`update rate_limit_hit set hits = greatest(hits - 1, 0) where key = $1`, [key]);
}

/** Forgets the key's hits. */
export async function resetRateLimitKey(pool: Pool, key: string): Promise<void> {
  await pool.query(`delete from rate_limit_hit where key = $1`, [key]);
}

/** Removes the counters whose window has passed. */
export async function pruneRateLimitHits(pool: Pool): Promise<void> {
  await pool.query(`delete from rate_limit_hit where reset_at < clock_timestamp()`);
}
