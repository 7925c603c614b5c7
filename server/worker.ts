// The background worker process: runs queued jobs (knowledge-base processing) from the PostgreSQL-backed queue.
import { closeContext, createContext } from './bootstrap.js';
import { runShutdownHooks } from './lifecycle.js';
import { startJobs } from './jobs/index.js';

let ctx;
try {
  ctx = await createContext();
} catch (error) {
  console.error((error as Error).message);
  process.exit(1);
}
const context = ctx;
await startJobs(context);
console.log('Thence worker is running');

async function stop(): Promise<void> {
  await runShutdownHooks();
  await closeContext(context);
  process.exit(0);
}
process.on('SIGINT', () => void stop());
process.on('SIGTERM', () => void stop());
