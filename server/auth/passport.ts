import { RequestContext, type MikroORM } from '@mikro-orm/postgresql';
import type { Request } from 'express';
import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { User as UserEntity } from '../entities';
import { normaliseEmail } from '@shared/auth';
import { DUMMY_HASH, verifyPassword } from './password';
import { loadedSessionUser } from './session-store';
import { SessionPerson, type Principal } from './session-user';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace -- Express's own augmentation point
  namespace Express {
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type -- declaration merging: req.user is who is signed in (session-user.ts)
    interface User extends Principal {}
  }
}

/**
 * Passport with the local strategy. The answer is the same for an unknown e-mail, a wrong password
 * a deactivated person and one whose membership of a vendor organisation is not approved, and takes
 * as long, so sign-in cannot be used to probe e-mails. The e-mail is normalised and compared exactly.
 */
export function configurePassport(orm: MikroORM): passport.PassportStatic {
  const instance = new passport.Passport();
  const em = () => RequestContext.getEntityManager() ?? orm.em.fork();

  instance.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password', session: true }, (email, password, done) => {
      (async () => {
        const user = await em().findOne(
          UserEntity,
          { email: normaliseEmail(email) },
          { populate: ['passwordHash', 'vendorOrganisation'] },
        );
        const ok = await verifyPassword(password, user?.passwordHash ?? DUMMY_HASH);
        if (!user || !ok || !user.active || !user.passwordHash || user.membership !== 'approved') return done(null, false);
        return done(null, user);
      })().catch(done);
    }),
  );
  instance.serializeUser((user, done) => done(null, user.id));
  instance.deserializeUser<string, Request>((req, id, done) => {
    // Usually read with the session itself, in the same query (session-store.ts): a plain object,
    // made an entity only by a route that uses it as one (http/route.ts, userEntity).
    const row = loadedSessionUser(req.session, id);
    if (row !== undefined) return done(null, row ? new SessionPerson(row) : false);
    em()
      .findOne(UserEntity, { id, active: true }, { populate: ['vendorOrganisation'] })
      // false = no longer signed in (deactivated or removed): passport drops the session's user.
      .then((user) => done(null, user ?? false))
      .catch(done);
  });
  return instance as unknown as passport.PassportStatic;
}

