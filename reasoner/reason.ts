// Orchestration of one reasoning run: intake (parse, profile, normal form, datasets) → rewriting → chase → facts,
// with progress by stage, cancellation through an AbortSignal and resource guards.

import type { Counts, Diagnostic, Explanation, FactSink, ReasonOptions, ReasonResult, Stage } from './api.js';
import { InputError, addAssertionsToAbox, loadDatasets, loadOntology, normalise, profile } from './intake.js';
import { TermDictionary, termKind } from './model/dictionary.js';
import { Abox } from './model/abox.js';
import { isFreshName, type NormalOntology } from './model/normal.js';
import { OWL_BOTTOM_OBJECT_PROPERTY, OWL_NOTHING, OWL_SAME_AS, OWL_THING, OWL_TOP_OBJECT_PROPERTY, RDF_TYPE } from './model/vocabulary.js';
import { rewriteOntology, rewritingStats } from './rewrite/rules-from-normal.js';
import { hornProgramWithinLimits } from './rewrite/horn/index.js';
import { rewriteToTerminatingRules } from './rewrite/disjunctive/index.js';
import { printRule } from './rules/print.js';
import type { Rule, RuleProgram } from './rules/types.js';
import { entail, type ClashReport } from './chase/entail.js';
import { CancelledError, Guard, ResourceLimitError } from './chase/guard.js';
import { buildChaseInput, FactBuffer } from './chase/input.js';

import { availableParallelism } from 'node:os';

const now = () => performance.now();

/** Waits for the next macrotask, so that an abort requested meanwhile is seen. */
const yieldToEvents = () => new Promise<void>((resolve) => setImmediate(resolve));

/**
 * Computes Ent(O, D) and streams it to `sink` (only once the whole computation succeeded, so that an inconsistent
 * or cancelled run writes nothing). Facts: `<a> rdf:type <C>`, `<a> <R> <b>`, and owl:sameAs both ways.
 */
export async function reason(options: ReasonOptions, sink: FactSink): Promise<ReasonResult> {
  const { signal } = options;
  const timings: Record<string, number> = {};
  const diagnostics: Diagnostic[] = [];
  let stage: Stage = 'parse', t0 = now();
  const enter = (next: Stage) => {
    timings[stage] = (timings[stage] ?? 0) + now() - t0;
    stage = next; t0 = now();
    options.onProgress?.({ stage, fraction: 0 });
    if (signal?.aborted) throw new CancelledError();
  };
  try {
    options.onProgress?.({ stage: 'parse', fraction: 0 });
    const loaded = await loadOntology(options.ontology, { signal });
    diagnostics.push(...loaded.diagnostics);
    const dictionary = new TermDictionary(), abox = new Abox();
    const ds = await loadDatasets(options.datasets, dictionary, abox, { signal, onProgress: options.onProgress });
    diagnostics.push(...ds.diagnostics);
    enter('profile');
    const report = profile(loaded.ontology, options.mode ?? 'strict');
    if (report.verdict === 'outside') {
      const { kept: _kept, ...profileReport } = report;
      return { status: 'outsideProfile', profile: profileReport, diagnostics };
    }
    const { kept, ...profileReport } = report;
    enter('normalise');
    const normal = normalise(loaded.ontology, kept);
    addAssertionsToAbox(normal, dictionary, abox);
    abox.trim();

    enter('rewrite');
    const perAxiom = rewriteOntology(normal);
    // Horn: the Datalog rewriting (README, "Horn path"), unless asked for the chase or over the saturation's limits.
    const program = options.path === 'rewriting' ? rewriteToTerminatingRules(normal)
      : perAxiom.horn && options.path !== 'chase' ? hornProgramWithinLimits(normal)?.program ?? perAxiom : perAxiom;
    const stats = rewritingStats(program, normal.axioms.length);
    const programText = program.rules.map((r) => printRule(r)).join('\n');
    const axiomText = new Map(report.entries.map((e) => [e.axiomId, { position: e.position, text: e.text }]));

    enter('materialise');
    const input = buildChaseInput(dictionary, abox, declaredIndividuals(loaded.ontology.axioms, dictionary));
    const chaseProgram = withDataVocabulary(program, normal, input.classNames, input.propertyNames);
    const guard = new Guard(options.limits, signal);
    const buffer = new FactBuffer();
    const outcome = await entail(chaseProgram, input, buffer, {
      guard, threads: options.threads ?? availableParallelism(), limits: options.limits, signal,
      onComponent: async (done, total) => { options.onProgress?.({ stage: 'materialise', fraction: 0.9 * done / total }); await yieldToEvents(); },
    });
    if (options.path === 'rewriting' && outcome.stats.copiedMerges > 0) {
      diagnostics.push({ severity: 'warning', position: options.ontology.path, message: `the published rewriting's chase merged elements holding copied successor edges (${outcome.stats.copiedMerges} merges over all branches); its exactness argument does not cover such merges, so these facts are checked only by the tests that compare this path with the default one (reasoner/README.md, "The published rewriting")` });
    }
    if (outcome.status === 'inconsistent') {
      const explanation = explain(outcome.clash, chaseProgram.rules, input, dictionary, axiomText);
      return { status: 'inconsistent', profile: profileReport, rewriting: stats, program: programText, explanation, diagnostics };
    }
    const counts = await writeFacts(buffer, input, dictionary, abox, sink, signal, (f) => options.onProgress?.({ stage: 'materialise', fraction: 0.9 + 0.1 * f }));
    timings.materialise = (timings.materialise ?? 0) + now() - t0;
    timings.anonymousElements = outcome.stats.anonymousElements;
    timings.branches = outcome.stats.branches;
    if (options.path === 'rewriting') timings.copiedMerges = outcome.stats.copiedMerges;
    timings.components = outcome.stats.components;
    timings.threads = outcome.stats.threads;
    options.onProgress?.({ stage: 'materialise', fraction: 1 });
    return { status: 'ok', profile: profileReport, rewriting: stats, program: programText, counts, timings, diagnostics };
  } catch (error) {
    if (error instanceof InputError) return { status: 'inputError', diagnostics: [...diagnostics, ...error.diagnostics] };
    if (error instanceof CancelledError || (error instanceof Error && error.name === 'AbortError')) return { status: 'cancelled' };
    if (error instanceof ResourceLimitError) return { status: 'resourceLimit', message: error.message };
    throw error;
  }
}

