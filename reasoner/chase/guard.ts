// Resource guards for the chase: elements, branches, time, memory and cancellation end a run with a clear message.

import type { ResourceLimits } from '../api.js';
import type { FactStore } from './store.js';

/** Thrown when a resource limit is reached; the message says which and the value reached. */
export class ResourceLimitError extends Error {
  constructor(message: string) { super(message); this.name = 'ResourceLimitError'; }
}

/** Thrown when the caller's AbortSignal fired. */
export class CancelledError extends Error {
  constructor() { super('reasoning cancelled'); this.name = 'CancelledError'; }
}

/** Defaults chosen to protect a shared machine (common practice: fail well before the operating system would). */
export const DEFAULT_LIMITS: Required<ResourceLimits> = {
  maxElements: 20_000_000,
  maxBranches: 5_000_000,
  timeoutMs: 30 * 60_000,
  maxMemoryBytes: 12 * 1024 ** 3,
};

export class Guard {
  private readonly limits: Required<ResourceLimits>;
  private readonly deadline: number;
  private ticks = 0;
  branches = 0;
  anonymousElements = 0;
  /** Merges of elements with a copied successor edge on the published rewriting's path (see Chase.offTree). */
  copiedMerges = 0;

  constructor(limits: ResourceLimits = {}, private readonly signal?: AbortSignal, start = Date.now()) {
    this.limits = { ...DEFAULT_LIMITS, ...limits };
    this.deadline = start + this.limits.timeoutMs;
  }

  /** Called in the chase's loops: checks cancellation every call, time and memory every 64 calls. */
  check(_store?: FactStore): void {
    if (this.signal?.aborted) throw new CancelledError();
    if ((++this.ticks & 63) !== 0) return;
    if (Date.now() > this.deadline) throw new ResourceLimitError(`time limit reached: ${this.limits.timeoutMs} ms`);
    const m = process.memoryUsage();
    if (m.rss > this.limits.maxMemoryBytes) throw new ResourceLimitError(`memory limit reached: ${Math.round(m.rss / 2 ** 20)} MiB in use, limit ${Math.round(this.limits.maxMemoryBytes / 2 ** 20)} MiB`);
  }

  /** Called after elements are created; `count` is the store's element count. */
  elements(count: number): void {
    this.anonymousElements++;
    if (count > this.limits.maxElements) throw new ResourceLimitError(`element limit reached: ${count} elements (limit ${this.limits.maxElements}); the model needs more anonymous elements than allowed`);
  }

  /** Called per branch opened. */
  branch(): void {
    if (++this.branches > this.limits.maxBranches) throw new ResourceLimitError(`branch limit reached: ${this.limits.maxBranches} branches of the disjunctive chase`);
    this.check();
  }
}
