// Mounts every feature router. Each feature adds its own lines; keep this file a table of contents.
import type { Express } from 'express';
import type { AppContext } from '../context.js';
import { authRouter } from './auth.js';
import { accountRouter } from './account.js';
import { adminRouter } from './admin.js';
import { listingsRouter } from './listings.js';
import { publisherRouter } from './publisher.js';
import { plansRouter } from './plans.js';
import { subscriptionsRouter } from './subscriptions.js';
import { keysRouter } from './keys.js';
import { usageRouter } from './usage.js';
import { webhooksRouter } from './webhooks.js';

/** Routes that must see the raw body (signed webhooks): mounted before the JSON parser. */
export function mountEarlyRoutes(app: Express, ctx: AppContext): void {
  app.use('/api/webhooks', webhooksRouter(ctx));
}

/** Cookie-authenticated and public routes under /api (the key-authenticated /api/v1 has its own app: server/v1/app.ts). */
export function mountRoutes(app: Express, ctx: AppContext): void {
  app.use('/api/auth', authRouter(ctx));
  app.use('/api/account', accountRouter(ctx));
  app.use('/api/admin', adminRouter(ctx));
  app.use('/api/listings', listingsRouter(ctx));
  app.use('/api/publisher', publisherRouter(ctx));
  app.use('/api/market/subscriptions', subscriptionsRouter(ctx));
  app.use('/api/market/keys', keysRouter(ctx));
  app.use('/api/market/usage', usageRouter(ctx));
  app.use('/api/market', plansRouter(ctx));
}
