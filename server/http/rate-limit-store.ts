import type { Options, Store, IncrementResponse } from 'express-rate-limit';
import { createHash } from 'node:crypto';
import type { Pool } from 'pg';
import { countRateLimitHit, pruneRateLimitHits, resetRateLimitKey, uncountRateLimitHit } from './rate-limit.queries';

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
    const row = await countRateLimitHit(this.pool, this.rowKey(key), this.windowMs);
    this.pruneNowAndThen();
    return { totalHits: row.hits, resetTime: row.reset_at };
  }

  async decrement(key: string): Promise<void> {
    await uncountRateLimitHit(this.pool, this.rowKey(key));
  }

  async resetKey(key: string): Promise<void> {
    await resetRateLimitKey(this.pool, this.rowKey(key));
  }

  /** The row's key: the prefix and a SHA-256 of the limiter's key, so no e-mail address is stored and any bytes are safe. */
  private rowKey(key: string): string {
    return this.prefix + createHash('sha256').update(key).digest('hex');
  }

  private pruneNowAndThen(): void {
    if (Date.now() - this.lastPrune < this.windowMs) return;
    this.lastPrune = Date.now();
    pruneRateLimitHits(this.pool).catch(() => undefined);
  }
}
