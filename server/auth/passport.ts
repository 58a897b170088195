import { RequestContext, type MikroORM } from '@mikro-orm/postgresql';
import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { User as UserEntity } from '../entities';
import { escapeLike } from '../services/like';
import { DUMMY_HASH, verifyPassword } from './password';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace -- Express's own augmentation point
  namespace Express {
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type -- declaration merging: req.user is our User entity
    interface User extends UserEntity {}
  }
}

/**
 * Passport with the local strategy. The answer is the same for an unknown e-mail, a wrong password
 * and a deactivated person, and takes as long, so sign-in cannot be used to probe e-mails.
 */
export function configurePassport(orm: MikroORM): passport.PassportStatic {
  const instance = new passport.Passport();
  const em = () => RequestContext.getEntityManager() ?? orm.em.fork();

  instance.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password', session: true }, (email, password, done) => {
      (async () => {
        const user = await em().findOne(
          UserEntity,
          { email: { $ilike: escapeLike(email.trim()) } },
          { populate: ['passwordHash', 'vendorOrganisation'] },
        );
        const ok = await verifyPassword(password, user?.passwordHash ?? DUMMY_HASH);
        if (!user || !ok || !user.active || !user.passwordHash) return done(null, false);
        return done(null, user);
      })().catch(done);
    }),
  );
  instance.serializeUser((user, done) => done(null, user.id));
  instance.deserializeUser((id: string, done) => {
    em()
      .findOne(UserEntity, { id, active: true }, { populate: ['vendorOrganisation'] })
      // false = no longer signed in (deactivated or removed): passport drops the session's user.
      .then((user) => done(null, user ?? false))
      .catch(done);
  });
  return instance as unknown as passport.PassportStatic;
}

