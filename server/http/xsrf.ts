import { randomBytes, timingSafeEqual } from 'node:crypto';
import type { Request, RequestHandler, Response } from 'express';
import { AppError } from './errors';

export const XSRF_COOKIE = 'XSRF-TOKEN';
export const XSRF_HEADER = 'x-xsrf-token';
const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * Angular's XSRF convention (double-submit cookie): the server sets a random `XSRF-TOKEN`
 * cookie readable by the page; every state-changing request must echo it in `X-XSRF-TOKEN`.
 * Another site cannot read our cookie, so it cannot forge the header. Sign-in is included.
 */
export function xsrf(): RequestHandler {
  return (req, res, next) => {
    let token: unknown = (req.cookies as Record<string, unknown> | undefined)?.[XSRF_COOKIE];
    if (typeof token !== 'string' || !/^[A-Za-z0-9_-]{32,64}$/.test(token)) {
      token = newToken();
      setCookie(req, res, token as string);
      // A request without the cookie cannot carry a matching header.
      if (!SAFE_METHODS.has(req.method)) return next(forbidden());
      return next();
    }
    if (SAFE_METHODS.has(req.method)) return next();
    const header = req.get(XSRF_HEADER);
    if (!header || !equal(header, token)) return next(forbidden());
    next();
  };
}

declare module 'express-session' {
  interface SessionData {
    /** The XSRF token issued at sign-in: the only one this session accepts. */
    xsrf?: string;
  }
}

const newToken = () => randomBytes(32).toString('base64url');

function setCookie(req: Request, res: Response, token: string): void {
  res.cookie(XSRF_COOKIE, token, { httpOnly: false, sameSite: 'lax', secure: req.secure, path: '/' });
}

/**
 * A fresh token at sign-in, set as the cookie and bound to the new session: a token known before
 * sign-in (one planted in the browser, or read on a shared machine) is worth nothing after it.
 */
export function rotateXsrf(req: Request, res: Response): void {
  const token = newToken();
  setCookie(req, res, token);
  req.session.xsrf = token;
}

/**
 * After the session middleware: a session that was given a token at sign-in accepts only that
 * token, whatever the cookie says. A safe request puts the session's token back into the cookie
 * when the browser lost it, so the page can go on.
 */
export function xsrfSessionBinding(): RequestHandler {
  return (req, res, next) => {
    const bound = req.session?.xsrf;
    if (!bound) return next();
    if (SAFE_METHODS.has(req.method)) {
      if ((req.cookies as Record<string, string | undefined> | undefined)?.[XSRF_COOKIE] !== bound) setCookie(req, res, bound);
      return next();
    }
    const header = req.get(XSRF_HEADER);
    if (!header || !equal(header, bound)) return next(forbidden());
    next();
  };
}

function equal(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

function forbidden() {
  return new AppError(403, 'Missing XSRF token', 'This request needs the X-XSRF-TOKEN header matching the XSRF-TOKEN cookie. Reload the page and try again.');
}
