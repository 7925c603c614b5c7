// /api/account: the signed-in person's own profile and password.
import { Router } from 'express';
import type { AppContext } from '../context.js';
import { changePasswordSchema, updateAccountSchema } from '../../shared/auth.js';
import { requireAuth } from '../auth/guards.js';
import { toSessionUser } from '../auth/passport.js';
import { parseBody } from '../http/validate.js';
import { changePassword, endSessions, updateName } from '../services/users.js';

export function accountRouter(ctx: AppContext): Router {
  const router = Router();

  router.patch('/', requireAuth, async (req, res) => {
    const { name } = parseBody(updateAccountSchema, req.body, 'account form');
    const user = await updateName(ctx, req.user!.id, name);
    res.json({ user: toSessionUser(user) });
  });

  router.post('/password', requireAuth, async (req, res) => {
    const { currentPassword, newPassword } = parseBody(changePasswordSchema, req.body, 'password form');
    await changePassword(ctx, req.user!.id, currentPassword, newPassword);
    // Other devices signed in with the old password are signed out; this one stays.
    await endSessions(ctx, req.user!.id, req.sessionID);
    res.status(204).end();
  });

  return router;
}
