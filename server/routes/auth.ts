// /api/auth: who am I, sign-up, sign-in (password, Google), sign-out, e-mail verification and password reset.
import { Router, type NextFunction, type Request, type RequestHandler, type Response } from 'express';
import { z } from 'zod';
import type { AppContext } from '../context.js';
import { requestResetSchema, resetPasswordSchema, signInSchema, signUpSchema, verifyEmailSchema } from '../../shared/auth.js';
import { passportFor, toSessionUser } from '../auth/passport.js';
import { publicRoute, requireAuth } from '../auth/guards.js';
import { GOOGLE_SCOPES, googleConfigured } from '../auth/strategies.js';
import { mailLimiter, signInLimiter, signUpLimiter } from '../auth/limits.js';
import { HttpError } from '../http/errors.js';
import { parseBody } from '../http/validate.js';
import { createPasswordUser, endSessions, findUserByEmail, findUserById, markEmailVerified, setPassword } from '../services/users.js';
import { consumeToken, issueToken, revokeTokens } from '../services/tokens.js';
import { passwordResetMail, sendMail, verificationMail } from '../services/mail.js';

/** Signs the user into this session; passport ≥ 0.6 regenerates the session id first (no session fixation). */
function logIn(req: Request, user: Express.User): Promise<void> {
  return new Promise((resolve, reject) => req.login(user, (error) => (error ? reject(error) : resolve())));
}

function logOut(req: Request): Promise<void> {
  return new Promise((resolve, reject) => req.logout((error) => (error ? reject(error) : resolve())));
}

/** Sends a verification mail; a failing mail server must not undo the sign-up, so the failure is logged and reported. */
async function sendVerification(ctx: AppContext, user: { id: string; email: string; name: string }): Promise<boolean> {
  try {
    const token = await issueToken(ctx, user.id, 'verify_email');
    await sendMail(ctx, verificationMail(ctx, user, token));
    return true;
  } catch (error) {
    console.error(`verification mail to ${user.email} failed: ${(error as Error).message}`);
    return false;
  }
}

const invalidToken = (what: string) => new HttpError(400, `This ${what} link is not valid any more; it may have been used or have expired.`, 'invalid_token', { token: [`This ${what} link is not valid any more; ask for a new one.`] });

export function authRouter(ctx: AppContext): Router {
  const router = Router();
  const passport = passportFor(ctx);
  router.get('/me', publicRoute, (req, res) => {
    res.json({ user: req.user ?? null });
  });

  /** Which sign-in methods this server offers (the client hides the Google button when it is not configured). */
  router.get('/providers', publicRoute, (_req, res) => {
    res.json({ password: true, google: googleConfigured(ctx) });
  });

  router.post('/sign-up', publicRoute, signUpLimiter(), async (req, res) => {
    const input = parseBody(signUpSchema, req.body, 'sign-up form');
    const user = await createPasswordUser(ctx, input);
    const mailSent = await sendVerification(ctx, user);
    const sessionUser = toSessionUser(user);
    await logIn(req, sessionUser);
    res.status(201).json({ user: sessionUser, verificationMailSent: mailSent });
  });

  router.post('/sign-in', publicRoute, signInLimiter(), (req: Request, res: Response, next: NextFunction) => {
    req.body = parseBody(signInSchema, req.body, 'sign-in form');
    const handler = passport.authenticate('local', (error: unknown, user: Express.User | false) => {
      if (error) return next(error);
      if (!user) return next(new HttpError(401, 'The e-mail address or the password is not correct.', 'invalid_credentials'));
      logIn(req, user).then(() => res.json({ user }), next);
    }) as RequestHandler;
    handler(req, res, next);
  });

  router.post('/sign-out', publicRoute, async (req, res) => {
    if (req.user) await logOut(req);
    res.status(204).end();
  });

  router.post('/verify', publicRoute, async (req, res) => {
    const { token } = parseBody(verifyEmailSchema, req.body, 'verification link');
    const userId = await consumeToken(ctx, token, 'verify_email');
    if (!userId) throw invalidToken('verification');
    const user = toSessionUser(await markEmailVerified(ctx, userId));
    // The link proves the mailbox, not the password: it does not sign anyone in.
    res.json({ user, signedIn: req.user?.id === user.id });
  });

  router.post('/resend-verification', requireAuth, mailLimiter(), async (req, res) => {
    const user = await findUserById(ctx, req.user!.id);
    if (user && !user.emailVerifiedAt && !(await sendVerification(ctx, user))) {
      throw new HttpError(503, 'The mail could not be sent just now; try again in a minute.', 'mail_unavailable');
    }
    res.status(204).end();
  });

  router.post('/request-reset', publicRoute, mailLimiter(), async (req, res) => {
    const { email } = parseBody(requestResetSchema, req.body, 'reset form');
    // Answer at once and do the work afterwards: the reply must not reveal, by content or by timing, whether the account exists.
    res.status(204).end();
    try {
      const user = await findUserByEmail(ctx, email);
      if (!user) return;
      const token = await issueToken(ctx, user.id, 'reset_password');
      await sendMail(ctx, passwordResetMail(ctx, user, token));
    } catch (error) {
      console.error(`password reset mail to ${email} failed: ${(error as Error).message}`);
    }
  });

  router.post('/reset', publicRoute, async (req, res) => {
    const { token, password } = parseBody(resetPasswordSchema, req.body, 'reset form');
    const userId = await consumeToken(ctx, token, 'reset_password');
    if (!userId) throw invalidToken('reset');
    await setPassword(ctx, userId, password);
    await revokeTokens(ctx, userId, 'reset_password');
    // Whoever knew the old password is signed out everywhere; the mailbox is proven too.
    await endSessions(ctx, userId);
    await markEmailVerified(ctx, userId);
    if (req.user?.id === userId) await logOut(req);
    res.status(204).end();
  });

  router.get('/google', publicRoute, (req, res, next) => {
    if (!googleConfigured(ctx)) return res.redirect(303, '/sign-in?error=google-unavailable');
    // login_hint (OpenID Connect Core 1.0 §3.1.2.1) pre-selects the account; Google and the stand-in both honour it.
    const hint = z.string().email().max(254).safeParse(req.query.login_hint);
    const options = { scope: GOOGLE_SCOPES, ...(hint.success ? { loginHint: hint.data } : {}) };
    (passport.authenticate('google', options) as RequestHandler)(req, res, next);
  });

  router.get('/google/callback', publicRoute, (req, res, next) => {
    if (!googleConfigured(ctx)) return res.redirect(303, '/sign-in?error=google-unavailable');
    const handler = passport.authenticate('google', (error: unknown, user: Express.User | false) => {
      // Any failure (denied consent, stale state, provider error) lands on the sign-in page with a message, never a stack.
      if (error) console.error(`Google sign-in failed: ${(error as Error).message ?? error}`);
      if (error || !user) return res.redirect(303, '/sign-in?error=google');
      logIn(req, user).then(() => res.redirect(303, '/?signedIn=google'), next);
    }) as RequestHandler;
    handler(req, res, next);
  });

  return router;
}

