import { createHmac, timingSafeEqual } from 'node:crypto';
import type { Request, RequestHandler, Router } from 'express';
import type session from 'express-session';
import type { Pool } from 'pg';
import type { ZodType } from 'zod';
import { keepValidated } from '../http/route';
import { TOUCH_EVERY_MS } from './session-store';
import { sessionForRead, sessionForReadWith, type ReadWithSession, type ReadWithSessionRow, type SessionReadRow } from './session.queries';
import { SessionPerson } from './session-user';

/**
 * The session cookie's value as express-session writes it: `s:` then the session id signed as its
 * `cookie-signature` dependency does (`sid.` + HMAC-SHA-256 of the sid in base64 without padding).
 * The id, or undefined for a cookie that is not ours, forged or tampered with. Compared in constant
 * time, like `cookie-signature`'s `unsign`.
 */
export function unsignSessionCookie(value: string, secret: string): string | undefined {
  if (!value.startsWith('s:')) return undefined;
  const signed = value.slice(2);
  const dot = signed.lastIndexOf('.');
  if (dot < 1) return undefined;
  const sid = signed.slice(0, dot);
  const expected = Buffer.from(createHmac('sha256', secret).update(sid).digest('base64').replace(/=+$/, ''));
  const given = Buffer.from(signed.slice(dot + 1));
  return expected.length === given.length && timingSafeEqual(expected, given) ? sid : undefined;
}

/**
 * Session cookies whose signature was checked, each with its session id: a signed-in browser sends
 * the same cookie on every request, and checking it (an HMAC, two buffers, a constant-time compare)
 * was a share of every signed-in request's own CPU (profiled, bench:api phase d). Only values that
 * verified are kept, so a forged cookie is checked every time it comes; what the cache answers is
 * what `unsignSessionCookie` would answer. At most `LIMIT` values, emptied when full (a cookie
 * dropped is checked again on its next request). Whether the session is still valid is read from
 * PostgreSQL on every request all the same: sign-out, deactivation and a password reset delete or
 * refuse the session row, not the cookie.
 */
export class VerifiedCookies {
  static readonly LIMIT = 10_000;
  private readonly sids = new Map<string, string>();

  constructor(private readonly secret: string) {}

  sid(value: string): string | undefined {
    const known = this.sids.get(value);
    if (known !== undefined) return known;
    const sid = unsignSessionCookie(value, this.secret);
    if (sid !== undefined) {
      if (this.sids.size >= VerifiedCookies.LIMIT) this.sids.clear();
      this.sids.set(value, sid);
    }
    return sid;
  }

  get size(): number {
    return this.sids.size;
  }
}

/** A request of a route that changes the session (sign-in, sign-out): `changesSession` on its `route()`. */
export type ChangesSession = (req: Request) => boolean;

/** Method and path below /api of every route that changes the session; exact paths only. */
export function changesSession(routes: readonly { method: string; path: string; changesSession?: boolean }[]): ChangesSession {
  const keys = new Set<string>();
  const methods = new Set<string>();
  for (const r of routes.filter((x) => x.changesSession)) {
    if (r.path.includes(':') || r.path.includes('*')) throw new Error(`A route that changes the session needs an exact path: ${r.path}`);
    keys.add(`${r.method.toUpperCase()} ${normalise(r.path)}`);
    methods.add(r.method.toUpperCase());
  }
  return (req) => {
    if (!methods.has(req.method)) return false;
    const q = req.url.indexOf('?');
    return keys.has(`${req.method} ${normalise(q < 0 ? req.url : req.url.slice(0, q))}`);
  };
}

/**
 * `SessionReadOptions.withSession` from the routes that declare `readsWithSession`: for a GET of
 * such a route's exact path whose query is valid, its read; otherwise (an invalid query is the
 * route's to refuse) none.
 */
export function readsWithSession(
  routes: readonly { method: string; path: string; query?: ZodType; readsWithSession?: (query: never, sid: string) => ReadWithSession | undefined }[],
): NonNullable<SessionReadOptions['withSession']> {
  const byPath = new Map<string, { query?: ZodType; read: (query: never, sid: string) => ReadWithSession | undefined }>();
  for (const r of routes) {
    if (!r.readsWithSession) continue;
    if (r.method !== 'get' || r.path.includes(':') || r.path.includes('*')) throw new Error(`A route that reads with the session is a GET of an exact path: ${r.path}`);
    byPath.set(r.path, { query: r.query, read: r.readsWithSession });
  }
  return (req, sid) => {
    if (req.method !== 'GET' || !byPath.size) return undefined;
    // The path as declared: another spelling Express also routes there (case, a trailing slash)
    // reads on its own, which answers the same.
    const q = req.url.indexOf('?');
    const found = byPath.get(q < 0 ? req.url : req.url.slice(0, q));
    if (!found) return undefined;
    const query = found.query ? found.query.safeParse(req.query) : { success: true as const, data: {} };
    return query.success ? found.read(query.data as never, sid) : undefined;
  };
}

/** A route's write planned for the statement that reads the session, by request (`writesWithSession`). */
const plannedWrites = new WeakMap<Request, (sid: string) => ReadWithSession | undefined>();

/** What `writesWithSession` needs of a route (its `route()` definition). */
interface WritingRoute {
  method: string;
  path: string;
  params?: ZodType;
  body?: ZodType;
  writesWithSession?: (input: { params: never; body: never; req: Request }, sid: string) => ReadWithSession | undefined;
}

/**
 * The routes that write in the statement that reads the session (`writesWithSession` on their
 * `route()`): mounts on `router`, where it is called (after the body parser, before `sessionRead`),
 * one layer per such route that plans the write when the request's params and body are valid, and
 * returns `SessionReadOptions.withSession` for those plans. The same route must be the first to
 * handle the request when the routes are mounted (`mountRoutes` mounts these routes first, and the
 * router matches the plan's layer and the route's by the same path): a request Express routes
 * elsewhere plans nothing.
 */
