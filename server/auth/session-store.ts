import connectPgSimple from 'connect-pg-simple';
import session from 'express-session';
import type { Pool } from 'pg';
import type { RequestHandler } from 'express';
import { createHmac } from 'node:crypto';
import { sessionWithPerson, type SessionUserRow } from './session.queries';

/** A session's expiry in the store moves forward at most this often (and its row is written no more). */
export const TOUCH_EVERY_MS = 60_000;

/** What the store read along with a session: its row's expiry and the signed-in person's row. */
const LOADED = Symbol('tendara.session.loaded');

interface Loaded {
  expireMs: number;
  /** undefined when the session names no one. */
  user?: SessionUserRow | null;
}

type WithLoaded = { [LOADED]?: Loaded };

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
      sessionWithPerson<session.SessionData & WithLoaded>(pool, sid).then((row) => {
        if (!row) return callback(null, null);
        Object.defineProperty(row.sess, LOADED, { value: { expireMs: row.expireMs, user: row.namesPerson ? row.person : undefined } satisfies Loaded, enumerable: false });
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
