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

/** Name of the session cookie. */
export const SESSION_COOKIE = 'tendara.sid';

/** Largest file an upload route accepts (bid workbooks, region lists). */
export const UPLOAD_MAX_BYTES = 5 * 1024 * 1024;
