// Passport setup: how a session maps to a user. Strategies (local, Google) are registered in ./strategies.
// One Authenticator per context rather than passport's process-wide singleton, so two apps in one process
// (tests of a server restart) never reach into each other's database.
import passport from 'passport';
import type { AppContext } from '../context.js';
import { User } from '../entities/User.js';
import { registerStrategies } from './strategies.js';

export type Authenticator = passport.Authenticator;

export function toSessionUser(user: User): Express.User {
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    roles: [...user.roles],
    emailVerified: !!user.emailVerifiedAt,
    hasPassword: !!user.passwordHash,
    google: !!user.googleId,
  };
}

const authenticators = new WeakMap<AppContext, Authenticator>();

/** The Authenticator of a context, created (with its strategies) on first use. */
export function passportFor(ctx: AppContext): Authenticator {
  let authenticator = authenticators.get(ctx);
  if (authenticator) return authenticator;
  authenticator = new passport.Authenticator();
  authenticator.serializeUser((user, done) => done(null, user.id));
  authenticator.deserializeUser((id: string, done) => {
    ctx.db
      .getRepository(User)
      .findOneBy({ id })
      // A deleted user's session simply ends (false), it is not an error.
      .then((user) => done(null, user ? toSessionUser(user) : false))
      .catch((error) => done(error));
  });
  registerStrategies(authenticator, ctx);
  authenticators.set(ctx, authenticator);
  return authenticator;
}

export function setupPassport(ctx: AppContext): Authenticator {
  return passportFor(ctx);
}
