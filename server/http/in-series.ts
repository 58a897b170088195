import type { NextFunction, Request, RequestHandler, Response } from 'express';

/**
 * Middleware run one after the other as one layer of the Express router, in the order given, as
 * `app.use(a); app.use(b); …` would run them: each calls `next()` to go on, `next(error)` (or a
 * throw, or a rejected promise) skips the rest and hands the error to the router. `next('route')`
 * and `next('router')` are not supported (none of the app's middleware uses them).
 *
 * Why not one `use` per middleware: every layer the router walks costs every request a path match,
 * a params object and closures (router 2, `next`/`trimPrefix`); with ten layers in front of every
 * API route that was a fifth of a signed-in request's garbage (bench:api phase d, allocations
 * sampled) and most of the router's own CPU.
 */
export function inSeries(...handlers: RequestHandler[]): RequestHandler {
  for (const h of handlers) if (typeof h !== 'function') throw new TypeError('inSeries: every handler must be a function');
  return (req: Request, res: Response, done: NextFunction) => {
    let i = 0;
    const next = (err?: unknown): void => {
      if (err !== undefined && err !== null) {
        if (err === 'route' || err === 'router') throw new Error(`inSeries does not support next('${err}')`);
        done(err);
        return;
      }
      const handler = handlers[i++];
      if (!handler) {
        done();
        return;
      }
      try {
        const result: unknown = handler(req, res, next);
        if (result instanceof Promise) result.catch(done);
      } catch (error) {
        done(error);
      }
    };
    next();
  };
}
