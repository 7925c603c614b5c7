// /api/market/keys: a subscriber's API keys — create (the secret is in this one answer only), list, revoke.
import { Router } from 'express';
import type { AppContext } from '../context.js';
import { requireAuth } from '../auth/guards.js';
import { parseBody } from '../http/validate.js';
import { createKeySchema } from '../../shared/market.js';
import { createKey, listKeys, revokeKey } from '../services/apiKeys.js';
import { meterFor } from '../services/metering.js';

export function keysRouter(ctx: AppContext): Router {
  const router = Router();

  router.get('/', requireAuth, async (req, res) => {
    // Buffered counts carry last_used_at; write them first so the page shows the latest use.
    await meterFor(ctx).flush().catch(() => undefined);
    res.json({ keys: await listKeys(ctx, req.user!.id) });
  });

  router.post('/', requireAuth, async (req, res) => {
    const { subscriptionId, name } = parseBody(createKeySchema, req.body, 'key');
    res.set('Cache-Control', 'no-store').status(201).json({ key: await createKey(ctx, req.user!.id, subscriptionId, name) });
  });

  router.delete('/:id', requireAuth, async (req, res) => {
    res.json({ key: await revokeKey(ctx, req.user!.id, req.params.id as string) });
  });

  return router;
}
