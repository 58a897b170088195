import fs from 'node:fs';
import path from 'node:path';
import { lazyRequestContext } from './http/orm-context';
import express, { type Express } from 'express';
import session from 'express-session';
import { setting } from './config';
import { configurePassport } from './auth/passport';
import { createSessionStore, slideSessionCookie } from './auth/session-store';
import { changesSession, readsWithSession, sessionRead, writesWithSession } from './auth/session-read';
import { signInLimits } from './auth/sign-in-limits';
import { stampArrival } from './http/arrival';
import { noStore } from './http/cache-control';
import { cookies } from './http/cookies';
import { inSeries } from './http/in-series';
import { SESSION_COOKIE, type AppDeps } from './context';
import { apiNotFound, errorHandler } from './http/error-handler';
import { openApiDocument } from './http/openapi';
import { requestLog } from './http/request-log';
import { securityHeaders } from './http/security-headers';
import { mountRoutes, route, type AnyRoute } from './http/route';
import { xsrf, xsrfSessionBinding } from './http/xsrf';
import { logger } from './logger';
import { outboxRoutes } from './routes/outbox.routes';
import { peopleRoutes } from './routes/people.routes';
import { sessionRoutes } from './routes/session.routes';
import { tenderRoutes } from './routes/tenders.routes';
import { bidRoutes } from './routes/bids.routes';
import { evaluationRoutes } from './routes/evaluation.routes';
import { noticeRoutes } from './routes/notices.routes';
import { contractRoutes } from './routes/contracts.routes';
import { reportRoutes } from './routes/report.routes';
import { procedureRoutes } from './routes/procedure.routes';
import { settingsRoutes } from './routes/settings.routes';
import { worklistRoutes } from './routes/worklist.routes';

const SESSION_HOURS = 8;

/** Every API route of the app, in one list (mounted, documented and tested from it). */
export function apiRoutes(deps: AppDeps, auth = configurePassport(deps.orm)): AnyRoute[] {
  const routes: AnyRoute[] = [
    ...sessionRoutes(auth), ...peopleRoutes(deps), ...outboxRoutes(deps.config), ...tenderRoutes(deps), ...bidRoutes(deps), ...evaluationRoutes(deps), ...noticeRoutes(deps), ...contractRoutes(), ...reportRoutes(), ...procedureRoutes(deps), ...settingsRoutes(), ...worklistRoutes(deps),
  ];
  routes.push(
    route({
      method: 'get', path: '/openapi.json', tag: 'Meta', access: 'public',
      summary: 'This document.',
      handler: () => openApiDocument(routes, setting('npm_package_version')),
    }),
  );
  return routes;
}

/** Builds the Express app; `server/main.ts` starts it, tests drive it with supertest. */
export function createApp(deps: AppDeps): Express {
  const { config, orm } = deps;
  if (!config.sessionSecret) throw new Error('SESSION_SECRET must be set (at least 32 characters) to serve the app.');
  const sessionSecret = config.sessionSecret;
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', config.trustProxy ? 1 : false);
  app.set('query parser', 'simple');
  // No ETag on answers sent with res.send/res.json (the API's): every API answer is no-store, so no
  // client can revalidate it, and hashing each body cost 8–12 µs per request (profiled, bench:api).
  // Static files and index.html keep theirs (serve-static and sendFile set their own).
  app.set('etag', false);
  // First of all: when each request arrived in full is when a bid was received (http/arrival.ts).
  // Then helmet's headers, computed once at start (http/security-headers.ts), and the request's log
  // line. One router layer for the three (http/in-series.ts).
  app.use(inSeries(stampArrival(), securityHeaders(config.trustProxy), requestLog(logger)));

  const api = express.Router();
  // A GET or HEAD carries no body to parse: skipped before the parser's own checks (bench:api phase d).
  const json = express.json({ limit: '1mb' });
  // What writes a session: express-session with its store, the cookie slide and passport. It runs
  // for the routes that change the session and for a session due to slide; every other request
  // reads its session on the lean path (auth/session-read.ts).
  const writer = express.Router();
  writer.use(
    session({
      name: SESSION_COOKIE,
      secret: sessionSecret,
      // Reads the person with the session; writes the expiry back at most once a minute, and only
      // then sends the cookie again (slideSessionCookie).
      store: createSessionStore(deps.sessionPool),
      resave: false,
      saveUninitialized: false,
      rolling: false,
      proxy: config.trustProxy,
      cookie: { httpOnly: true, sameSite: 'lax', secure: 'auto', maxAge: SESSION_HOURS * 3600_000, path: '/' },
    }),
  );
  writer.use(slideSessionCookie(SESSION_COOKIE, sessionSecret));
  const auth = configurePassport(orm);
  writer.use(auth.initialize());
  writer.use(auth.session());
  const routes = apiRoutes(deps, auth);
  // In front of every API route, in this order, as router layers of their own (http/in-series.ts):
  // no caching, the cookies, the XSRF check, the JSON body, the request's ORM context; then the
  // writes planned for the statement that reads the session (auth/session-read.ts); then the
  // session and the XSRF token's binding to it.
  api.use(inSeries(
    noStore(),
    cookies(),
    xsrf(),
    (req, res, next) => (req.method === 'GET' || req.method === 'HEAD' ? next() : json(req, res, next)),
    lazyRequestContext(orm.em),
  ));
  const writes = writesWithSession(api, routes);
  const reads = readsWithSession(routes);
  api.use(inSeries(
    sessionRead({
      name: SESSION_COOKIE, secret: sessionSecret, pool: deps.sessionPool, changes: changesSession(routes), writer,
      withSession: (req, sid) => reads(req, sid) ?? writes(req, sid),
    }),
    xsrfSessionBinding(),
  ));
  // Failed sign-ins: per IP across e-mails, and per IP and (normalised) e-mail; counted in
  // PostgreSQL, so that every web process sees the same failures.
  api.post('/session', ...signInLimits(config.signInIpLimit, deps.sessionPool));
  mountRoutes(api, routes);
  api.use(apiNotFound);
  app.use('/api', api);

  const dist = config.clientDist;
  if (dist && fs.existsSync(path.join(dist, 'index.html'))) {
    app.use(express.static(dist, { index: false, maxAge: '1h', setHeaders: noCacheIndex }));
    // Every other path is a client route: the Angular app decides.
    app.get('/{*splat}', (_req, res) => {
      res.setHeader('Cache-Control', 'no-cache');
      res.sendFile(path.join(dist, 'index.html'));
    });
  }
  app.use(errorHandler);
  return app;
}

function noCacheIndex(res: express.Response, file: string): void {
  if (file.endsWith('index.html')) res.setHeader('Cache-Control', 'no-cache');
}

