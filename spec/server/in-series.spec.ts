import express, { type ErrorRequestHandler, type RequestHandler } from 'express';
import request from 'supertest';
import { inSeries } from '../../server/http/in-series';

/** `inSeries` (server/http/in-series.ts) runs middleware as `app.use` one by one would. */
function appWith(...handlers: RequestHandler[]) {
  const seen: string[] = [];
  const app = express();
  app.use((req, _res, next) => {
    (req as unknown as { seen: string[] }).seen = seen;
    next();
  });
  app.use(inSeries(...handlers));
  app.get('/', (_req, res) => {
    seen.push('route');
    res.json(seen);
  });
  const onError: ErrorRequestHandler = (err: Error, _req, res, _next) => {
    res.status(500).json({ error: err.message, seen });
  };
  app.use(onError);
  return app;
}

const step = (name: string): RequestHandler => (req, _res, next) => {
  (req as unknown as { seen: string[] }).seen.push(name);
  next();
};

test('in the order given, then the next layer', async () => {
  expect((await request(appWith(step('a'), step('b'), step('c'))).get('/')).body).toEqual(['a', 'b', 'c', 'route']);
});

test('an asynchronous next is waited for', async () => {
  const later: RequestHandler = (req, _res, next) => {
    setTimeout(() => {
      (req as unknown as { seen: string[] }).seen.push('later');
      next();
    }, 5);
  };
  expect((await request(appWith(step('a'), later, step('b'))).get('/')).body).toEqual(['a', 'later', 'b', 'route']);
});

test('next(error), a throw and a rejected promise each skip the rest and reach the error handler', async () => {
  const passes: RequestHandler = (_req, _res, next) => next(new Error('passed on'));
  const throws: RequestHandler = () => {
    throw new Error('thrown');
  };
  const rejects: RequestHandler = async () => {
    await Promise.resolve();
    throw new Error('rejected');
  };
  for (const [bad, message] of [[passes, 'passed on'], [throws, 'thrown'], [rejects, 'rejected']] as const) {
    const answer = await request(appWith(step('a'), bad, step('never'))).get('/');
    expect(answer.status).toBe(500);
    expect(answer.body).toEqual({ error: message, seen: ['a'] });
  }
});

test('a handler that answers ends the request there', async () => {
  const answers: RequestHandler = (_req, res) => {
    res.status(204).end();
  };
  const app = appWith(step('a'), answers, step('never'));
  expect((await request(app).get('/')).status).toBe(204);
});

test('only functions', () => {
  expect(() => inSeries(step('a'), undefined as unknown as RequestHandler)).toThrow(TypeError);
});
