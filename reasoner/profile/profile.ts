// ALCHIQ profile check: classifies every logical axiom as Horn-ALCHIQ, ALCHIQ or outside, with reasons and positions; strict or approximate.

import type { AxiomClass, Diagnostic, ProfileEntry, ProfileMode, ProfileReport } from '../api.js';
import type { Axiom, ClassExpression, Ontology, PropertyRef } from '../model/axioms.js';
import { NON_LOGICAL_KINDS, formatPosition } from '../model/axioms.js';
import { OWL_BOTTOM_OBJECT_PROPERTY, OWL_TOP_OBJECT_PROPERTY } from '../model/vocabulary.js';
import { Normaliser, addWithSlice, type Slice } from '../normal/normalise.js';
import { OfnWriter, IriShortener } from '../syntax/ofn-writer.js';

/**
 * What ALCHIQ covers (Carral & Krötzsch, IJCAI 2020, §2): ⊤, ⊥, ¬, ⊓, ⊔, ∃, ∀, ≥n, ≤n over named properties
 * and their inverses, property inclusions, and class/property/equality/inequality assertions. Reasons for
 * "outside" name the missing feature. Horn-ALCHIQ vs ALCHIQ is decided on the axiom's own normal form
 * (the definition: no disjunction, ≤n only with n ≤ 1, after normalisation), so the classification
 * can never disagree with what the normaliser then produces.
 */

export const REASONS = {
  nominals: 'nominals (ObjectOneOf / ObjectHasValue)',
  self: 'self restrictions (ObjectHasSelf)',
  datatypes: 'data properties and datatype restrictions (no datatype reasoning)',
  transitivity: 'transitivity',
  chains: 'property chains',
  reflexive: 'reflexivity (needs self restrictions)',
  irreflexive: 'irreflexivity (needs self restrictions)',
  asymmetric: 'asymmetry (needs property negation)',
  disjointProperties: 'disjoint properties (needs property negation)',
  keys: 'keys (HasKey)',
  universal: 'universal or empty property (owl:topObjectProperty / owl:bottomObjectProperty)',
  disjunction: 'disjunction',
  atMost: 'at-most restriction with n > 1',
  largeCardinality: 'a number restriction above 999, the limit of Thence: its rules grow with n²',
} as const;

/**
 * The largest n of ≥n, ≤n and =n that Thence accepts. The rules grow with n² (≥1000 R: 499 500 inequalities, about
 * 2 s and 330 MB; ≥3000 R: 25 s and 1.8 GB, measured 2 December 2026), so larger ones are refused here, where the
 * message can name the axiom, rather than by the memory guard in the middle of a run.
 */
export const MAX_CARDINALITY = 999;

/** Reasons why a class expression is outside ALCHIQ (empty when inside). */
export function expressionReasons(c: ClassExpression, out: Set<string> = new Set()): Set<string> {
  const stack: ClassExpression[] = [c];
  while (stack.length) {
    const e = stack.pop()!;
    switch (e.kind) {
      case 'class': break;
      case 'not': stack.push(e.operand); break;
      case 'and': case 'or': stack.push(...e.operands); break;
      case 'oneOf': out.add(REASONS.nominals); break;
      case 'hasValue': out.add(REASONS.nominals); propertyReasons(e.property, out); break;
      case 'hasSelf': out.add(REASONS.self); propertyReasons(e.property, out); break;
      case 'some': case 'all': propertyReasons(e.property, out); stack.push(e.filler); break;
      case 'min': case 'max': case 'exact':
        propertyReasons(e.property, out);
        if (e.n > MAX_CARDINALITY) out.add(REASONS.largeCardinality);
        if (e.filler) stack.push(e.filler);
        break;
      default: out.add(REASONS.datatypes);
    }
  }
  return out;
}

function propertyReasons(p: PropertyRef, out: Set<string>): void {
  if (p.name === OWL_TOP_OBJECT_PROPERTY || p.name === OWL_BOTTOM_OBJECT_PROPERTY) out.add(REASONS.universal);
}

/** Reasons why an axiom is outside ALCHIQ (empty when inside). */
export function outsideReasons(a: Axiom): string[] {
  // Common axioms with class names only need no walk at all.
  if (a.kind === 'SubClassOf' && a.sub.kind === 'class' && a.sup.kind === 'class') return [];
  const out = new Set<string>();
  const ces = (cs: readonly ClassExpression[]) => cs.forEach((c) => expressionReasons(c, out));
  switch (a.kind) {
    case 'SubClassOf': ces([a.sub, a.sup]); break;
    case 'EquivalentClasses': case 'DisjointClasses': case 'DisjointUnion': ces(a.classes); break;
    case 'SubObjectPropertyOf': propertyReasons(a.sub, out); propertyReasons(a.sup, out); break;
    case 'SubObjectPropertyChainOf': out.add(REASONS.chains); break;
    case 'EquivalentObjectProperties': a.properties.forEach((p) => propertyReasons(p, out)); break;
    case 'DisjointObjectProperties': out.add(REASONS.disjointProperties); break;
    case 'InverseObjectProperties': propertyReasons(a.first, out); propertyReasons(a.second, out); break;
    case 'ObjectPropertyDomain': case 'ObjectPropertyRange': propertyReasons(a.property, out); ces([a.cls]); break;
    case 'FunctionalObjectProperty': case 'InverseFunctionalObjectProperty': case 'SymmetricObjectProperty': propertyReasons(a.property, out); break;
    case 'TransitiveObjectProperty': out.add(REASONS.transitivity); break;
    case 'ReflexiveObjectProperty': out.add(REASONS.reflexive); break;
    case 'IrreflexiveObjectProperty': out.add(REASONS.irreflexive); break;
    case 'AsymmetricObjectProperty': out.add(REASONS.asymmetric); break;
    case 'SubDataPropertyOf': case 'EquivalentDataProperties': case 'DisjointDataProperties': case 'DataPropertyDomain':
    case 'DataPropertyRange': case 'FunctionalDataProperty': case 'DatatypeDefinition': case 'NegativeDataPropertyAssertion':
      out.add(REASONS.datatypes); break;
    case 'HasKey': out.add(REASONS.keys); break;
    case 'ClassAssertion': ces([a.cls]); break;
    case 'ObjectPropertyAssertion': case 'NegativeObjectPropertyAssertion': propertyReasons(a.property, out); break;
    // DataPropertyAssertion: kept as a fact (no datatype reasoning); SameIndividual/DifferentIndividuals: inside.
    default: break;
  }
  return [...out];
}

