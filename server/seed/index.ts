// Seeds the demo data (`npm run seed`, and `npm start` on every start): runs each step of ./steps in order.
import { pathToFileURL } from 'node:url';
import type { AppContext } from '../context.js';
import { closeContext, createContext } from '../bootstrap.js';
import { seedSteps } from './steps.js';

export { seedAccounts } from './accounts.js';

export async function runSeed(ctx: AppContext): Promise<void> {
  for (const step of seedSteps) await step(ctx);
}

// Run only when executed (`tsx server/seed/index.ts`), not when imported by a test.
if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  let ctx: AppContext | undefined;
  try {
    ctx = await createContext();
    await runSeed(ctx);
    console.log('demo data ready');
  } catch (error) {
    console.error(`seeding failed: ${(error as Error).message}`);
    process.exitCode = 1;
  } finally {
    if (ctx) await closeContext(ctx);
  }
}
