// Sign-in strategies: e-mail + password (passport-local, bcrypt) and Google (passport-google-oauth20).
// With config.google.issuer set, the Google strategy talks to the local OpenID Connect stand-in instead of Google.
import { Strategy as LocalStrategy } from 'passport-local';
import { Strategy as GoogleStrategy, type Profile } from 'passport-google-oauth20';
import type passport from 'passport';
import type { AppContext } from '../context.js';
import { authenticate, GoogleSignInRefused, signInWithGoogle } from '../services/users.js';
import { toSessionUser } from './passport.js';

export const GOOGLE_SCOPES = ['openid', 'email', 'profile'];

/** True when a Google client id and secret are configured (real Google or the stand-in). */
export function googleConfigured(ctx: AppContext): boolean {
  return !!(ctx.config.google.clientId && ctx.config.google.clientSecret);
}

export function registerStrategies(authenticator: passport.Authenticator, ctx: AppContext): void {
  authenticator.use(
    'local',
    new LocalStrategy({ usernameField: 'email', passwordField: 'password', session: true }, (email, password, done) => {
      authenticate(ctx, email, password)
        .then((user) => done(null, user ? toSessionUser(user) : false))
        .catch((error) => done(error));
    }),
  );

  if (!googleConfigured(ctx)) return;
  const { clientId, clientSecret, issuer } = ctx.config.google;
  // The stand-in publishes these paths (oauth2-mock-server's /authorize, /token, /userinfo);
  // left undefined, passport-google-oauth20 uses Google's own endpoints.
  const endpoints = issuer
    ? { authorizationURL: `${issuer}/authorize`, tokenURL: `${issuer}/token`, userProfileURL: `${issuer}/userinfo` }
    : {};
  authenticator.use(
    'google',
    new GoogleStrategy(
      {
        clientID: clientId,
        clientSecret,
        callbackURL: `${ctx.config.publicUrl}/api/auth/google/callback`,
        // state + PKCE (RFC 7636) bind the callback to the browser session that started the sign-in.
        state: true,
        pkce: true,
        ...endpoints,
      },
      (_accessToken: string, _refreshToken: string, profile: Profile, done: (error: unknown, user?: Express.User | false, info?: { message: string }) => void) => {
        const email = profile.emails?.[0];
        signInWithGoogle(ctx, {
          id: profile.id,
          email: email?.value ?? null,
          // Google's userinfo sends email_verified as a boolean (OpenID Connect Core 1.0 §5.1).
          emailVerified: (email as { verified?: unknown } | undefined)?.verified === true,
          name: profile.displayName || null,
        })
          .then((user) => done(null, toSessionUser(user)))
          .catch((error) => (error instanceof GoogleSignInRefused ? done(null, false, { message: error.message }) : done(error)));
      },
    ),
  );
}
