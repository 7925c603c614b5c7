// Passport setup: how a session maps to a user. Strategies (local, Google) are registered in ./strategies.
import passport from 'passport';
import type { AppContext } from '../context.js';
import { User } from '../entities/User.js';

export function toSessionUser(user: User): Express.User {
  return { id: user.id, email: user.email, name: user.name, roles: [...user.roles], emailVerified: !!user.emailVerifiedAt };
}

export function setupPassport(ctx: AppContext): passport.PassportStatic {
  passport.serializeUser((user, done) => done(null, user.id));
  passport.deserializeUser((id: string, done) => {
    ctx.db
      .getRepository(User)
      .findOneBy({ id })
      // A deleted user's session simply ends (false), it is not an error.
      .then((user) => done(null, user ? toSessionUser(user) : false))
      .catch((error) => done(error));
  });
  return passport;
}
