import type { RequestHandler } from 'express';

/**
 * Every API answer is `Cache-Control: no-store`: most carry bid figures or personal data, and
 * neither a shared proxy nor the browser's disk cache may keep them (a signed-out page must not be
 * able to show a figure from the back-forward cache either). A route that wants caching would have
 * to set its own header on purpose.
 */
export function noStore(): RequestHandler {
  return (_req, res, next) => {
    res.setHeader('Cache-Control', 'no-store');
    next();
  };
}
