// Shared pieces of the reasoner benchmarks: a sink that only counts, and a timed clingo run.

import { execFileSync } from 'node:child_process';
import type { EntailedSink } from '../../reasoner/chase/entail.js';

/** Counts the entailed facts it receives and keeps none. */
export class CountingSink implements EntailedSink {
  n = 0;
  unary(): void { this.n++; }
  binary(): void { this.n++; }
  same(): void { this.n++; }
}

/** Runs clingo on a file with the given extra options; wall ms and peak resident bytes (from /usr/bin/time -v). */
export function clingo(file: string, options: readonly string[] = []): { ms: number; peak: number } {
  const t0 = performance.now();
  let err = '';
  try {
    execFileSync('/usr/bin/time', ['-v', '/usr/bin/clingo', '--mode=clingo', ...options, '-q', file], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'], maxBuffer: 1 << 26 });
  } catch (e) {
    // clingo's exit codes 10 (satisfiable), 20 (unsatisfiable) and 30 (all models found) are answers, not failures.
    const x = e as { status?: number; stderr?: string };
    if (x.status !== 10 && x.status !== 30 && x.status !== 20) throw e;
    err = x.stderr ?? '';
  }
  const ms = performance.now() - t0;
  const m = /Maximum resident set size \(kbytes\): (\d+)/.exec(err);
  return { ms, peak: m ? Number(m[1]) * 1024 : NaN };
}
