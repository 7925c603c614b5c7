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

async function ontologyBench(): Promise<void> {
  const text = generateOntology(AXIOMS);
  console.log(`\n## Ontology: ${AXIOMS} logical axioms (+${AXIOMS / 10} declarations), ${(text.length / 1e6).toFixed(1)} MB functional syntax`);
  const lexTimes: number[] = [], parseTimes: number[] = [], profileTimes: number[] = [], normalTimes: number[] = [];
  let normalCount = 0, verdict = '';
  for (let run = 0; run < RUNS; run++) {
    // Reference in the same run: tokenizing alone (the floor any parser of this text pays).
    let t = now();
    const lexer = new OfnLexer(text);
    while (lexer.next().type !== 'eof');
    lexTimes.push(now() - t);
    t = now();
    const { ontology } = await loadOntology({ path: 'bench.ofn', format: 'ofn' }, { text });
    parseTimes.push(now() - t);
    t = now();
    const report = profile(ontology, 'strict');
    profileTimes.push(now() - t);
    t = now();
    const normal = normalise(ontology, report.kept);
    normalTimes.push(now() - t);
    normalCount = normal.axioms.length;
    verdict = report.verdict;
  }
  const total = median(parseTimes) + median(profileTimes) + median(normalTimes);
  console.log(`parse ${ms(median(parseTimes))}, profile ${ms(median(profileTimes))}, normalise ${ms(median(normalTimes))} (medians of ${RUNS})`);
  console.log(`parse + profile + normalise: ${ms(total)} — target < 5000 ms; ${normalCount} normal axioms; verdict ${verdict}`);
  console.log(`ratio to tokenizing alone (${ms(median(lexTimes))}): ×${(total / median(lexTimes)).toFixed(1)}`);
}

async function datasetBench(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'thence-bench-'));
  try {
    const path = join(dir, 'data.nt');
    await writeNTriples(path, TRIPLES);
    const bytes = statSync(path).size;
    console.log(`\n## Dataset: ${TRIPLES} N-Triples lines, ${(bytes / 1e6).toFixed(0)} MB`);
    const rates: number[] = [], memory: number[] = [], reference: number[] = [];
    for (let run = 0; run < RUNS; run++) {
      gc();
      const before = process.memoryUsage();
      const dictionary = new TermDictionary(), abox = new Abox();
      const t = now();
      await loadDatasets([{ path, format: 'ntriples' }], dictionary, abox);
      const seconds = (now() - t) / 1000;
      gc();
      const after = process.memoryUsage();
      const stored = abox.size;
      rates.push(stored / seconds);
      memory.push((after.heapUsed + after.arrayBuffers - before.heapUsed - before.arrayBuffers) / stored);
      if (run === 0) console.log(`stored ${stored} rows (${abox.classAssertionCount} class, ${abox.propertyAssertionCount} property, ${abox.dataFactCount} data), ${dictionary.size} distinct terms; columns ${(abox.byteLength / stored).toFixed(1)} B/row`);
      // Keep the structures alive until measured.
      if (dictionary.size < 0) console.log(abox.size);
    }
    for (let run = 0; run < RUNS; run++) {
      // Reference in the same run: n3's streaming parser on the same file, counting quads only (nothing stored).
      const t = now();
      let n = 0;
      await new Promise<void>((resolve, reject) => {
        createReadStream(path).pipe(new StreamParser({ format: 'N-Triples' })).on('data', () => { n++; }).on('end', () => resolve()).on('error', reject);
      });
      reference.push(n / ((now() - t) / 1000));
    }
    console.log(`intake rate: ${(median(rates) / 1000).toFixed(0)}k triples/s (median of ${RUNS}) — target ≥ 500k/s`);
    console.log(`memory: ${median(memory).toFixed(1)} bytes per stored triple (dictionary + columns, after GC) — target ≤ 40`);
    console.log(`ratio to n3 StreamParser counting only (${(median(reference) / 1000).toFixed(0)}k/s): ×${(median(rates) / median(reference)).toFixed(2)}`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

await ontologyBench();
await datasetBench();
