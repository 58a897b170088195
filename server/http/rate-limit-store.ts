import type { Options, Store, IncrementResponse } from 'express-rate-limit';
import { createHash } from 'node:crypto';
import type { Pool } from 'pg';

/**
 * express-rate-limit's counters in PostgreSQL (table `rate_limit_hit`), shared by every web
 * process: the default store counts in each process's memory, so behind a load balancer with N
 * processes a client would get N times the allowed failed sign-ins. One statement per count; a
 * key whose window has passed starts again from one. Expired rows are removed now and then.
 */
export class PgRateLimitStore implements Store {
  private windowMs = 60_000;
  private lastPrune = 0;
  readonly localKeys = false;

  constructor(private readonly pool: Pool, readonly prefix = 'sign-in:') {}

  init(options: Options): void {
    this.windowMs = options.windowMs;
  }

  async increment(key: string): Promise<IncrementResponse> {
    const { rows } = await this.pool.query<{ hits: number; reset_at: Date }>(
      `insert into rate_limit_hit (key, hits, reset_at) values ($1, 1, clock_timestamp() + make_interval(secs => $2::float8 / 1000))
       on conflict (key) do update set
         hits = case when rate_limit_hit.reset_at <= clock_timestamp() then 1 else rate_limit_hit.hits + 1 end,
         reset_at = case when rate_limit_hit.reset_at <= clock_timestamp() then excluded.reset_at else rate_limit_hit.reset_at end
       returning hits, reset_at`,
      [this.rowKey(key), this.windowMs],
    );
    this.pruneNowAndThen();
    return { totalHits: rows[0].hits, resetTime: rows[0].reset_at };
  }

  async decrement(key: string): Promise<void> {
    await this.pool.query(`update rate_limit_hit set hits = greatest(hits - 1, 0) where key = $1`, [this.rowKey(key)]);
  }

  async resetKey(key: string): Promise<void> {
    await this.pool.query(`delete from rate_limit_hit where key = $1`, [this.rowKey(key)]);
  }

  /** The row's key: the prefix and a SHA-256 of the limiter's key, so no e-mail address is stored and any bytes are safe. */
  private rowKey(key: string): string {
    return this.prefix + createHash('sha256').update(key).digest('hex');
  }

  private pruneNowAndThen(): void {
    if (Date.now() - this.lastPrune < this.windowMs) return;
    this.lastPrune = Date.now();
    this.pool.query(`delete from rate_limit_hit where reset_at < clock_timestamp()`).catch(() => undefined);
  }
}
