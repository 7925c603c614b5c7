// The 'kb.process' job: runs processVersion for one version, and a sweep that finds versions whose worker died
// (stale heartbeat) and hands them back to the queue — or marks them failed when no retries are left.
import type PgBoss from 'pg-boss';
import type { AppContext } from '../context.js';
import { dropFactTables } from '../services/factStore.js';
import { HEARTBEAT_STALE_SECONDS, processVersion } from '../services/processing.js';
import { notifyVersionFinished } from '../services/publishing.js';
import { appendLog } from '../services/versions.js';
import { kbQueueName, type KbProcessJob } from './queue.js';

/** Registers the handler: one job at a time per worker process (reasoning is CPU- and memory-heavy). */
export async function workKbProcess(ctx: AppContext, boss: PgBoss, shutdown: AbortSignal): Promise<string> {
  return boss.work<KbProcessJob>(kbQueueName(), { batchSize: 1, pollingIntervalSeconds: 1, includeMetadata: true }, async ([job]) => {
    if (!job) return;
    const finalAttempt = job.retryCount >= job.retryLimit;
    await processVersion(ctx, job.data.versionId, { finalAttempt, shutdown });
  });
}

/**
 * Finds versions in 'processing' whose heartbeat stopped (the worker was killed). Their load transaction died with the
 * connection, so no fact is visible; the sweep fails the still-active pg-boss job (pg-boss then retries it with back-off
 * or, with no retries left, marks it failed) and sets the version to match. Safe to run in every worker at once:
 * each step is conditional on the state it expects.
 */
export async function sweepDeadVersions(ctx: AppContext, boss: PgBoss, staleSeconds = HEARTBEAT_STALE_SECONDS): Promise<number> {
  const { rows } = await ctx.pool.query<{ id: string; job_id: string | null; store_key: number; stage: string | null }>(
    // Only versions of this queue (or run without one, by the seed): a worker never judges another queue's jobs.
    `SELECT v.id, v.job_id, v.store_key, v.stage FROM kb_versions v
      WHERE v.status = 'processing' AND (v.heartbeat_at IS NULL OR v.heartbeat_at < now() - make_interval(secs => $1))
        AND (v.job_id IS NULL OR EXISTS (SELECT 1 FROM pgboss.job j WHERE j.name = $2 AND j.id::text = v.job_id))`,
    [staleSeconds, kbQueueName()],
  );
  for (const row of rows) {
    let state = row.job_id ? await jobState(ctx, row.job_id) : null;
    if (state === 'active') {
      await boss.fail(kbQueueName(), row.job_id!, { reason: 'worker stopped (heartbeat lost)' }).catch(() => undefined);
      state = await jobState(ctx, row.job_id!);
    }
    await dropFactTables(ctx.pool, row.store_key);
    if (state === 'created' || state === 'retry') {
      const { rowCount } = await ctx.pool.query(
        `UPDATE kb_versions SET status = 'queued', stage = NULL, heartbeat_at = NULL WHERE id = $1 AND status = 'processing' AND (heartbeat_at IS NULL OR heartbeat_at < now() - make_interval(secs => $2))`,
        [row.id, staleSeconds],
      );
      if (rowCount) await appendLog(ctx.pool, row.id, `The worker stopped during stage ${row.stage ?? '?'}; partial facts were discarded and the job will be retried.`, 'warning');
    } else {
      const { rowCount } = await ctx.pool.query(
        `UPDATE kb_versions SET status = 'failed', finished_at = now(), heartbeat_at = NULL, error = 'The worker processing this version stopped and no retries are left.'
          WHERE id = $1 AND status = 'processing' AND (heartbeat_at IS NULL OR heartbeat_at < now() - make_interval(secs => $2))`,
        [row.id, staleSeconds],
      );
      if (rowCount) {
        await appendLog(ctx.pool, row.id, `The worker stopped during stage ${row.stage ?? '?'}; no retries are left. No facts were stored.`, 'error');
        await notifyVersionFinished(ctx, row.id);
      }
    }
  }
  // Versions left 'queued' whose job can no longer run (failed after its last retry, or cancelled) are closed as failed.
  await ctx.pool.query(
    `UPDATE kb_versions v SET status = CASE WHEN v.cancel_requested THEN 'cancelled' ELSE 'failed' END, finished_at = now(),
            error = CASE WHEN v.cancel_requested THEN NULL ELSE 'The processing job ended without finishing the version.' END
      WHERE v.status = 'queued' AND v.job_id IS NOT NULL AND v.created_at < now() - interval '1 minute'
        AND EXISTS (SELECT 1 FROM pgboss.job j WHERE j.name = $1 AND j.id::text = v.job_id AND j.state IN ('failed', 'cancelled', 'completed'))`,
    [kbQueueName()],
  );
  return rows.length;
}

async function jobState(ctx: AppContext, jobId: string): Promise<string | null> {
  const { rows } = await ctx.pool.query(`SELECT state FROM pgboss.job WHERE name = $1 AND id::text = $2`, [kbQueueName(), jobId]);
  return rows[0]?.state ?? null;
}
