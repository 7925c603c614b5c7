// Benchmarks of the reasoner core (figures, not assertions). Run: npx tsx tests/bench/core.ts [--part 1|2|3|4|5] [--runs N]
// (1) Horn path against clingo on the same Datalog program with 1M+ input facts: wall-time ratio, bytes per fact;
// (2) a disjunctive knowledge base with number restrictions and 10k individuals; (3) rewriting size and time;
// (4) the published rewriting's plain chase against the optimised path on the same knowledge bases.

import { mkdtempSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { rewriteOntology } from '../../reasoner/rewrite/rules-from-normal.js';
import { rewriteToTerminatingRules } from '../../reasoner/rewrite/disjunctive/index.js';
import { isFreshName } from '../../reasoner/model/normal.js';
import { toAsp } from '../../reasoner/rules/asp.js';
import { entail, type ChaseInput } from '../../reasoner/chase/entail.js';
import { clingo, CountingSink } from './bench-tools.js';
import { Guard } from '../../reasoner/chase/guard.js';
import { catalogueAbox, disjunctiveCatalogue, hornDatalogOntology, mixedNormalForm, randomAbox } from './core-generators.js';
import { searchShapes } from './core-shapes.js';

const args = process.argv.slice(2);
const part = args.includes('--part') ? Number(args[args.indexOf('--part') + 1]) : 0;
const runs = args.includes('--runs') ? Number(args[args.indexOf('--runs') + 1]) : 3;
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const mib = (b: number) => `${(b / 2 ** 20).toFixed(1)} MiB`;

function aspFacts(input: ChaseInput, ids: ReadonlyMap<string, string>): string {
  const out: string[] = [];
  for (let i = 0; i < input.classPred.length; i++) out.push(`${ids.get(input.classNames[input.classPred[i]!]!)}(i${input.classInd[i]}).`);
  for (let i = 0; i < input.propPred.length; i++) out.push(`${ids.get(input.propertyNames[input.propPred[i]!]!)}(i${input.propSubj[i]},i${input.propObj[i]}).`);
  return out.join('\n') + '\n';
}

async function hornAgainstClingo(): Promise<void> {
  console.log('== (1) Horn Datalog program: the chase against clingo on the same program');
  const onto = hornDatalogOntology(60, 10);
  const program = rewriteOntology({ axioms: onto.axioms, classes: onto.classes, properties: onto.properties, assertions: [] });
  const input = randomAbox(250_000, 1, 3, 60, 10);
  const inputFacts = input.classPred.length + input.propPred.length;
  const asp = toAsp(program);
  const dir = mkdtempSync(join(tmpdir(), 'thence-bench-'));
  const file = join(dir, 'horn.lp');
  writeFileSync(file, asp.text + aspFacts(input, asp.predicateIds));
  const ours: number[] = [], theirs: number[] = [];
  let facts = 0, storeBytes = 0, rssDelta = 0, clingoPeak = 0;
  for (let r = 0; r < runs; r++) {
    global.gc?.();
    const rss0 = process.memoryUsage().rss;
    const sink = new CountingSink();
    const t0 = performance.now();
    const outcome = await entail(program, input, sink, { guard: new Guard() });
    ours.push(performance.now() - t0);
    rssDelta = Math.max(rssDelta, process.memoryUsage().rss - rss0);
    facts = sink.n; storeBytes = outcome.stats.storeBytes;
    const c = clingo(file);
    theirs.push(c.ms); clingoPeak = c.peak;
  }
  rmSync(dir, { recursive: true, force: true });
  console.log(`input facts: ${inputFacts}; entailed facts (named): ${facts}; rules: ${program.rules.length}`);
  console.log(`chase: median ${median(ours).toFixed(0)} ms over ${runs} runs; clingo (grounding + solving, reading its text input): median ${median(theirs).toFixed(0)} ms`);
  console.log(`wall-time ratio chase / clingo: ${(median(ours) / median(theirs)).toFixed(2)} (target ≤ 1.0, aim 0.5)`);
  console.log(`fact store: ${mib(storeBytes)} = ${(storeBytes / facts).toFixed(1)} bytes per entailed fact (target ≤ 80); process RSS growth ${mib(rssDelta)} = ${(rssDelta / facts).toFixed(1)} bytes per fact; clingo peak RSS ${mib(clingoPeak)}`);
}

async function disjunctive10k(): Promise<void> {
  console.log('== (2) disjunctive catalogue with number restrictions, 10k individuals');
  const onto = disjunctiveCatalogue();
  const program = rewriteOntology({ axioms: onto.axioms, classes: onto.classes, properties: onto.properties, assertions: [] });
  const input = catalogueAbox(2500, 3, 5, 7);
  const next = input.individuals;
  const times: number[] = [];
  let stats, facts = 0;
  for (let r = 0; r < runs; r++) {
    const sink = new CountingSink();
    const t0 = performance.now();
    const outcome = await entail(program, input, sink, { guard: new Guard(), threads: Number(process.env.THREADS ?? 1) });
    times.push(performance.now() - t0);
    stats = outcome.stats; facts = sink.n;
    if (outcome.status !== 'ok') console.log('(inconsistent)');
  }
  console.log(`individuals: ${next}; input facts: ${input.classPred.length + input.propPred.length}; entailed facts: ${facts}`);
  console.log(`median ${median(times).toFixed(0)} ms over ${runs} runs (target < 60 000 ms); ${JSON.stringify(stats)}`);
  // The same catalogue as one connected component (one supplier for all): every candidate fact is then decided by
  // searches over the whole component (settled in groups, from the last model kept).
  for (const assemblies of [100, 500, 1250, 5000]) {
    const one = catalogueAbox(assemblies, 3, assemblies, 7);
    const sink = new CountingSink();
    const t0 = performance.now();
    const outcome = await entail(program, one, sink, { guard: new Guard() });
    console.log(`one component of ${one.individuals} individuals: ${(performance.now() - t0).toFixed(0)} ms, ${sink.n} facts; ${JSON.stringify(outcome.stats)}`);
  }
}

function rewritingScale(): void {
  console.log('== (3) rewriting size and time against ontology size (normal-form axioms)');
  for (const n of [10, 100, 1_000, 10_000, 100_000]) {
    const axioms = mixedNormalForm(n);
    const times: number[] = [];
    let program = rewriteOntology({ axioms, classes: [], properties: [], assertions: [] });
    for (let r = 0; r < Math.max(3, runs); r++) {
      const t0 = performance.now();
      program = rewriteOntology({ axioms, classes: [], properties: [], assertions: [] });
      times.push(performance.now() - t0);
    }
    const atoms = program.rules.reduce((s, r) => s + r.body.length + r.head.reduce((t, d) => t + d.atoms.length, 0), 0);
    console.log(`${String(n).padStart(7)} axioms → ${String(program.rules.length).padStart(7)} rules, ${String(atoms).padStart(8)} atoms (${(atoms / n).toFixed(2)} per axiom), median ${median(times).toFixed(2)} ms`);
  }
}

/** (4) The published rewriting (plain chase, no dynamic blocking) against the optimised path, same input. */
async function publishedAgainstOptimised(): Promise<void> {
  console.log('== (4) published rewriting (plain restricted chase) against the optimised path, same knowledge bases');
  const onto = disjunctiveCatalogue();
  const normal = { axioms: onto.axioms, classes: onto.classes, properties: onto.properties, assertions: [] };
  const paths = [['optimised', rewriteOntology(normal)], ['rewriting', rewriteToTerminatingRules(normal)]] as const;
  for (const assemblies of [50, 250]) {
    const input = catalogueAbox(assemblies, 3, 5, 7);
    const figures: string[] = [], times: number[] = [], counts: number[] = [];
    for (const [name, program] of paths) {
      const ts: number[] = [];
      let n = 0, stats;
      for (let r = 0; r < runs; r++) {
        let k = 0;
        const t0 = performance.now();
        const outcome = await entail(program, input, { unary: (c) => { if (!isFreshName(c)) k++; }, binary: (p) => { if (!isFreshName(p)) k++; }, same: () => { k++; } }, { guard: new Guard() });
        ts.push(performance.now() - t0); n = k; stats = outcome.stats;
      }
      times.push(median(ts)); counts.push(n);
      figures.push(`${name}: median ${median(ts).toFixed(0)} ms, ${n} facts, ${stats!.branches} branches, ${stats!.anonymousElements} anonymous elements`);
    }
    console.log(`catalogue, ${input.individuals} individuals in components of 26: ${figures.join('; ')}`);
    console.log(`  ratio rewriting / optimised: ${(times[1]! / times[0]!).toFixed(1)}; same number of facts: ${counts[0] === counts[1]}`);
  }
  // Random dense small knowledge bases (the differential tests' generator): total time of both paths.
  const fc = (await import('fast-check')).default;
  const { tinyKb, normalOf, programFacts } = await import('../unit/core/kb-tools.js');
  const kbs = fc.sample(tinyKb({ classes: 3, properties: 2, individuals: 3, axioms: 10, facts: 5, disjunctive: true, existential: true }), { numRuns: 800, seed: 1 });
  let optimised = 0, rewriting = 0, slowest = 0;
  for (const kb of kbs) {
    let t0 = performance.now();
    await programFacts(rewriteOntology(normalOf(kb)), kb);
    optimised += performance.now() - t0;
    t0 = performance.now();
    await programFacts(rewriteToTerminatingRules(normalOf(kb, true)), kb);
    const dt = performance.now() - t0;
    rewriting += dt; slowest = Math.max(slowest, dt);
  }
  console.log(`800 random dense knowledge bases (3 classes, 2 properties, ≤10 axioms): optimised ${optimised.toFixed(0)} ms, rewriting ${rewriting.toFixed(0)} ms in all (slowest ${slowest.toFixed(0)} ms); ratio ${(rewriting / optimised).toFixed(1)}`);
}

if (part === 0 || part === 3) rewritingScale();
if (part === 0 || part === 1) await hornAgainstClingo();
if (part === 0 || part === 2) await disjunctive10k();
if (part === 0 || part === 4) await publishedAgainstOptimised();
if (part === 0 || part === 5) await searchShapes();
