// Worker thread entry: chases a share of the components (see pool.ts) and posts each result as transferable columns.

import { parentPort, workerData } from 'node:worker_threads';
import type { ResourceLimits } from '../api.js';
import type { RuleProgram } from '../rules/types.js';
import { compileProgram } from './program.js';
import { runComponent, type ComponentTask } from './component.js';
import { Guard } from './guard.js';
import type { EntailStats } from './entail.js';
import type { WorkerMessage } from './pool.js';

interface Job { program: RuleProgram; path: 'optimised' | 'plain'; limits: ResourceLimits; indexes: number[]; tasks: ComponentTask[] }

/** Growable int column for one result. */
class Ints {
  data = new Int32Array(64);
  length = 0;
  push3(a: number, b: number, c?: number): void {
    const n = c === undefined ? 2 : 3;
    if (this.length + n > this.data.length) { const d = new Int32Array(this.data.length * 2 + n); d.set(this.data); this.data = d; }
    this.data[this.length++] = a; this.data[this.length++] = b;
    if (c !== undefined) this.data[this.length++] = c;
  }
  done(): Int32Array { return this.data.slice(0, this.length); }
}

const post = (m: WorkerMessage, transfer: ArrayBuffer[] = []) => parentPort!.postMessage(m, transfer);

try {
  const job = workerData as Job;
  const program = compileProgram(job.program);
  const guard = new Guard(job.limits);
  const stats: EntailStats = { components: 0, branches: 0, anonymousElements: 0, copiedMerges: 0, models: 0, cachedComponents: 0, storeBytes: 0, threads: 1 };
  job.tasks.forEach((task, k) => {
    const unary = new Ints(), binary = new Ints(), same = new Ints();
    const clash = runComponent(program, task, guard, job.path === 'plain', stats, {
      unary: (p, e) => unary.push3(p, e), binary: (p, s, o) => binary.push3(p, s, o), same: (a, b) => same.push3(a, b),
    });
    if (clash !== undefined) post({ kind: 'result', index: job.indexes[k]!, result: { clash } });
    else {
      const result = { unary: unary.done(), binary: binary.done(), same: same.done() };
      post({ kind: 'result', index: job.indexes[k]!, result }, [result.unary.buffer as ArrayBuffer, result.binary.buffer as ArrayBuffer, result.same.buffer as ArrayBuffer]);
    }
  });
  post({ kind: 'done', stats: { branches: guard.branches, anonymousElements: guard.anonymousElements, copiedMerges: guard.copiedMerges, models: stats.models, storeBytes: stats.storeBytes } });
} catch (error) {
  const e = error as Error;
  post({ kind: 'error', name: e.name, message: e.message });
}
