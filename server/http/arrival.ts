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
 */
const arrivals = new WeakMap<Request, { at: Date; pending: boolean }>();

export function stampArrival(clock: () => Date = () => new Date()): RequestHandler {
  return (req, _res, next) => {
    const stamp = { at: clock(), pending: hasBody(req) && !req.complete };
    if (stamp.pending) {
      req.once('end', () => {
        stamp.at = clock();
        stamp.pending = false;
      });
    }
    arrivals.set(req, stamp);
    next();
  };
}

/**
 * The arrival stamp of `req`. A body not read to its end yet has not arrived in full: such a
 * request (none reaches a bid's handler, whose body is parsed first) counts as arriving now.
 */
export function arrivedAt(req: Request): Date {
  const stamp = arrivals.get(req);
  if (!stamp || stamp.pending) return new Date();
  return stamp.at;
}

function hasBody(req: Request): boolean {
  return req.headers['transfer-encoding'] !== undefined || (req.headers['content-length'] !== undefined && req.headers['content-length'] !== '0');
}
