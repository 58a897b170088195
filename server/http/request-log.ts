import { randomUUID } from 'node:crypto';
import type { IncomingMessage } from 'node:http';
import type { RequestHandler } from 'express';
import type { Logger } from 'pino';
import { logger as rootLogger } from '../logger';

declare module 'http' {
  interface IncomingMessage {
    /** This request's id (the caller's `X-Request-Id`, at most 64 characters, else a new UUID). */
    id?: string;
  }
}

/** What a request's log line says of it: never headers (they carry cookies and tokens), never the query. */
function describe(req: IncomingMessage, url: string) {
  const q = url.indexOf('?');
  return { id: req.id, method: req.method, url: q < 0 ? url : url.slice(0, q) };
}

/** A logger whose lines carry this request's id, method and path (for the error handler; made only when used). */
export function requestLogger(req: IncomingMessage, logger: Logger = rootLogger): Logger {
  return logger.child({ req: describe(req, (req as IncomingMessage & { originalUrl?: string }).originalUrl ?? req.url ?? '') });
}

/**
 * One line per API request when its answer is finished (`request completed`, or `request aborted`
 * when the client went away first): method, path, status and time taken, at `error` for a 5xx and
 * `info` otherwise — a 4xx is the client's business (a 401 on GET /api/session is how the page learns
 * it is signed out). Every request gets an id, answered as `X-Request-Id`; `requestLogger(req)` gives
 * a logger bound to the request for the error handler.
 *
 * Written here rather than with pino-http, whose per-request child logger and serializers were most of
 * the logging's cost on every signed-in request (bench:api, phase d, profiled): here a request that
 * logs nothing else costs one `logger.info` call and one `close` listener (a response emits `close`
 * after `finish`, or alone when the client went away first), no per-request property getter or child.
 * The line's shape stays pino-http's (`req`, `res`, `responseTime`). The logger writes asynchronously
 * (server/logger.ts), so no answer waits for it. The line holds nothing the logger's redaction looks
 * for (no headers, no body), so it is written by a child without redaction: redaction copied every
 * line's objects (allocations sampled, bench:api phase d).
 */
export function requestLog(parent: Logger): RequestHandler {
  const logger = parent.child({}, { redact: [] });
  return (req, res, next) => {
    const header = req.headers['x-request-id'];
    const id = (typeof header === 'string' ? header.slice(0, 64) : '') || randomUUID();
    res.setHeader('X-Request-Id', id);
    req.id = id;
    if (!req.url.startsWith('/api')) return next();
    const url = req.url;
    const start = performance.now();
    res.once('close', () => {
      const line = { req: describe(req, url), res: { statusCode: res.statusCode }, responseTime: Math.round(performance.now() - start) };
      if (!res.writableFinished) logger.warn(line, 'request aborted');
      else if (res.statusCode >= 500) logger.error(line, 'request errored');
      else logger.info(line, 'request completed');
    });
    next();
  };
}
