// Registers every background job handler with the queue. Features add their handlers here.
import type { AppContext } from '../context.js';
import { onShutdown } from '../lifecycle.js';
import { sweepDeadVersions, workKbProcess } from './kbProcess.js';
import { queueFor } from './queue.js';

const SWEEP_MS = 30_000;

export interface RunningJobs {
  /** Stops taking jobs; running ones are aborted back to the queue. */
  stop(): Promise<void>;
}

export async function startJobs(ctx: AppContext): Promise<RunningJobs> {
  const boss = await queueFor(ctx);
  const shutdown = new AbortController();
  // On start, hand back versions whose worker died before this one came up; then keep sweeping.
  await sweepDeadVersions(ctx, boss).catch((error) => console.error('sweep:', (error as Error).message));
  const timer = setInterval(() => void sweepDeadVersions(ctx, boss).catch((error) => console.error('sweep:', (error as Error).message)), SWEEP_MS);
  timer.unref();
  const workerId = await workKbProcess(ctx, boss, shutdown.signal);
  const stop = async () => {
    clearInterval(timer);
    shutdown.abort('shutdown');
    await boss.offWork({ id: workerId }).catch(() => undefined);
  };
  // Registered after the queue's own hook, so it runs first (hooks run in reverse order): abort jobs, then stop the queue.
  onShutdown(stop);
  return { stop };
}
