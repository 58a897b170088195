import type { MembershipState } from '../entities/user.entity';
import connectPgSimple from 'connect-pg-simple';
import session from 'express-session';
import type { Pool } from 'pg';
import type { RequestHandler } from 'express';
import { createHmac } from 'node:crypto';

/** A session's expiry in the store moves forward at most this often (and its row is written no more). */
export const TOUCH_EVERY_MS = 60_000;

/** What the store read along with a session: its row's expiry and the signed-in person's row. */
const LOADED = Symbol('tendara.session.loaded');

/** The signed-in person's row, read with the session in the same query (null: none, or deactivated). */
export interface SessionUserRow {
  id: string;
  created_at: string;
  updated_at: string;
  email: string;
  name: string;
  role: string;
  active: boolean;
  membership: MembershipState;
  last_sign_in_at: string | null;
  vendor_organisation: {
    id: string; created_at: string; updated_at: string; name: string; registration_number: string; sme: boolean; contact_email: string;
  } | null;
}

interface Loaded {
  expireMs: number;
  /** undefined when the session names no one. */
  user?: SessionUserRow | null;
}

type WithLoaded = { [LOADED]?: Loaded };

/**
 * The session, read with one query that also reads the person it names (only if active and, in a
 * vendor organisation, approved by its contact) and their
 * organisation — the session store read and the user lookup were two round trips on every request
 * (bench:api, phase d). The person is read afresh on every request, so a deactivation, a role
 * change or a password reset that deletes the person's sessions takes effect on the very next one.
 */
const GET = `
  select s.sess, s.expire,
         (select to_jsonb(u) - 'password_hash'
                 || jsonb_build_object('vendor_organisation', (select to_jsonb(o) from vendor_organisation o where o.id = u.vendor_organisation_id))
            from app_user u
           where u.id = case when s.sess #>> '{passport,user}' ~ '^[0-9a-fA-F-]{36}$' then (s.sess #>> '{passport,user}')::uuid end
             and u.active and u.membership = 'approved') as person,
         s.sess #>> '{passport,user}' is not null as names_person
    from http_session s
   where s.sid = $1 and s.expire >= now()`;

/** The person read with this request's session, if the store read one (see `deserializeUser`). */
export function loadedSessionUser(sess: unknown, id: string): SessionUserRow | null | undefined {
  const loaded = (sess as WithLoaded | undefined)?.[LOADED];
  if (!loaded || loaded.user === undefined) return undefined;
  return loaded.user && loaded.user.id === id ? loaded.user : loaded.user === null ? null : undefined;
}

/**
 * Whether the session's stored expiry is a minute or more behind the one its cookie now gives
 * (true too for a session the store did not read, whose stored expiry is unknown).
 */
function touchDue(sess: session.SessionData): boolean {
  const loaded = (sess as WithLoaded)[LOADED];
  const next = sess.cookie?.expires ? new Date(sess.cookie.expires).getTime() : undefined;
  return !loaded || next === undefined || next - loaded.expireMs >= TOUCH_EVERY_MS;
}

/**
 * The session cookie slides with the session's stored expiry: it is sent again, with the new expiry,
 * when the store moves that expiry (`touch`, at most once a minute), not with every answer (signing
 * and writing it was a measurable share of GET /api/session, bench:api phase d). Mount it right
 * after `express-session` with `rolling: false`, which still sets the cookie itself for a new or
 * changed session (sign-in). The cookie's value is express-session's: `s:` and the session id
 * signed with the secret as its `cookie-signature` dependency does (HMAC-SHA-256, base64 without
 * padding) — that package is not ours to import, and this is one line.
 */
export function slideSessionCookie(name: string, secret: string): RequestHandler {
  return (req, res, next) => {
    const sess = req.session as (session.Session & Partial<session.SessionData>) | undefined;
    if (!sess || !(sess as WithLoaded)[LOADED] || !req.sessionID) return next();
    sess.touch();
    if (touchDue(sess)) {
      const signature = createHmac('sha256', secret).update(req.sessionID).digest('base64').replace(/=+$/, '');
      const c = sess.cookie;
      res.cookie(name, `s:${req.sessionID}.${signature}`, {
        expires: c.expires ?? undefined, httpOnly: c.httpOnly, sameSite: c.sameSite, secure: c.secure === true, path: c.path, domain: c.domain,
      });
    }
    next();
  };
}

/**
 * connect-pg-simple's store for `http_session`, with two changes: `get` reads the person with the
 * session (above), and `touch` — called by express-session after every request that did not change
 * the session — moves the expiry forward only when the stored one is a minute or more behind.
 * Touching wrote the row on every request, and the response waited for it.
 */
export function createSessionStore(pool: Pool, options: { pruneSessionInterval?: number | false } = {}): session.Store {
  const PgStore = connectPgSimple(session);
  class TendaraSessionStore extends PgStore {
    override get(sid: string, callback: (err: unknown, session?: session.SessionData | null) => void): void {
      pool.query<{ sess: session.SessionData & WithLoaded; expire: Date; person: SessionUserRow | null; names_person: boolean }>(
        { name: 'tendara-session-get', text: GET, values: [sid] },
      ).then(({ rows }) => {
        const row = rows[0];
        if (!row) return callback(null, null);
        Object.defineProperty(row.sess, LOADED, { value: { expireMs: row.expire.getTime(), user: row.names_person ? row.person : undefined } satisfies Loaded, enumerable: false });
        callback(null, row.sess);
      }, (err: unknown) => callback(err));
    }

    /** express-session builds the request's Session from what `get` returned: keep what was read with it. */
    override createSession(req: Parameters<session.Store['createSession']>[0], sess: session.SessionData): session.Session & Partial<session.SessionData> {
      const loaded = (sess as WithLoaded)[LOADED];
      const made = super.createSession(req, sess);
      if (loaded) Object.defineProperty(made, LOADED, { value: loaded, enumerable: false });
      return made;
    }

    override touch(sid: string, sess: session.SessionData, callback?: () => void): void {
      if (!touchDue(sess)) return callback?.();
      super.touch(sid, sess, callback);
    }
  }
  return new TendaraSessionStore({ pool, tableName: 'http_session', createTableIfMissing: false, pruneSessionInterval: options.pruneSessionInterval ?? 15 * 60 });
}
