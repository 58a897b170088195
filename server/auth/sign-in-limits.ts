import type { RequestHandler } from 'express';
import { rateLimit, ipKeyGenerator } from 'express-rate-limit';
import { normaliseEmail } from '@shared/auth';
import type { Pool } from 'pg';
import { AppError } from '../http/errors';
import { PgRateLimitStore } from '../http/rate-limit-store';

const WINDOW_MS = 15 * 60_000;
/** Failed sign-ins for one e-mail from one IP address per window. */
export const SIGN_IN_EMAIL_LIMIT = 10;

const tooMany: RequestHandler = (_req, _res, next) =>
  next(new AppError(429, 'Too many attempts', 'Too many failed sign-ins. Wait 15 minutes and try again.'));

/** The e-mail of a sign-in body, if it has one (the body is not validated yet when this runs). */
function emailOf(body: unknown): string {
  const email = (body as { email?: unknown } | undefined)?.email;
  return typeof email === 'string' ? email : '';
}

/**
 * The limits on failed sign-ins (successful ones do not count), in front of POST /api/session:
 * per IP address across every e-mail (password spraying), and per IP address and e-mail. The
 * e-mail part of the key is the normalised address (`normaliseEmail`), the same one the account is
 * found by, so a case or Unicode variant of an address shares its limit.
 */
export function signInLimits(ipLimit: number, pool: Pool): RequestHandler[] {
  const common = { windowMs: WINDOW_MS, skipSuccessfulRequests: true, standardHeaders: 'draft-8', legacyHeaders: false, handler: tooMany } as const;
  return [
    rateLimit({ ...common, limit: ipLimit, identifier: 'ip', store: new PgRateLimitStore(pool, 'sign-in-ip:'), keyGenerator: (req) => ipKeyGenerator(req.ip ?? '') }),
    rateLimit({
      ...common,
      limit: SIGN_IN_EMAIL_LIMIT,
      identifier: 'ip-email',
      store: new PgRateLimitStore(pool, 'sign-in:'),
      keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '')}|${normaliseEmail(emailOf(req.body))}`,
    }),
  ];
}
