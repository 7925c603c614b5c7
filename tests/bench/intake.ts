// Intake benchmark (run: npx tsx tests/bench/intake.ts [axioms] [triples]): parse+profile+normalise time, dataset intake rate, bytes per triple.

import { mkdtempSync, rmSync, createReadStream, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';
import { StreamParser } from 'n3';
import { loadOntology, profile, normalise, loadDatasets } from '../../reasoner/intake.js';
import { TermDictionary } from '../../reasoner/model/dictionary.js';
import { Abox } from '../../reasoner/model/abox.js';
import { OfnLexer } from '../../reasoner/syntax/ofn-lexer.js';
import { generateOntology, writeNTriples } from './intake-generate.js';

// Targets from issue 3: 100k axioms in under 5 s; ≥ 500k triples/s; ≤ 40 bytes per stored triple.
const AXIOMS = Number(process.argv[2] ?? 100_000);
const TRIPLES = Number(process.argv[3] ?? 1_000_000);
const RUNS = 3;

setFlagsFromString('--expose-gc');
const gc = runInNewContext('gc') as () => void;
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const ms = (t: number) => `${t.toFixed(0)} ms`;
const now = () => performance.now();
/** CPU milliseconds of this process (user + system): far less sensitive than wall time to other work on a shared machine. */
const cpu = () => { const u = process.cpuUsage(); return (u.user + u.system) / 1000; };

async function ontologyBench(): Promise<void> {
  const text = generateOntology(AXIOMS);
  console.log(`\n## Ontology: ${AXIOMS} logical axioms (+${AXIOMS / 10} declarations), ${(text.length / 1e6).toFixed(1)} MB functional syntax`);
  const lexTimes: number[] = [], parseTimes: number[] = [], profileTimes: number[] = [], normalTimes: number[] = [], cpuTimes: number[] = [];
  let normalCount = 0, verdict = '';
  for (let run = 0; run < RUNS; run++) {
    // Reference in the same run: tokenizing alone (the floor any parser of this text pays).
    let t = now();
    const lexer = new OfnLexer(text);
    while (lexer.next().type !== 'eof');
    lexTimes.push(now() - t);
    const c0 = cpu();
    t = now();
    const { ontology } = await loadOntology({ path: 'bench.ofn', format: 'ofn' }, { text });
    parseTimes.push(now() - t);
    t = now();
    const report = profile(ontology, 'strict');
    profileTimes.push(now() - t);
    t = now();
    const normal = normalise(ontology, report.kept);
    normalTimes.push(now() - t);
    cpuTimes.push(cpu() - c0);
    normalCount = normal.axioms.length;
    verdict = report.verdict;
  }
  const total = median(parseTimes) + median(profileTimes) + median(normalTimes);
  console.log(`parse ${ms(median(parseTimes))}, profile ${ms(median(profileTimes))}, normalise ${ms(median(normalTimes))} (medians of ${RUNS})`);
  console.log(`parse + profile + normalise: ${ms(total)} wall, ${ms(median(cpuTimes))} CPU — target < 5000 ms; ${normalCount} normal axioms; verdict ${verdict}`);
  console.log(`ratio to tokenizing alone (${ms(median(lexTimes))}): ×${(total / median(lexTimes)).toFixed(1)}`);
}

async function datasetBench(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'thence-bench-'));
  try {
    const path = join(dir, 'data.nt');
    await writeNTriples(path, TRIPLES);
    const bytes = statSync(path).size;
    console.log(`\n## Dataset: ${TRIPLES} N-Triples lines, ${(bytes / 1e6).toFixed(0)} MB`);
    const rates: number[] = [], cpuRates: number[] = [], memory: number[] = [], accounted: number[] = [], reference: number[] = [], cpuReference: number[] = [];
    for (let run = 0; run < RUNS; run++) {
      gc();
      const before = process.memoryUsage();
      const dictionary = new TermDictionary(), abox = new Abox();
      const c0 = cpu(), t = now();
      await loadDatasets([{ path, format: 'ntriples' }], dictionary, abox);
      const seconds = (now() - t) / 1000, cpuSeconds = (cpu() - c0) / 1000;
      gc();
      const after = process.memoryUsage();
      const stored = abox.size;
      rates.push(stored / seconds);
      cpuRates.push(stored / cpuSeconds);
      // Buffer.allocUnsafe memory shows under `external`, typed arrays under `arrayBuffers` (part of external).
      memory.push((after.heapUsed + after.external - before.heapUsed - before.external) / stored);
      accounted.push((dictionary.byteLength + abox.byteLength) / stored);
      if (run === 0) console.log(`stored ${stored} rows (${abox.classAssertionCount} class, ${abox.propertyAssertionCount} property, ${abox.dataFactCount} data), ${dictionary.size} distinct terms; columns ${(abox.byteLength / stored).toFixed(1)} B/row, dictionary ${(dictionary.byteLength / dictionary.size).toFixed(0)} B/term`);
      // Reference in the same run, interleaved: n3's streaming parser on the same file, counting quads only (nothing stored).
      const r0 = cpu(), rt = now();
      let n = 0;
      await new Promise<void>((resolve, reject) => {
        createReadStream(path).pipe(new StreamParser({ format: 'N-Triples' })).on('data', () => { n++; }).on('end', () => resolve()).on('error', reject);
      });
      reference.push(n / ((now() - rt) / 1000));
      cpuReference.push(n / ((cpu() - r0) / 1000));
      if (dictionary.size < 0) console.log(abox.size);   // keeps both alive until measured
    }
    console.log(`intake rate: ${(median(rates) / 1000).toFixed(0)}k triples/s wall, ${(median(cpuRates) / 1000).toFixed(0)}k triples/CPU-s (medians of ${RUNS}) — target ≥ 500k/s`);
    console.log(`memory: ${median(accounted).toFixed(1)} bytes per stored triple held by dictionary + columns; ${median(memory).toFixed(1)} measured (heap + external, after GC) — target ≤ 40`);
    console.log(`ratio to n3 StreamParser counting only (${(median(reference) / 1000).toFixed(0)}k/s wall, ${(median(cpuReference) / 1000).toFixed(0)}k/CPU-s): ×${(median(cpuRates) / median(cpuReference)).toFixed(2)} by CPU time`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

await ontologyBench();
await datasetBench();
