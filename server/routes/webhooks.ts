// POST /api/webhooks/stripe: Stripe's signed events, verified on the raw body (stripe.webhooks.constructEvent) and applied
// once each. Mounted before the JSON parser; exempt from CSRF (the signature is the authentication).
import express, { Router } from 'express';
import type { AppContext } from '../context.js';
import { HttpError } from '../http/errors.js';
import { verifyWebhook } from '../services/stripe.js';
import { handleStripeEvent } from '../services/billing.js';

export function webhooksRouter(ctx: AppContext): Router {
  const router = Router();
  router.post('/stripe', express.raw({ type: () => true, limit: '1mb' }), async (req, res) => {
    const raw = Buffer.isBuffer(req.body) ? req.body : Buffer.alloc(0);
    let event;
    try {
      event = verifyWebhook(ctx.config, raw, req.get('stripe-signature'));
    } catch (error) {
      throw new HttpError(400, `The webhook signature does not verify: ${(error as Error).message.split('\n')[0]}`, 'bad_signature');
    }
    const outcome = await handleStripeEvent(ctx, event);
    res.json({ received: true, outcome });
  });
  return router;
}