export function writesWithSession(router: Router, routes: readonly WritingRoute[]): NonNullable<SessionReadOptions['withSession']> {
  for (const r of routes) {
    const write = r.writesWithSession;
    if (!write) continue;
    if (r.method === 'get') throw new Error(`A route that writes with the session is not a GET: ${r.path}`);
    router[r.method as 'put' | 'post' | 'patch' | 'delete'](r.path, (req, _res, next) => {
      if (!plannedWrites.has(req)) {
        const params = r.params ? r.params.safeParse(req.params) : { success: true as const, data: {} };
        const body = r.body ? r.body.safeParse(req.body ?? {}) : { success: true as const, data: undefined };
        // Invalid input is the route's to refuse, after the sign-in and role checks; valid input
        // the route takes as validated here (`keepValidated`).
        if (params.success && body.success) {
          keepValidated(req, r, params.data, body.data);
          plannedWrites.set(req, (sid) => write({ params: params.data as never, body: body.data as never, req }, sid));
        }
      }
      next();
    });
  }
  return (req, sid) => plannedWrites.get(req)?.(sid);
}

/** As Express routes match by default: case-insensitive, a trailing slash ignored. */
function normalise(path: string): string {
  return path.toLowerCase().replace(/\/+$/, '');
}

export interface SessionReadOptions {
  /** The session cookie's name (read from `req.cookies`, so mount after `cookies()`). */
  name: string;
  secret: string;
  pool: Pool;
  changes: ChangesSession;
  /** express-session, the cookie slide and passport, in that order: what writes a session. */
  writer: RequestHandler;
  /**
   * The read a route does with the session's, in the same statement (`readsWithSession` on its
   * `route()`), or undefined: the route reads on its own.
   */
  withSession?: (req: Request, sid: string) => ReadWithSession | undefined;
}

/** What a request's route read with its session (`sessionRead`'s `withSession`). */
const readWithSession = new WeakMap<Request, Record<string, unknown>>();

/**
 * The row a route's read gave in the statement that read this request's session, or undefined
 * (signed out, none asked for, or the session went through the writer: then the route reads on its
 * own). Only ever set for a request whose session and person were read and checked in that statement;
 * a write's row (`ReadWithSession.writes`) also when the session then went through the writer.
 */
export function rowReadWithSession(req: Request): Record<string, unknown> | undefined {
  return readWithSession.get(req);
}

/**
 * The session on the read path, without express-session and passport: cookie → signature → one
 * named statement (the session and its person, session.queries.ts) → `req.user` (a SessionPerson),
 * `req.sessionID` and a frozen `req.session` holding what the read path uses (the XSRF token bound at
 * sign-in, `xsrfSessionBinding`). A route that tried to change it would fail loudly (frozen, no
 * `regenerate`/`destroy`/`save`) rather than lose the change: such a route says `changesSession`.
 *
 * `writer` (express-session with its store, `slideSessionCookie`, passport) still runs for:
 * - the routes that change the session (sign-in regenerates, sign-out destroys);
 * - a session whose expiry is due to slide (a minute or more behind, `TOUCH_EVERY_MS`): it moves the
 *   stored expiry and sends the cookie again, as before, at most once a minute per session;
 * - a session that names a person no longer active or approved, or none: passport drops the person
 *   from it and express-session saves that, as before.
 * Everything else on that path is what express-session would do too: no cookie, a cookie not signed
 * with our secret, or no unexpired session by that id → signed out, nothing stored, no cookie set.
 *
 * Why not express-session on every request (the project prefers well-kept packages): profiled on
 * bench:api phase d (GET /api/session signed in, `--cpu-prof`), express-session with its cookie
 * parsing, signature, session object, hashing for change detection and `res.end` wrapper cost
 * 225 µs of 858 µs of server CPU per request, and passport's `initialize` and session strategy 45 µs
 * more; this path costs what is left of it (see DEVELOPERS.md, "A signed-in request's own cost").
 */
export function sessionRead(options: SessionReadOptions): RequestHandler {
  const { name, secret, pool, changes, writer, withSession } = options;
  const verified = new VerifiedCookies(secret);
  const read = (req: Request, sid: string): Promise<SessionReadRow | ReadWithSessionRow | null> => {
    const other = withSession?.(req, sid);
    return other ? sessionForReadWith(pool, sid, other) : sessionForRead(pool, sid);
  };
  return (req, res, next) => {
    if (changes(req)) {
      writer(req, res, next);
      return;
    }
    const value = (req.cookies as Record<string, unknown> | undefined)?.[name];
    const sid = typeof value === 'string' ? verified.sid(value) : undefined;
    if (sid === undefined) {
      next();
      return;
    }
    read(req, sid).then((found) => {
      if (!found) {
        next();
        return;
      }
      const row = 'session' in found ? found.session : found;
      const maxAge = row.maxAge;
      if (!row.person || typeof maxAge !== 'number' || Date.now() + maxAge - row.expireMs >= TOUCH_EVERY_MS) {
        // What a write wrote is written: its row reaches the route whichever way the session goes.
        if ('row' in found && found.writes) readWithSession.set(req, found.row);
        writer(req, res, next);
        return;
      }
      req.sessionID = sid;
      req.session = Object.freeze({ id: sid, xsrf: row.xsrf }) as unknown as session.Session & Partial<session.SessionData>;
      req.user = new SessionPerson(row.person);
      if ('row' in found) readWithSession.set(req, found.row);
      next();
    }, next);
  };
}
