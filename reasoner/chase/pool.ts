// Worker threads for independent components (ALCHIQ has no nominals, so components share no element): tasks are
// dealt to workers largest first, each worker chases its share and sends back the facts as transferable columns.

import { Worker } from 'node:worker_threads';
import { createRequire } from 'node:module';
import { pathToFileURL } from 'node:url';
import type { ResourceLimits } from '../api.js';
import type { RuleProgram } from '../rules/types.js';
import type { ComponentTask } from './component.js';
import type { ClashReport } from './entail.js';
import { CancelledError, ResourceLimitError } from './guard.js';

/** A component's result from a worker: facts over local ids and compiled predicate ids, or the clash. */
export type WorkerResult = { unary: Int32Array; binary: Int32Array; same: Int32Array } | { clash: ClashReport | null };

/** Messages from a worker. */
export type WorkerMessage =
  | { kind: 'result'; index: number; result: WorkerResult }
  | { kind: 'done'; stats: { branches: number; anonymousElements: number; copiedMerges: number; models: number; storeBytes: number } }
  | { kind: 'error'; name: string; message: string };

export interface PoolOptions {
  readonly limits?: ResourceLimits;
  readonly path?: 'optimised' | 'plain';
  readonly signal?: AbortSignal;
}

/** The worker's module: the TypeScript source when running from source, else the built file. */
function workerUrl(): URL {
  const self = import.meta.url;
  return new URL(self.endsWith('.ts') ? './worker.ts' : './worker.js', self);
}

/**
 * Starts a worker. From TypeScript source the worker first registers the tsx loader (its programmatic API), because
 * loader flags inherited through execArgv do not reach worker threads on Node 20.
 */
function startWorker(workerData: unknown): Worker {
  const url = workerUrl();
  if (!url.pathname.endsWith('.ts')) return new Worker(url, { workerData });
  // The ESM entry of tsx's API sits beside the CommonJS one that require.resolve finds.
  const api = pathToFileURL(createRequire(import.meta.url).resolve('tsx/esm/api').replace(/\.cjs$/, '.mjs')).href;
  const boot = `import { register } from ${JSON.stringify(api)};\nregister();\nawait import(${JSON.stringify(url.href)});\n`;
  return new Worker(new URL(`data:text/javascript,${encodeURIComponent(boot)}`), { workerData, execArgv: [] });
}

/**
 * Runs the tasks on `threads` workers; `onResult` gets each result (in any order) and returns a clash (mapped to input
 * ids) to stop everything, or undefined. Returns the summed statistics and the clash if one stopped the run.
 */
export async function runInWorkers(program: RuleProgram, tasks: readonly ComponentTask[], threads: number, options: PoolOptions,
  onResult: (index: number, result: WorkerResult) => ClashReport | null | undefined, onProgress?: (done: number, total: number) => void | Promise<void>,
): Promise<{ clash?: ClashReport | null; stats: { branches: number; anonymousElements: number; copiedMerges: number; models: number; storeBytes: number } }> {
  // Largest first, each to the least loaded worker (longest-processing-time scheduling).
  const shares: number[][] = Array.from({ length: threads }, () => []), load = new Array<number>(threads).fill(0);
  const size = (t: ComponentTask) => t.unary.length / 2 + t.binary.length / 3 + 1;
  [...tasks.keys()].sort((a, b) => size(tasks[b]!) - size(tasks[a]!)).forEach((i) => {
    let w = 0;
    for (let k = 1; k < threads; k++) if (load[k]! < load[w]!) w = k;
    shares[w]!.push(i); load[w]! += size(tasks[i]!);
  });
  const stats = { branches: 0, anonymousElements: 0, copiedMerges: 0, models: 0, storeBytes: 0 };
  const workers: Worker[] = [];
  let done = 0, finished = 0, stopped: { clash?: ClashReport | null; error?: Error } | null = null;
  return new Promise((resolve, reject) => {
    const stopAll = () => { for (const w of workers) void w.terminate(); };
    const settle = () => {
      if (stopped?.error) reject(stopped.error);
      else if (stopped) resolve({ clash: stopped.clash ?? null, stats });
      else resolve({ stats });
    };
    const onAbort = () => { if (!stopped) { stopped = { error: new CancelledError() }; stopAll(); settle(); } };
    options.signal?.addEventListener('abort', onAbort, { once: true });
    if (options.signal?.aborted) { onAbort(); return; }
    for (let w = 0; w < threads; w++) {
      const share = shares[w]!;
      const worker = startWorker({ program, path: options.path ?? 'optimised', limits: options.limits ?? {}, indexes: share, tasks: share.map((i) => tasks[i]!) });
      workers.push(worker);
      worker.on('message', (m: WorkerMessage) => {
        if (stopped) return;
        if (m.kind === 'result') {
          const clash = onResult(m.index, m.result);
          done++;
          if (clash !== undefined) { stopped = { clash }; stopAll(); settle(); return; }
          if (onProgress && (done & 63) === 0) void onProgress(done, tasks.length);
        } else if (m.kind === 'done') {
          stats.branches += m.stats.branches; stats.anonymousElements += m.stats.anonymousElements; stats.copiedMerges += m.stats.copiedMerges; stats.models += m.stats.models;
          stats.storeBytes = Math.max(stats.storeBytes, m.stats.storeBytes);
          if (++finished === threads) { options.signal?.removeEventListener('abort', onAbort); settle(); }
        } else {
          stopped = { error: m.name === 'ResourceLimitError' ? new ResourceLimitError(m.message) : new Error(`worker: ${m.message}`) };
          stopAll(); settle();
        }
      });
      worker.on('error', (e) => { if (!stopped) { stopped = { error: e }; stopAll(); settle(); } });
    }
  });
}