function declaredIndividuals(axioms: readonly { kind: string; entity?: string; iri?: string }[], dictionary: TermDictionary): number[] {
  const out: number[] = [];
  for (const a of axioms) if (a.kind === 'Declaration' && a.entity === 'NamedIndividual' && a.iri) out.push(dictionary.intern(a.iri));
  return out;
}

/**
 * The chase reads facts of every class and property that occurs in the data too (they are output as entailed
 * facts even if the ontology never names them). owl:Nothing and owl:bottomObjectProperty facts are contradictions.
 */
function withDataVocabulary(program: RuleProgram, normal: NormalOntology, classes: readonly string[], properties: readonly string[]): RuleProgram {
  const extra: Rule[] = [];
  if (classes.includes(OWL_NOTHING)) extra.push({ body: [{ predicate: OWL_NOTHING, args: ['x'] }], head: [], source: null });
  if (properties.includes(OWL_BOTTOM_OBJECT_PROPERTY)) extra.push({ body: [{ predicate: OWL_BOTTOM_OBJECT_PROPERTY, args: ['x', 'y'] }], head: [], source: null });
  return {
    rules: [...program.rules, ...extra],
    classes: [...new Set([...normal.classes, ...classes])],
    properties: [...new Set([...normal.properties, ...properties])],
    horn: program.horn,
    blocking: program.blocking,
  };
}

/** True for what is output: a named individual (an IRI, not a blank node nor a literal). */
const isNamed = (term: string) => termKind(term) === 'iri';
/** True for a predicate that is output (user vocabulary, not owl:Thing nor owl:topObjectProperty). */
const isOutputPredicate = (p: string) => !isFreshName(p) && p !== OWL_THING && p !== OWL_TOP_OBJECT_PROPERTY && p !== OWL_NOTHING && p !== OWL_BOTTOM_OBJECT_PROPERTY;

