import type { Request, RequestHandler, Response } from 'express';
import helmet, { type HelmetOptions } from 'helmet';

/** helmet's options for this app: the CSP and, behind a TLS proxy, HSTS and upgrade-insecure-requests. */
export function helmetOptions(trustProxy: boolean): HelmetOptions {
  return {
    contentSecurityPolicy: {
      directives: {
        'default-src': ["'self'"],
        'script-src': ["'self'"],
        // Angular and Material add component styles at run time.
        'style-src': ["'self'", "'unsafe-inline'"],
        'img-src': ["'self'", 'data:'],
        'font-src': ["'self'"],
        'frame-src': ["'self'"],
        'upgrade-insecure-requests': trustProxy ? [] : null,
      },
    },
    strictTransportSecurity: trustProxy,
  };
}

/**
 * helmet's headers, computed once: helmet's middleware is run once at start on a recording
 * response, and every request then gets the same names and values it set (and loses the headers it
 * removed), in one middleware rather than helmet's chain of twelve. The same headers: our options
 * have no per-request parts (no nonce, no functions), and `spec/server/session.spec.ts` compares an
 * answer's headers with helmet's own. A helmet that did not finish synchronously is refused here.
 */
export function securityHeaders(trustProxy: boolean): RequestHandler {
  const set: [string, string][] = [];
  const removed: string[] = [];
  const recorder = {
    setHeader(name: string, value: unknown) {
      set.push([name, String(value)]);
      return recorder;
    },
    removeHeader(name: string) {
      removed.push(name);
    },
  };
  let finished = false;
  helmet(helmetOptions(trustProxy))({} as Request, recorder as unknown as Response, (err?: unknown) => {
    if (err) throw err instanceof Error ? err : new Error('helmet refused its options.');
    finished = true;
  });
  if (!finished || set.length === 0) throw new Error('helmet did not set its headers synchronously: securityHeaders cannot compute them once.');
  return (_req, res, next) => {
    for (const name of removed) res.removeHeader(name);
    for (const [name, value] of set) res.setHeader(name, value);
    next();
  };
}
