// The web process: app and API on PORT (default 8080), graceful shutdown on SIGINT/SIGTERM.
import { createApp, createServer } from './app.js';
import { closeContext, createContext } from './bootstrap.js';
import { runShutdownHooks } from './lifecycle.js';

let ctx;
try {
  ctx = await createContext();
} catch (error) {
  console.error((error as Error).message);
  process.exit(1);
}
const context = ctx;
const app = createApp(context);
const server = createServer(app).listen(context.config.port, context.config.host, () => {
  console.log(`Thence is serving on ${context.config.publicUrl}`);
});
server.on('error', (error) => {
  console.error(`cannot listen on ${context.config.host}:${context.config.port}: ${error.message}`);
  process.exit(1);
});

let stopping = false;
async function stop(signal: string): Promise<void> {
  if (stopping) return;
  stopping = true;
  console.log(`${signal}: finishing requests in flight`);
  // Stop accepting, let in-flight requests finish, then flush buffered work (e.g. usage counters).
  await new Promise<void>((resolve) => server.close(() => resolve()));
  await runShutdownHooks();
  await closeContext(context);
  process.exit(0);
}
process.on('SIGINT', () => void stop('SIGINT'));
process.on('SIGTERM', () => void stop('SIGTERM'));