async function writeFacts(buffer: FactBuffer, input: ReturnType<typeof buildChaseInput>, dictionary: TermDictionary, abox: Abox, sink: FactSink, signal: AbortSignal | undefined, progress: (f: number) => void): Promise<Counts> {
  // Everything per predicate and per individual is decided once, so the loop per fact is lookups in arrays.
  const terms = input.individualTerms, n = terms.length;
  const names: string[] = new Array(n), named = new Uint8Array(n);
  for (let i = 0; i < n; i++) { names[i] = dictionary.term(terms[i]!); named[i] = isNamed(names[i]!) ? 1 : 0; }
  const asserted = input.assertedSet;
  const perPredicate: Record<string, { asserted: number; entailed: number }> = {};
  let assertedFacts = 0, entailedFacts = 0, written = 0;
  const total = buffer.size;
  const pause = async () => { progress(written / total); await yieldToEvents(); if (signal?.aborted) throw new CancelledError(); };
  const counter = (p: string) => (perPredicate[p] ??= { asserted: 0, entailed: 0 });

  const unaryOut = buffer.unaryNames.map(isOutputPredicate), unaryTerm = buffer.unaryNames.map((c) => dictionary.id(c));
  const unaryCount = buffer.unaryNames.map(counter);
  const uc = buffer.unaryColumns();
  for (let i = 0; i < uc.length; i++) {
    const cls = uc.pred[i]!, ind = uc.ind[i]!;
    if (!unaryOut[cls] || !named[ind]) continue;
    const a = asserted.has(0, unaryTerm[cls]!, terms[ind]!);
    const c = unaryCount[cls]!; c.entailed++; if (a) c.asserted++;
    const r = sink.write(names[ind]!, RDF_TYPE, buffer.unaryNames[cls]!, a);
    if (r) await r;
    if ((++written & 65535) === 0) await pause();
  }
  const binaryOut = buffer.binaryNames.map(isOutputPredicate), binaryTerm = buffer.binaryNames.map((p) => 1 + dictionary.id(p));
  const binaryCount = buffer.binaryNames.map(counter);
  const bc = buffer.binaryColumns();
  for (let i = 0; i < bc.length; i++) {
    const prop = bc.pred[i]!, s = bc.subj[i]!, o = bc.obj[i]!;
    if (!binaryOut[prop] || !named[s] || !named[o]) continue;
    const a = binaryTerm[prop]! > 0 && asserted.has(binaryTerm[prop]!, terms[s]!, terms[o]!);
    const c = binaryCount[prop]!; c.entailed++; if (a) c.asserted++;
    const r = sink.write(names[s]!, buffer.binaryNames[prop]!, names[o]!, a);
    if (r) await r;
    if ((++written & 65535) === 0) await pause();
  }
  const sameCount = counter(OWL_SAME_AS);
  for (const [x, y] of buffer.sameFacts()) {
    if (!named[x] || !named[y]) continue;
    const a = asserted.has(-1, terms[x]!, terms[y]!) || asserted.has(-1, terms[y]!, terms[x]!);
    sameCount.entailed++; if (a) sameCount.asserted++;
    const r = sink.write(names[x]!, OWL_SAME_AS, names[y]!, a);
    if (r) await r;
    if ((++written & 65535) === 0) await pause();
  }
  for (const [p, c] of Object.entries(perPredicate)) {
    if (c.entailed === 0) delete perPredicate[p];
    else { entailedFacts += c.entailed; assertedFacts += c.asserted; }
  }
  let individuals = 0;
  for (let i = 0; i < n; i++) individuals += named[i]!;
  return { assertedFacts, entailedFacts, perPredicate, individuals, dataPropertyFacts: abox.dataFactCount };
}

/** The clash as text: its facts in N-Triples-like form and the axioms (with positions) of the rules involved. */
function explain(clash: ClashReport | null, rules: readonly Rule[], input: ReturnType<typeof buildChaseInput>, dictionary: TermDictionary,
  axiomText: Map<number, { position: string; text: string }>): Explanation {
  if (clash === null) return { facts: [], axioms: [{ position: '', text: 'every branch of the disjunctive chase derived ⊥' }] };
  const element = (e: number) => (e >= 0 ? `<${dictionary.term(input.individualTerms[e]!)}>` : `_:anonymous${-e}`);
  const name = (p: string) => (isFreshName(p) ? `[internal class ${p.slice(p.indexOf(':') + 1)}]` : `<${p}>`);
  const facts = clash.facts.filter((f) => f.predicate !== '⊤').map((f) =>
    f.args.length === 1 ? `${element(f.args[0]!)} <${RDF_TYPE}> ${name(f.predicate)}` : f.predicate === '≉' ? `${element(f.args[0]!)} <http://www.w3.org/2002/07/owl#differentFrom> ${element(f.args[1]!)}` : `${element(f.args[0]!)} ${name(f.predicate)} ${element(f.args[1]!)}`);
  const axioms: { position: string; text: string }[] = [];
  const seen = new Set<number>();
  for (const r of [clash.rule, ...clash.facts.map((f) => f.derivedBy)]) {
    const source = r >= 0 ? rules[r]?.source : null;
    if (!source || seen.has(source.axiomId)) continue;
    seen.add(source.axiomId);
    axioms.push(axiomText.get(source.axiomId) ?? { position: source.position, text: printRule(rules[r]!) });
  }
  if (axioms.length === 0 && clash.rule >= 0 && rules[clash.rule]?.source === null) axioms.push({ position: '', text: `${printRule(rules[clash.rule]!)} (owl:Nothing and owl:bottomObjectProperty are empty)` });
  return { facts, axioms };
}
