import { parse } from 'cookie';
import type { RequestHandler } from 'express';

/**
 * `req.cookies` (name → value; an empty object when it sent none) from the Cookie header, parsed
 * by `cookie` (the parser express, express-session and cookie-parser use). In place of
 * cookie-parser, whose per-request work the app does not need — two prototype-less objects, the
 * signed-cookie pass and the `j:` JSON-cookie pass, all garbage on every request (bench:api phase d,
 * allocations sampled): the app signs no cookie with it (the session cookie's signature is checked
 * by auth/session-read.ts and express-session) and sets no JSON cookie.
 */
export function cookies(): RequestHandler {
  return (req, _res, next) => {
    const header = req.headers.cookie;
    req.cookies = header ? parse(header) : {};
    next();
  };
}
