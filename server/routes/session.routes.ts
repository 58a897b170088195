import type { NextFunction, Request, RequestHandler, Response } from 'express';
import type passport from 'passport';
import { signInSchema } from '@shared/auth';
import type { SessionUser } from '@shared/roles';
import { SESSION_COOKIE } from '../context';
import type { Principal } from '../auth/session-user';
import type { User } from '../entities';
import { AppError, UnauthorizedError } from '../http/errors';
import { route, type AnyRoute } from '../http/route';
import { rotateXsrf } from '../http/xsrf';

export function sessionUser(user: Principal): SessionUser {
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    role: user.role,
    vendorOrganisation: user.vendorOrganisation ? { id: user.vendorOrganisation.id, name: user.vendorOrganisation.name } : null,
  };
}

/**
 * passport.authenticate as a promise, then a fresh session id (no session fixation) and a fresh
 * XSRF token bound to it.
 */
function signIn(auth: passport.PassportStatic, req: Request, res: Response): Promise<User> {
  return new Promise((resolve, reject) => {
    // passport calls next only with an error (never 'route' or 'router').
    const next: NextFunction = (err?: Error | 'route' | 'router') => (err instanceof Error ? reject(err) : undefined);
    (auth.authenticate('local', { session: false }, (err: Error | null, user: User | false) => {
      if (err) return reject(err);
      if (!user) return reject(new AppError(401, 'Sign-in failed', 'E-mail or password is not correct.'));
      req.session.regenerate((regenErr) => {
        if (regenErr) return reject(regenErr);
        req.login(user, (loginErr) => {
          if (loginErr) return reject(loginErr);
          rotateXsrf(req, res);
          resolve(user);
        });
      });
    }) as RequestHandler)(req, res, next);
  });
}

export function sessionRoutes(auth: passport.PassportStatic): AnyRoute[] {
  return [
    route({
      method: 'get', path: '/session', tag: 'Session', access: 'public',
      summary: 'The signed-in person, or 401. Always sets the XSRF-TOKEN cookie.',
      responses: { 200: '{ user }', 401: 'Not signed in' },
      handler: ({ req }) => {
        if (!req.user) throw new UnauthorizedError();
        return { user: sessionUser(req.user) };
      },
    }),
    route({
      method: 'post', path: '/session', tag: 'Session', access: 'public', body: signInSchema, changesSession: true,
      summary: 'Sign in with e-mail and password (needs the X-XSRF-TOKEN header; answers with a new XSRF-TOKEN cookie, and the old token stops working). The same 401 for any bad pair; 429 after repeated failures.',
      responses: { 200: '{ user }', 401: 'E-mail or password is not correct', 429: 'Too many failed attempts' },
      handler: async ({ req, res, em }) => {
        const user = await signIn(auth, req, res);
        user.lastSignInAt = new Date();
        await em.flush();
        return { user: sessionUser(user) };
      },
    }),
    route({
      method: 'delete', path: '/session', tag: 'Session', access: 'public', status: 204, changesSession: true,
      summary: 'Sign out (ends the session).',
      handler: ({ req, res }) =>
        new Promise<void>((resolve, reject) => {
          req.logout((err) => {
            if (err) return reject(err);
            req.session.destroy(() => {
              res.clearCookie(SESSION_COOKIE);
              resolve();
            });
          });
        }),
    }),
  ];
}