/** Horn-ALCHIQ or ALCHIQ, decided on the axiom's own normal form (slice of a Normaliser's output); with the non-Horn reasons. */
function hornOf(n: Normaliser, slice: Slice): { classification: AxiomClass; reasons: string[] } {
  let disjunction = false, atMost = false;
  for (let i = slice[0]; i < slice[1]; i++) {
    const x = n.axioms[i]!;
    if (x.kind === 'subsumption' && x.head.length > 1) disjunction = true;
    else if (x.kind === 'atMost' && x.n > 1) atMost = true;
  }
  if (!disjunction && !atMost) return { classification: 'horn', reasons: [] };
  const reasons: string[] = [];
  if (disjunction) reasons.push(REASONS.disjunction);
  if (atMost) reasons.push(REASONS.atMost);
  return { classification: 'alchiq', reasons };
}

/** Horn-ALCHIQ or ALCHIQ for one axiom on its own. */
export function hornClassification(a: Axiom): { classification: AxiomClass; reasons: string[] } {
  const n = new Normaliser();
  return hornOf(n, addWithSlice(n, a));
}

export interface ProfileResultWithKept extends ProfileReport {
  readonly kept: readonly Axiom[];
}

/**
 * The normal form computed while classifying, kept per ontology so that normalising the kept axioms
 * afterwards only gathers slices (each axiom is normalised once in parse → profile → normalise).
 */
export const normalFormCache = new WeakMap<Ontology, { normaliser: Normaliser; slices: Map<number, Slice> }>();

/** Classifies every logical axiom of the ontology; decides what is kept under the mode. */
export function checkProfile(ontology: Ontology, mode: ProfileMode = 'strict'): ProfileResultWithKept {
  const writer = new OfnWriter(new IriShortener(ontology.prefixes));
  const entries: ProfileEntry[] = [];
  const kept: Axiom[] = [];
  const counts = { horn: 0, alchiq: 0, outside: 0, annotations: 0 };
  const normaliser = new Normaliser();
  const slices = new Map<number, Slice>();
  let dataAssertions = 0;
  for (const a of ontology.axioms) {
    if (NON_LOGICAL_KINDS.has(a.kind)) { counts.annotations++; continue; }
    if (a.kind === 'DataPropertyAssertion') dataAssertions++;
    const outside = outsideReasons(a);
    let verdict: { classification: AxiomClass; reasons: string[] };
    if (outside.length) verdict = { classification: 'outside', reasons: outside };
    else {
      const slice = addWithSlice(normaliser, a);
      slices.set(a.id, slice);
      verdict = hornOf(normaliser, slice);
    }
    counts[verdict.classification]++;
    entries.push({ axiomId: a.id, position: formatPosition(a.position), text: writer.axiom(a, false), classification: verdict.classification, reasons: verdict.reasons });
    if (verdict.classification !== 'outside') kept.push(a);
  }
  normalFormCache.set(ontology, { normaliser, slices });
  const outsideEntries = entries.filter((e) => e.classification === 'outside');
  const warnings: string[] = [];
  const refused = mode === 'strict' && outsideEntries.length > 0;
  if (mode === 'approximate' && outsideEntries.length > 0)
    warnings.push(`${outsideEntries.length} axiom${outsideEntries.length === 1 ? '' : 's'} outside ALCHIQ dropped: answers are sound but may be incomplete.`);
  if (dataAssertions > 0)
    warnings.push(`${dataAssertions} data-property assertion${dataAssertions === 1 ? '' : 's'} kept as facts without datatype reasoning.`);
  const verdict: AxiomClass = refused ? 'outside' : counts.alchiq > 0 ? 'alchiq' : 'horn';
  return {
    mode, verdict, counts, entries,
    dropped: mode === 'approximate' ? outsideEntries : [],
    warnings,
    kept: refused ? [] : kept,
  };
}

/** Diagnostics for a report: an error per outside axiom in strict mode, a warning per dropped one in approximate mode. */
export function profileDiagnostics(report: ProfileReport): Diagnostic[] {
  const out: Diagnostic[] = [];
  for (const e of report.entries) {
    if (e.classification !== 'outside') continue;
    out.push({
      severity: report.mode === 'strict' ? 'error' : 'warning',
      position: e.position,
      message: `${report.mode === 'strict' ? 'outside ALCHIQ' : 'dropped (outside ALCHIQ)'}: ${e.reasons.join(', ')}`,
      axiom: e.text,
    });
  }
  for (const w of report.warnings) out.push({ severity: 'warning', position: '', message: w });
  return out;
}
