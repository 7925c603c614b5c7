// `entail`: prints Ent(O, D) as N-Triples on stdout (one fact a line, nothing else); exit 0 ok, 2 input error,
// 3 inconsistent, 4 resource limit. `--stats` prints timings and counts to stderr.

import { readFile } from 'node:fs/promises';
import type { CsvMapping, DatasetSource, FactSink } from '../api.js';
import { reason } from '../reason.js';
import { parseArgs } from './core-args.js';

/** Buffers N-Triples lines into large writes (stdout is the hot path for big results). */
class NTriplesOut implements FactSink {
  private chunk = '';
  write(s: string, p: string, o: string): void | Promise<void> {
    // String concatenation builds a rope; it is flattened once per chunk when written.
    this.chunk += `<${s}> <${p}> <${o}> .\n`;
    if (this.chunk.length > 1 << 20) return this.flush();
  }
  flush(): Promise<void> {
    const text = this.chunk;
    this.chunk = '';
    return new Promise((resolve, reject) => process.stdout.write(text, (e) => (e ? reject(e) : resolve())));
  }
}

export async function run(args: string[]): Promise<number> {
  let parsed;
  try { parsed = parseArgs(args, ['ontology', 'data', 'mapping', 'threads', 'path'], ['stats', 'approximate']); } catch (e) { process.stderr.write(`${(e as Error).message}\n`); return 2; }
  const path = parsed.values.get('path')?.[0];
  if (path !== undefined && path !== 'datalog' && path !== 'chase' && path !== 'rewriting') { process.stderr.write(`entail: --path is datalog, chase or rewriting, not ${path}\n`); return 2; }
  const ontology = parsed.values.get('ontology')?.[0];
  if (!ontology) { process.stderr.write('entail: --ontology FILE is required\n'); return 2; }
  // The published rewriting's plain chase is a reference for tests; its exactness argument leaves one kind of merge out.
  if (path === 'rewriting') process.stderr.write('entail: note: --path rewriting is the reference path; a run that merges elements holding copied successor edges lies outside its exactness argument and says so below, and some cases run out of time (reasoner/README.md, "The published rewriting"); the default path is the checked one\n');
  let csv: CsvMapping | undefined;
  const mappingPath = parsed.values.get('mapping')?.[0];
  if (mappingPath) {
    try { csv = JSON.parse(await readFile(mappingPath, 'utf8')) as CsvMapping; } catch (e) { process.stderr.write(`${mappingPath}: cannot read the CSV mapping: ${(e as Error).message}\n`); return 2; }
  }
  const datasets: DatasetSource[] = (parsed.values.get('data') ?? []).map((path) => (path.endsWith('.csv') && csv ? { path, csv } : { path }));
  const out = new NTriplesOut();
  const result = await reason({ ontology: { path: ontology }, datasets, mode: parsed.flags.has('approximate') ? 'approximate' : 'strict', path }, out);
  await out.flush();
  const err = (line: string) => process.stderr.write(line + '\n');
  switch (result.status) {
    case 'ok':
      for (const d of result.diagnostics) err(`${d.position}: ${d.severity}: ${d.message}`);
      if (parsed.flags.has('stats')) {
        for (const [k, v] of Object.entries(result.timings)) err(`${k}: ${Number.isInteger(v) ? v : v.toFixed(1) + ' ms'}`);
        err(`individuals: ${result.counts.individuals}; asserted facts output: ${result.counts.assertedFacts}; facts output: ${result.counts.entailedFacts}; data-property facts kept: ${result.counts.dataPropertyFacts}`);
        err(`rules: ${result.rewriting.rules} from ${result.rewriting.normalAxioms} normal-form axioms; profile: ${result.profile.verdict}`);
      }
      return 0;
    case 'inputError':
      for (const d of result.diagnostics) err(`${d.position}: ${d.severity}: ${d.message}`);
      if (!csv && datasets.some((d) => d.path.endsWith('.csv'))) err('entail: CSV datasets are read with --mapping FILE.json (subjectColumn, base, columns: see CsvMapping in reasoner/api.ts)');
      return 2;
    case 'outsideProfile':
      for (const e of result.profile.entries) if (e.classification === 'outside') err(`${e.position}: outside ALCHIQ (${e.reasons.join(', ')}): ${e.text}`);
      err('entail: the ontology is outside ALCHIQ; use --approximate to drop those axioms (answers are then sound but may be incomplete)');
      return 2;
    case 'inconsistent':
      err('entail: the ontology and data are inconsistent (no model); no facts are published.');
      for (const f of result.explanation.facts) err(`  clashing fact: ${f}`);
      for (const a of result.explanation.axioms) err(`  axiom: ${a.position ? a.position + ': ' : ''}${a.text}`);
      return 3;
    case 'resourceLimit':
      err(`entail: stopped: ${result.message}`);
      return 4;
    case 'cancelled':
      err('entail: cancelled');
      return 130;
  }
}
