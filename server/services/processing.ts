// Processing one version: reason over its files (parse → profile → normalise → rewrite → materialise) while the entailed
// facts stream into PostgreSQL, then store (dictionary, indexes) and make the version visible in one transaction.
// The same function serves the queue's worker and the demo seed (which calls it synchronously).
import os from 'node:os';
import type { AppContext } from '../context.js';
import type { FactSink, ReasonOptions, ReasonResult } from '../../reasoner/api.js';
import { reason } from '../../reasoner/index.js';
import { dropFactTables } from './factStore.js';
import { FactLoader, type LoadStats } from './factLoader.js';
import { appendLog, listFiles, loadVersion, type StoredCounts } from './versions.js';
import { notifyVersionFinished } from './publishing.js';

export type ReasonFunction = (options: ReasonOptions, sink: FactSink) => Promise<ReasonResult>;


/** A version whose heartbeat is older than this is taken to have lost its worker. Generous: a busy event loop delays beats. */
export const HEARTBEAT_STALE_SECONDS = 180;
const BEAT_MS = 1000;
/** Names this process in the job log, so a publisher (and a test) can tell which worker ran an attempt. */
export const WORKER_NAME = `${os.hostname()}:${process.pid}`;

/** Thrown when the version is being processed by a live worker elsewhere; the queue retries later. */
export class VersionBusyError extends Error {}

export interface ProcessOptions {
  /** Whether a failure is final (no retry follows): then the version is marked failed instead of re-queued. */
  finalAttempt: boolean;
  /** Aborted with reason 'shutdown' when the worker stops: the job goes back to the queue instead of being cancelled. */
  shutdown?: AbortSignal;
}

export type ProcessOutcome = 'ready' | 'failed' | 'inconsistent' | 'cancelled' | 'skipped';

/** Claims the version for this worker: queued, or processing with a dead heartbeat (its earlier worker died). */
async function claim(ctx: AppContext, versionId: string) {
  const { rows } = await ctx.pool.query(
    `UPDATE kb_versions SET status = 'processing', stage = 'parse', progress = 0, attempts = attempts + 1, started_at = now(), heartbeat_at = now(),
            finished_at = NULL, error = NULL
      WHERE id = $1 AND NOT cancel_requested
        AND (status = 'queued' OR (status = 'processing' AND (heartbeat_at IS NULL OR heartbeat_at < now() - make_interval(secs => $2))))
      RETURNING attempts, store_key, mode`,
    [versionId, HEARTBEAT_STALE_SECONDS],
  );
  return rows[0] as { attempts: number; store_key: number; mode: 'strict' | 'approximate' } | undefined;
}

async function finishWith(ctx: AppContext, versionId: string, status: 'failed' | 'inconsistent' | 'cancelled', fields: Record<string, unknown>): Promise<void> {
  const names = Object.keys(fields);
  const sets = names.map((name, i) => `${name} = $${i + 3}`);
  await ctx.pool.query(
    `UPDATE kb_versions SET status = $2, finished_at = now(), heartbeat_at = NULL${sets.length ? ', ' + sets.join(', ') : ''} WHERE id = $1`,
    [versionId, status, ...names.map((n) => (typeof fields[n] === 'object' && fields[n] !== null ? JSON.stringify(fields[n]) : fields[n]))],
  );
}

function countsFrom(stats: LoadStats): StoredCounts {
  return { facts: stats.facts, asserted: stats.asserted, terms: stats.terms, perClass: stats.perClass, perProperty: stats.perProperty };
}

/** Replaces every stored path in the strings of a JSON-like value by the file's original name. */
export function renameFiles<T>(value: T, pairs: [string, string][]): T {
  if (typeof value === 'string') return pairs.reduce((text, [from, to]) => text.split(from).join(to), value as string) as T;
  if (Array.isArray(value)) return value.map((v) => renameFiles(v, pairs)) as T;
  if (value && typeof value === 'object') return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, renameFiles(v, pairs)])) as T;
  return value;
}

