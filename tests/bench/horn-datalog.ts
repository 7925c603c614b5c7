// Benchmark of the Horn path (figures, not assertions). Run: npx tsx tests/bench/horn-datalog.ts [--runs N]
// [--individuals N] [--functional [--functional-individuals N]] [--chase]. A Horn-ALCHIQ ontology of our own (a class tree, a property tree with inverses,
// existentials with facts sent back through inverses, ≤1 on generating properties, ∀ forward) is rewritten to Datalog
// (rewrite/horn); the same Datalog program runs on our engine and on clingo (its ASP-Core-2 export, facts as text),
// both measured in this run: wall-time ratio, bytes per entailed fact, medians of several runs. `--chase` also times
// the one-rule-per-axiom program with anonymous elements on the same input.

import { mkdtempSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { FRESH_TOP, type NormalAxiom, type NormalOntology, type PropertyRef } from '../../reasoner/model/normal.js';
import { rewriteOntology } from '../../reasoner/rewrite/rules-from-normal.js';
import { hornDatalog } from '../../reasoner/rewrite/horn/index.js';
import { ruleShape } from '../../reasoner/rules/types.js';
import { toAsp } from '../../reasoner/rules/asp.js';
import { entail, type ChaseInput } from '../../reasoner/chase/entail.js';
import { clingo, CountingSink } from './bench-tools.js';
import { Guard } from '../../reasoner/chase/guard.js';
import { random } from './core-generators.js';

const args = process.argv.slice(2);
const option = (name: string, fallback: number) => (args.includes(name) ? Number(args[args.indexOf(name) + 1]) : fallback);
const runs = option('--runs', 3), individuals = option('--individuals', 250_000);
// ≤1 puts ≈ into the program, and clingo then needs the equality axioms spelled out (no built-in equality), which
// makes its grounding much larger: that case is measured on its own, at `--functional-individuals` (default 20 000).
const functional = args.includes('--functional'), functionalIndividuals = option('--functional-individuals', 20_000);
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const mib = (b: number) => `${(b / 2 ** 20).toFixed(1)} MiB`;
const SOURCE = { axiomId: 0, position: 'bench' };
const EX = 'http://example.org/shipping#';
const cls = (i: number) => `${EX}Kind${i}`;
const prop = (i: number) => `${EX}link${i}`;
const ref = (i: number, inverse = false): PropertyRef => ({ name: prop(i), inverse });

/** The ontology: `classes` in a binary tree, `properties` in a tree (every third inclusion into an inverse), and per
 *  generating axiom A ⊑ ∃P.B a fact sent back (B ⊑ ∀P⁻.D), some forward ∀ and a ≤1 on P for every fourth. */
function hornOntology(atMostOne: boolean, classes = 80, properties = 16, generating = 30, seed = 7): NormalOntology {
  const rnd = random(seed), axioms: NormalAxiom[] = [{ kind: 'subsumption', body: [], head: [FRESH_TOP], source: SOURCE }];
  const pick = (n: number) => Math.floor(rnd() * n);
  for (let i = 1; i < classes; i++) axioms.push({ kind: 'subsumption', body: [cls(i)], head: [cls(Math.floor((i - 1) / 2))], source: SOURCE });
  for (let i = 1; i < properties; i++) axioms.push({ kind: 'propertyInclusion', sub: ref(i), sup: ref(Math.floor((i - 1) / 2), i % 3 === 0), source: SOURCE });
  for (let k = 0; k < generating; k++) {
    const a = classes / 2 + pick(classes / 2), b = pick(classes), d = pick(classes), p = properties / 2 + pick(properties / 2);
    axioms.push({ kind: 'exists', sub: cls(a), property: ref(p, k % 5 === 0), filler: cls(b), source: SOURCE });
    axioms.push({ kind: 'forall', sub: cls(b), property: ref(p, k % 5 !== 0), filler: cls(d), source: SOURCE });
    if (atMostOne && k % 4 === 0) axioms.push({ kind: 'atMost', sub: cls(a), n: 1, property: ref(p, k % 5 === 0), filler: null, source: SOURCE });
    if (k % 3 === 0) axioms.push({ kind: 'forall', sub: cls(pick(classes)), property: ref(p), filler: cls(pick(classes)), source: SOURCE });
    if (k % 2 === 0) axioms.push({ kind: 'subsumption', body: [cls(pick(classes)), cls(d)], head: [cls(pick(classes))], source: SOURCE });
  }
  return { axioms, classes: Array.from({ length: classes }, (_, i) => cls(i)), properties: Array.from({ length: properties }, (_, i) => prop(i)), assertions: [] };
}

/** The ABox: each individual one leaf class and three edges (random properties) to random individuals. */
function abox(n: number, classes: number, properties: number, seed = 11): ChaseInput {
  const rnd = random(seed), edges = 3;
  const classPred = new Int32Array(n), classInd = new Int32Array(n);
  for (let i = 0; i < n; i++) { classInd[i] = i; classPred[i] = Math.floor(classes / 2 + rnd() * (classes / 2)); }
  const propPred = new Int32Array(n * edges), propSubj = new Int32Array(n * edges), propObj = new Int32Array(n * edges);
  for (let i = 0; i < n * edges; i++) { propSubj[i] = Math.floor(i / edges); propObj[i] = Math.floor(rnd() * n); propPred[i] = Math.floor(rnd() * properties); }
  const none = new Int32Array(0);
  return {
    individuals: n, classPred, classInd, propPred, propSubj, propObj, sameA: none, sameB: none, diffA: none, diffB: none,
    classNames: Array.from({ length: classes }, (_, i) => cls(i)), propertyNames: Array.from({ length: properties }, (_, i) => prop(i)),
  };
}

const normal = hornOntology(functional);
const size = functional ? functionalIndividuals : individuals;
console.log(`== Horn path: ${functional ? 'with ≤1 (≈ in the program)' : 'without ≤1 (plain Datalog)'}, ${size} individuals`);
const t0 = performance.now();
const { program, stats } = hornDatalog(normal);
const rewriteMs = performance.now() - t0;
const shapes: Record<string, number> = {};
for (const r of program.rules) shapes[ruleShape(r)] = (shapes[ruleShape(r)] ?? 0) + 1;
console.log(`ontology: ${normal.axioms.length} normal-form axioms (${stats.generatingAxioms} generating); Datalog: ${program.rules.length} rules ${JSON.stringify(shapes)}`);
console.log(`rewriting: ${rewriteMs.toFixed(0)} ms, ${stats.contexts} contexts saturated, largest interface ${stats.largestInterface} classes, ${stats.identificationRules} identification rules`);

const input = abox(size, normal.classes.length, normal.properties.length);
const inputFacts = input.classPred.length + input.propPred.length;
const asp = toAsp(program);
const dir = mkdtempSync(join(tmpdir(), 'thence-horn-bench-'));
const file = join(dir, 'horn.lp');
const facts: string[] = [];
for (let i = 0; i < input.classPred.length; i++) facts.push(`${asp.predicateIds.get(input.classNames[input.classPred[i]!]!)}(i${input.classInd[i]}).`);
for (let i = 0; i < input.propPred.length; i++) facts.push(`${asp.predicateIds.get(input.propertyNames[input.propPred[i]!]!)}(i${input.propSubj[i]},i${input.propObj[i]}).`);
writeFileSync(file, asp.text + facts.join('\n') + '\n');
facts.length = 0;

const ours: number[] = [], theirs: number[] = [];
let entailed = 0, storeBytes = 0, rssGrowth = 0, clingoPeak = 0, anonymous = 0;
for (let r = 0; r < runs; r++) {
  global.gc?.();
  const rss0 = process.memoryUsage().rss, peak0 = process.resourceUsage().maxRSS * 1024;
  const sink = new CountingSink();
  const s = performance.now();
  const outcome = await entail(program, input, sink, { guard: new Guard() });
  ours.push(performance.now() - s);
  const peak1 = process.resourceUsage().maxRSS * 1024;
  rssGrowth = Math.max(rssGrowth, Math.max(peak1 - peak0, process.memoryUsage().rss - rss0));
  entailed = sink.n; storeBytes = outcome.stats.storeBytes; anonymous = outcome.stats.anonymousElements;
  if (outcome.status !== 'ok') console.log('(inconsistent)');
  const c = clingo(file, ['-n', '1']);
  theirs.push(c.ms); clingoPeak = c.peak;
}
rmSync(dir, { recursive: true, force: true });
console.log(`input facts: ${inputFacts}; entailed facts over named individuals: ${entailed}; anonymous elements: ${anonymous}`);
console.log(`engine on the Datalog program: median ${median(ours).toFixed(0)} ms; clingo on the same program (text input, grounding + solving): median ${median(theirs).toFixed(0)} ms (${runs} runs each)`);
console.log(`wall-time ratio engine / clingo: ${(median(ours) / median(theirs)).toFixed(2)} (target ≤ 1.0, aim 0.5)`);
console.log(`memory: fact store ${mib(storeBytes)} = ${(storeBytes / entailed).toFixed(1)} bytes per entailed fact (target ≤ 80); peak RSS growth ${mib(rssGrowth)} = ${(rssGrowth / entailed).toFixed(1)} bytes per fact; clingo peak RSS ${mib(clingoPeak)}`);

if (args.includes('--chase')) {
  const perAxiom = rewriteOntology(normal), times: number[] = [];
  let n = 0, elements = 0;
  for (let r = 0; r < runs; r++) {
    const sink = new CountingSink(), s = performance.now();
    const outcome = await entail(perAxiom, input, sink, { guard: new Guard() });
    times.push(performance.now() - s); n = sink.n; elements = outcome.stats.anonymousElements;
  }
  console.log(`chase path (one rule per axiom, anonymous elements): median ${median(times).toFixed(0)} ms, ${elements} anonymous elements, ${n} facts (${n === entailed ? 'same count' : 'DIFFERENT count'})`);
}
