import type { MikroORM } from '@mikro-orm/postgresql';
import type { Pool } from 'pg';
import type PgBoss from 'pg-boss';
import type { Config } from './config';
import type { BidHooks } from './services/bids.service';

/**
 * The server's context: what the app and every route list are built from, and the limits and names
 * they share. Routes import it from here, never from `app.ts` (which imports the routes).
 */
export interface AppDeps {
  config: Config;
  orm: MikroORM;
  boss: PgBoss;
  /** Pool of plain pg connections: the session store, the sign-in limits, the tender lists (services/queries) and the bid save with its audit entries and receipt. */
  sessionPool: Pool;
  /** Test hooks around a bid's transaction (spec/server/bid-arrival.spec.ts); none in production. */
  bidHooks?: BidHooks;
}

/**
 * Connection options of `AppDeps.sessionPool`: its named statements (the session read, the tender
 * lists) use PostgreSQL's generic plan from the first execution. With parameters, PostgreSQL may
 * otherwise plan them anew on each execution (custom plans): profiled on bench:api, the buyer's
 * list cost 710 µs of PostgreSQL CPU per request with custom plans, 416 with the generic one.
 */
export const SESSION_POOL_OPTIONS = '-c plan_cache_mode=force_generic_plan';

/** Name of the session cookie. */
export const SESSION_COOKIE = 'tendara.sid';

/** Largest file an upload route accepts (bid workbooks, region lists). */
export const UPLOAD_MAX_BYTES = 5 * 1024 * 1024;
