import type { Request, RequestHandler } from 'express';

/**
 * When each request arrived in full, by this server's clock: the time a bid is "received". Stamped
 * at the very front of the Express app (`app.use(stampArrival())` before anything else), so that
 * nothing the server does with a request — the sign-in lookup, waiting for a database connection or
 * a lock, parsing a workbook — counts against the sender.
 *
 * "In full" means its last byte: a request without a body has arrived when its headers have (the
 * moment Node hands it to Express, which runs this middleware in the same tick); one with a body
 * when its stream ends. A JSON body is read as it comes in, by `express.json` right behind this
 * middleware and a few synchronous checks; a multipart upload is read by multer once the sign-in and
 * role are checked, so its stamp is when multer has read the last byte (the bytes wait in the
 * socket's buffers meanwhile).
 *
 * The stamp is a number of milliseconds on the request itself (no Date and no WeakMap entry per
 * request: both were garbage on every request, bench:api); `arrivedAt` makes the Date when asked.
 */
const ARRIVAL = Symbol('tendara.arrival');

/** Milliseconds since the epoch, or NaN while the body is still coming. */
type Stamped = Request & { [ARRIVAL]?: number };

export function stampArrival(clock: () => number = Date.now): RequestHandler {
  return (req, _res, next) => {
    const stamped = req as Stamped;
    if (hasBody(req) && !req.complete) {
      stamped[ARRIVAL] = NaN;
      req.once('end', () => {
        stamped[ARRIVAL] = clock();
      });
    } else {
      stamped[ARRIVAL] = clock();
    }
    next();
  };
}

/**
 * The arrival stamp of `req`. A body not read to its end yet has not arrived in full: such a
 * request (none reaches a bid's handler, whose body is parsed first) counts as arriving now.
 */
export function arrivedAt(req: Request): Date {
  const at = (req as Stamped)[ARRIVAL];
  return at === undefined || Number.isNaN(at) ? new Date() : new Date(at);
}

function hasBody(req: Request): boolean {
  return req.headers['transfer-encoding'] !== undefined || (req.headers['content-length'] !== undefined && req.headers['content-length'] !== '0');
}
