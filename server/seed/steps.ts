// The demo seed, step by step, in order. Each feature appends its step; every step must be idempotent
// (`npm start` runs the seed on every start and keeps the data).
import type { AppContext } from '../context.js';
import { seedAccounts } from './accounts.js';
import { seedPublisherListings } from './publisher.js';
import { seedMarket } from './market.js';

export type SeedStep = (ctx: AppContext) => Promise<void>;

export const seedSteps: SeedStep[] = [(ctx) => seedAccounts(ctx), (ctx) => seedPublisherListings(ctx), (ctx) => seedMarket(ctx)];
