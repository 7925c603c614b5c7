// /api/admin: account administration, admin role only.
import { Router } from 'express';
import { z } from 'zod';
import type { AppContext } from '../context.js';
import { setRolesSchema } from '../../shared/auth.js';
import { requireRole } from '../auth/guards.js';
import { notFound } from '../http/errors.js';
import { parseBody } from '../http/validate.js';
import { listUsers, setRoles, toListEntry } from '../services/users.js';

const listQuerySchema = z.object({
  search: z.string().max(200, 'At most 200 characters.').optional(),
  page: z.coerce.number({ message: 'Give the page as a whole number.' }).int('Give the page as a whole number.').min(1, 'Pages start at 1.').max(100_000, 'At most page 100000.').default(1),
  pageSize: z.coerce.number({ message: 'Give the page size as a whole number.' }).int('Give the page size as a whole number.').min(1, 'At least 1.').max(100, 'At most 100.').default(25),
});

const uuid = z.uuid();

export function adminRouter(ctx: AppContext): Router {
  const router = Router();
  router.use(requireRole('admin'));

  router.get('/users', requireRole('admin'), async (req, res) => {
    const query = parseBody(listQuerySchema, req.query, 'search');
    const result = await listUsers(ctx, query);
    res.json({ ...result, page: query.page, pageSize: query.pageSize });
  });

  router.put('/users/:id/roles', requireRole('admin'), async (req, res) => {
    if (!uuid.safeParse(req.params.id).success) throw notFound('No user with this id.');
    const { roles } = parseBody(setRolesSchema, req.body, 'roles');
    const user = await setRoles(ctx, req.user!.id, String(req.params.id), roles);
    res.json({ user: toListEntry(user) });
  });

  return router;
}
