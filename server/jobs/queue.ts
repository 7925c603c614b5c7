// The process's one pg-boss instance (schema 'pgboss' on DATABASE_URL), started on first use; every web and worker
// process on every machine shares the queue through PostgreSQL.
import PgBoss from 'pg-boss';
import type { AppContext } from '../context.js';
import { onShutdown } from '../lifecycle.js';

export const KB_PROCESS_QUEUE = 'kb.process';

/** The queue's name: 'kb.process'; THENCE_KB_QUEUE gives a test process a queue of its own (test files run in parallel). */
export function kbQueueName(env: NodeJS.ProcessEnv = process.env): string {
  return env.THENCE_KB_QUEUE || KB_PROCESS_QUEUE;
}

export interface KbProcessJob { versionId: string }

/**
 * Queue policy for knowledge-base processing. Retries: 2 more attempts, 30 s then 60 s (pg-boss retryBackoff doubles the delay).
 * Expiry: a job still active after 6 hours is treated as dead by pg-boss and retried; a dead worker is usually found much
 * sooner by the heartbeat sweep in kbProcess.ts.
 */
export function kbProcessPolicy(env: NodeJS.ProcessEnv = process.env) {
  // THENCE_KB_RETRY_DELAY_SECONDS shortens the delay for tests that exercise a retry.
  const retryDelay = Number(env.THENCE_KB_RETRY_DELAY_SECONDS) > 0 ? Number(env.THENCE_KB_RETRY_DELAY_SECONDS) : 30;
  return { retryLimit: 2, retryDelay, retryBackoff: true, expireInSeconds: 6 * 3600, retentionMinutes: 7 * 24 * 60 };
}

const instances = new WeakMap<AppContext, Promise<PgBoss>>();

/** The pg-boss instance of this context (one per process in practice), started and with the queue created. */
export function queueFor(ctx: AppContext): Promise<PgBoss> {
  let boss = instances.get(ctx);
  if (!boss) {
    boss = (async () => {
      const instance = new PgBoss({ connectionString: ctx.config.databaseUrl, schema: 'pgboss', max: 4, application_name: 'thence-queue' });
      instance.on('error', (error) => console.error('queue:', error.message));
      await instance.start();
      await instance.createQueue(kbQueueName(), { name: kbQueueName(), ...kbProcessPolicy() });
      return instance;
    })();
    instances.set(ctx, boss);
    onShutdown(() => stopQueue(ctx));
  }
  return boss;
}

/** Stops the queue of a context: lets the running job finish for up to `timeoutMs`, then fails it back to the queue. */
export async function stopQueue(ctx: AppContext, timeoutMs = 20_000): Promise<void> {
  const boss = instances.get(ctx);
  if (!boss) return;
  instances.delete(ctx);
  const instance = await boss.catch(() => null);
  await instance?.stop({ graceful: true, wait: true, timeout: timeoutMs });
}

/** Queues a version for processing; returns the job id (stored on the version for cancellation). */
export async function enqueueProcessing(ctx: AppContext, versionId: string): Promise<string> {
  const boss = await queueFor(ctx);
  const id = await boss.send(kbQueueName(), { versionId } satisfies KbProcessJob, { ...kbProcessPolicy(), singletonKey: versionId });
  if (!id) throw new Error(`version ${versionId} is already queued`);
  await ctx.pool.query(`UPDATE kb_versions SET job_id = $2 WHERE id = $1`, [versionId, id]);
  return id;
}

/** Cancels a job that has not started; running jobs see the version's cancel flag instead. */
export async function cancelQueuedJob(ctx: AppContext, jobId: string): Promise<void> {
  const boss = await queueFor(ctx);
  await boss.cancel(kbQueueName(), jobId);
}