/** Processes one version end to end. Throws (so the queue retries) only on unexpected errors of a non-final attempt. */
export async function processVersion(ctx: AppContext, versionId: string, options: ProcessOptions): Promise<ProcessOutcome> {
  const claimed = await claim(ctx, versionId);
  if (!claimed) {
    const row = await loadVersion(ctx.pool, versionId);
    if (!row) return 'skipped';
    if (row.cancel_requested && (row.status === 'queued' || row.status === 'processing')) {
      await finishWith(ctx, versionId, 'cancelled', { stage: null });
      return 'cancelled';
    }
    if (row.status === 'processing') throw new VersionBusyError(`version ${versionId} is being processed by another worker`);
    return 'skipped';
  }
  const { store_key: storeKey, mode, attempts } = claimed;
  await appendLog(ctx.pool, versionId, `Attempt ${attempts} started on worker ${WORKER_NAME} (${mode} mode).`);
  // Nothing of an earlier attempt can be visible (loads commit atomically), but a crash between commit and status is impossible
  // only because both happen in one transaction; dropping first keeps a retry correct even if that ever changes.
  await dropFactTables(ctx.pool, storeKey);

  const files = await listFiles(ctx.pool, versionId);
  const ontology = files.find((f) => f.role === 'ontology');
  if (!ontology) {
    await finishWith(ctx, versionId, 'failed', { error: 'The version has no ontology file.' });
    return 'failed';
  }

  // The reasoner names positions by the stored path (<uploadDir>/<listing>/<version>/00-ontology-….ofn:3:3); the publisher
  // knows the file by its own name, and the server's folders are nobody else's business.
  const names = <T>(value: T): T => renameFiles(value, files.map((f) => [f.storedPath, f.originalName]));
  const controller = new AbortController();
  const onShutdown = () => controller.abort('shutdown');
  options.shutdown?.addEventListener('abort', onShutdown, { once: true });
  let stage = 'parse', fraction = 0, lastLoggedStage = '';
  // One loop writes progress and the heartbeat and reads the cancel flag: at most one UPDATE per second per running job.
  const beat = setInterval(() => {
    ctx.pool
      .query(`UPDATE kb_versions SET heartbeat_at = now(), stage = $2, progress = $3 WHERE id = $1 AND status = 'processing' RETURNING cancel_requested`, [versionId, stage, fraction])
      .then(({ rows }) => {
        if (rows[0]?.cancel_requested && !controller.signal.aborted) controller.abort('cancel');
      })
      .catch(() => undefined);
    if (stage !== lastLoggedStage) {
      lastLoggedStage = stage;
      void appendLog(ctx.pool, versionId, `Stage ${stage}.`).catch(() => undefined);
    }
  }, BEAT_MS);

  let loader: FactLoader | null = null;
  try {
    loader = await FactLoader.open(ctx.pool, storeKey);
    const result = await reason(
      {
        ontology: { path: ontology.storedPath, format: ontology.format as never },
        datasets: files.filter((f) => f.role === 'dataset').map((f) => ({ path: f.storedPath, format: f.format as never, ...(f.csvMapping ? { csv: f.csvMapping as never } : {}) })),
        mode,
        signal: controller.signal,
        // A bound on one run, so a knowledge base whose chase explodes ends as 'resource limit' instead of holding a worker forever.
        limits: { timeoutMs: Number(process.env.THENCE_REASON_TIMEOUT_MS) > 0 ? Number(process.env.THENCE_REASON_TIMEOUT_MS) : 2 * 3600 * 1000 },
        onProgress: (p) => {
          stage = p.stage;
          fraction = p.fraction;
        },
      },
      loader,
    );

    if (result.status !== 'ok') {
      await loader.abort();
      loader = null;
      if (result.status === 'cancelled' || controller.signal.aborted) {
        if (controller.signal.reason === 'shutdown') throw new Error('the worker is shutting down');
        await finishWith(ctx, versionId, 'cancelled', { stage: null });
        await appendLog(ctx.pool, versionId, 'Cancelled; no facts were stored.', 'warning');
        return 'cancelled';
      }
      if (result.status === 'inconsistent') {
        await finishWith(ctx, versionId, 'inconsistent', { stage, profile: names(result.profile), rewriting: result.rewriting, program: names(result.program), explanation: names(result.explanation), diagnostics: names(result.diagnostics), error: 'The knowledge base is inconsistent: no model satisfies the ontology and the data together.' });
        await appendLog(ctx.pool, versionId, `Inconsistent: ${result.explanation.facts.length} fact(s) and ${result.explanation.axioms.length} axiom(s) clash.`, 'error');
        await notifyVersionFinished(ctx, versionId);
        return 'inconsistent';
      }
      const error =
        result.status === 'inputError' ? `The input could not be read: ${result.diagnostics.filter((d) => d.severity === 'error').length} error(s).`
        : result.status === 'outsideProfile' ? `${result.profile.counts.outside} axiom(s) fall outside ALCHIQ; fix them or run again in approximate mode.`
        : result.message;
      await finishWith(ctx, versionId, 'failed', { stage, error, diagnostics: names('diagnostics' in result ? result.diagnostics : []), profile: names('profile' in result ? result.profile : null) });
      await appendLog(ctx.pool, versionId, `Failed: ${error}`, 'error');
      await notifyVersionFinished(ctx, versionId);
      return 'failed';
    }

    stage = 'store';
    fraction = 0;
    const stats = await loader.finish((step, f) => (fraction = step === 'terms' ? 0.1 : 0.2 + 0.8 * f));
    const timings = { ...result.timings, storeStreamMs: stats.timings.copyFactsMs, storeWriteMs: stats.timings.writeMs + stats.timings.endCopyMs, storeTermsMs: stats.timings.copyTermsMs, storeIndexMs: stats.timings.indexMs };
    // A cancel that arrived while the indexes were built still wins: nothing has been served yet.
    if (controller.signal.aborted) throw new Error(String(controller.signal.reason));
    const toStore = loader;
    loader = null;
    await toStore.commit(async (client) => {
      // Only this attempt may finish the version: if a sweep took it for dead and another worker claimed it meanwhile,
      // the attempt number moved on and this whole load (renames included) rolls back.
      const { rowCount } = await client.query(
        `UPDATE kb_versions SET status = 'ready', stage = 'store', progress = 1, finished_at = now(), heartbeat_at = NULL, profile = $2, rewriting = $3, program = $4,
                counts = $5, diagnostics = $6, timings = $7, fact_count = $8 WHERE id = $1 AND status = 'processing' AND attempts = $9 AND NOT cancel_requested`,
        [versionId, JSON.stringify(names(result.profile)), JSON.stringify(result.rewriting), names(result.program), JSON.stringify(countsFrom(stats)), JSON.stringify(names(result.diagnostics)), JSON.stringify(timings), stats.facts, attempts],
      );
      if (!rowCount) throw new Error('the version was cancelled or taken over by another attempt before it was stored');
    });
    await appendLog(ctx.pool, versionId, `Ready: ${stats.facts} facts (${stats.asserted} asserted, ${stats.facts - stats.asserted} entailed), ${stats.terms} terms.`);
    await notifyVersionFinished(ctx, versionId);
    return 'ready';
  } catch (error) {
    await loader?.abort();
    // An abort may surface as whatever the reader threw (the signal's reason, an AbortError): the flag decides.
    if (controller.signal.aborted && controller.signal.reason === 'cancel') {
      await finishWith(ctx, versionId, 'cancelled', { stage: null });
      await appendLog(ctx.pool, versionId, 'Cancelled; no facts were stored.', 'warning');
      return 'cancelled';
    }
    const message = error instanceof Error ? error.message : String(error);
    const now = await loadVersion(ctx.pool, versionId);
    // Another attempt owns the version now (this one was taken for dead): leave its state alone.
    if (!now || now.attempts !== attempts || now.status !== 'processing') return 'skipped';
    if (now.cancel_requested) {
      await finishWith(ctx, versionId, 'cancelled', { stage: null });
      await appendLog(ctx.pool, versionId, 'Cancelled; no facts were stored.', 'warning');
      return 'cancelled';
    }
    if (options.finalAttempt) {
      await finishWith(ctx, versionId, 'failed', { error: `Processing stopped: ${message}` });
      await appendLog(ctx.pool, versionId, `Attempt ${attempts} failed and no retries are left: ${message}`, 'error');
      await notifyVersionFinished(ctx, versionId);
      return 'failed';
    }
    await ctx.pool.query(`UPDATE kb_versions SET status = 'queued', stage = NULL, heartbeat_at = NULL WHERE id = $1 AND status = 'processing'`, [versionId]);
    await appendLog(ctx.pool, versionId, `Attempt ${attempts} stopped (${message}); partial facts discarded; it will be retried.`, 'warning');
    throw error;
  } finally {
    clearInterval(beat);
    options.shutdown?.removeEventListener('abort', onShutdown);
  }
}
