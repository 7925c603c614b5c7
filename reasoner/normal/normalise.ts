// Structural transformation of ALCHIQ axioms into the normal-form shapes of model/normal.ts, polarity-aware so the output is linear in the input.

import type { Axiom, ClassExpression, PropertyRef } from '../model/axioms.js';
import { formatPosition } from '../model/axioms.js';
import {
  FRESH_PREFIX, FRESH_TOP, isFreshName,
  type NormalAssertion, type NormalAxiom, type NormalOntology, type SourceRef,
} from '../model/normal.js';
import { OWL_NOTHING, OWL_THING } from '../model/vocabulary.js';
import { literalToNTriples } from '../syntax/terms.js';
import { BOTTOM, TOP, isBottom, isTop, nnf } from './nnf.js';

/**
 * Method: the structural transformation of Plaisted & Greenbaum as used for DLs by Hustadt, Motik & Sattler
 * (JAR 2007, §3: "definitorial" normal form) and Carral & Krötzsch (IJCAI 2020, §2): every complex subexpression
 * gets a fresh name X, defined in one direction only — X ⊑ C where C occurs positively, C ⊑ X where it occurs
 * negatively — so each subexpression is visited once and the output is linear in the input.
 *
 * Unlike the textbook "⊤ ⊑ NNF(¬C ⊔ D)", an axiom is processed as body ⊑ head so that Horn axioms stay Horn:
 * ∃R.C on the left becomes C ⊑ ∀R⁻.X (not ∀R.¬C on the right, which would need a disjunction); a conjunction
 * on the left becomes a body; a disjunction on the left is split. Only constructs whose negation is needed
 * (¬C, ∀, ≥n with n ≥ 2, ≤n on the left) move to the right, where they may force a disjunction — exactly the
 * non-Horn cases.
 *
 * Where a shape needs a class name on its left and the left side is ⊤ (ranges, functionality, ⊤ ⊑ ∃R.B),
 * the fresh name FRESH_TOP is used, defined once by ⊤ ⊑ FRESH_TOP.
 */

export interface NormaliseOptions {
  /** DisjointClasses / DifferentIndividuals with more operands than this use the linear encoding with fresh names (default 4 / 8). */
  readonly pairwiseDisjointLimit?: number;
  readonly pairwiseDifferentLimit?: number;
  /**
   * Called for each fresh class name with what it stands for: 'sub' when only X ⊑ definition is asserted
   * (a positive occurrence), 'super' when only definition ⊑ X is. For tests that check the transformation
   * against a finite model; the normal form does not depend on it.
   */
  readonly onFresh?: (name: string, definition: ClassExpression, polarity: 'sub' | 'super') => void;
}

type Item = ClassExpression;

export class Normaliser {
  readonly axioms: NormalAxiom[] = [];
  readonly assertions: NormalAssertion[] = [];
  readonly dataAssertions: { subject: string; property: string; literal: string; source: SourceRef }[] = [];
  private fresh = 0;
  /** ⊤ ⊑ FRESH_TOP, once some axiom needed FRESH_TOP (kept apart so any subset of axioms can be assembled). */
  topDefinition: NormalAxiom | null = null;
  private source!: SourceRef;

  constructor(private readonly options: NormaliseOptions = {}) {}

  /** Returns a new fresh class name (never an IRI: see FRESH_PREFIX). */
  freshName(): string {
    return FRESH_PREFIX + String(++this.fresh);
  }

  /** A fresh name standing for `definition` in the given direction (reported to options.onFresh). */
  private freshFor(definition: ClassExpression, polarity: 'sub' | 'super'): string {
    const x = this.freshName();
    this.options.onFresh?.(x, definition, polarity);
    return x;
  }

  private top(): string {
    this.topDefinition ??= { kind: 'subsumption', body: [], head: [FRESH_TOP], source: this.source };
    return FRESH_TOP;
  }

  /** Normalises one axiom of ALCHIQ (callers keep outside axioms away: see profile/). */
  add(axiom: Axiom): void {
    this.source = { axiomId: axiom.id, position: formatPosition(axiom.position) };
    switch (axiom.kind) {
      case 'SubClassOf': this.gci(axiom.sub, axiom.sup); break;
      case 'EquivalentClasses': {
        const cs = axiom.classes;
        if (cs.length === 2) { this.gci(cs[0]!, cs[1]!); this.gci(cs[1]!, cs[0]!); }
        else for (let i = 0; i < cs.length; i++) this.gci(cs[i]!, cs[(i + 1) % cs.length]!);   // a cycle of ⊑ is linear
        break;
      }
      case 'DisjointClasses': this.disjoint(axiom.classes.map((c) => nnf(c))); break;
      case 'DisjointUnion': {
        const union: ClassExpression = { kind: 'or', operands: axiom.classes };
        this.gci({ kind: 'class', name: axiom.cls }, union);
        this.gci(union, { kind: 'class', name: axiom.cls });
        this.disjoint(axiom.classes.map((c) => nnf(c)));
        break;
      }
      case 'SubObjectPropertyOf': this.inclusion(axiom.sub, axiom.sup); break;
      case 'EquivalentObjectProperties': {
        const ps = axiom.properties;
        for (let i = 0; i < ps.length; i++) this.inclusion(ps[i]!, ps[(i + 1) % ps.length]!);   // a cycle of ⊑
        break;
      }
      case 'InverseObjectProperties':
        this.inclusion(axiom.first, invert(axiom.second));
        this.inclusion(axiom.second, invert(axiom.first));
        break;
      case 'SymmetricObjectProperty': this.inclusion(axiom.property, invert(axiom.property)); break;
      case 'ObjectPropertyDomain': this.gci({ kind: 'some', property: axiom.property, filler: TOP }, axiom.cls); break;
      case 'ObjectPropertyRange': this.gci(TOP, { kind: 'all', property: axiom.property, filler: axiom.cls }); break;
      case 'FunctionalObjectProperty': this.gci(TOP, { kind: 'max', n: 1, property: axiom.property, filler: null }); break;
      case 'InverseFunctionalObjectProperty': this.gci(TOP, { kind: 'max', n: 1, property: invert(axiom.property), filler: null }); break;
      case 'ClassAssertion': this.classAssertion(axiom.cls, axiom.individual); break;
      case 'ObjectPropertyAssertion': this.propertyAssertion(axiom.property, axiom.subject, axiom.object); break;
      case 'NegativeObjectPropertyAssertion': {
        // ¬R(a, b) ≡ {a} ⊑ ∀R.¬{b}. Without nominals: a fresh Xb with Xb(b), and a ∈ ∀R.¬Xb. Every model of the
        // original extends to one of this (Xb := {b}), and Xb(b) makes ∀R.¬Xb exclude b: a conservative, Horn encoding.
        const xb = this.freshName();
        this.assertions.push({ kind: 'classAssertion', cls: xb, individual: axiom.object, source: this.source });
        this.classAssertion({ kind: 'all', property: axiom.property, filler: { kind: 'not', operand: { kind: 'class', name: xb } } }, axiom.subject);
        break;
      }
      case 'SameIndividual': {
        const is = axiom.individuals;
        for (let i = 0; i + 1 < is.length; i++) this.assertions.push({ kind: 'sameIndividual', a: is[i]!, b: is[i + 1]!, source: this.source });
        break;
      }
      case 'DifferentIndividuals': this.different(axiom.individuals); break;
      case 'DataPropertyAssertion':
        this.dataAssertions.push({ subject: axiom.subject, property: axiom.property, literal: literalToNTriples(axiom.value), source: this.source });
        break;
      default:
        break;   // non-logical axioms (declarations, annotations) have no normal form
    }
  }

  private inclusion(sub: PropertyRef, sup: PropertyRef): void {
    this.axioms.push({ kind: 'propertyInclusion', sub: ref(sub), sup: ref(sup), source: this.source });
  }

  /** C(a): a named class is asserted directly; a complex C gets a fresh X with X(a) and X ⊑ C. */
  private classAssertion(c: ClassExpression, individual: string): void {
    const n = nnf(c);
    if (isTop(n)) return;
    if (n.kind === 'class' && !isBottom(n)) {
      this.assertions.push({ kind: 'classAssertion', cls: n.name, individual, source: this.source });
      return;
    }
    const x = this.freshFor(n, 'sub');
    this.assertions.push({ kind: 'classAssertion', cls: x, individual, source: this.source });
    this.clause([{ kind: 'class', name: x }], [n]);
  }

  /** R(a, b); R⁻(a, b) is written R(b, a). */
  private propertyAssertion(p: PropertyRef, subject: string, object: string): void {
    const [s, o] = p.inverse ? [object, subject] : [subject, object];
    this.assertions.push({ kind: 'propertyAssertion', property: p.name, subject: s, object: o, source: this.source });
  }

  /** Pairwise for a few individuals; beyond, each gets a fresh singleton-like class Di(ai) and the Di are disjoint (linear). */
  private different(individuals: readonly string[]): void {
    if (individuals.length <= (this.options.pairwiseDifferentLimit ?? 8)) {
      for (let i = 0; i < individuals.length; i++)
        for (let j = i + 1; j < individuals.length; j++)
          this.assertions.push({ kind: 'differentIndividuals', a: individuals[i]!, b: individuals[j]!, source: this.source });
      return;
    }
    const classes = individuals.map((a) => {
      const d = this.freshName();
      this.assertions.push({ kind: 'classAssertion', cls: d, individual: a, source: this.source });
      return { kind: 'class', name: d } as ClassExpression;
    });
    this.disjoint(classes);
  }

  /**
   * Pairwise Ci ⊓ Cj ⊑ ⊥ for a few operands; beyond, a linear chain with fresh Pi ⊒ C1 ⊔ … ⊔ Ci:
   * C1 ⊑ P1, Pi−1 ⊓ Ci ⊑ ⊥, Pi−1 ⊑ Pi, Ci ⊑ Pi (Horn; Pi := C1 ∪ … ∪ Ci extends every model).
   */
  private disjoint(classes: readonly ClassExpression[]): void {
    if (classes.length <= (this.options.pairwiseDisjointLimit ?? 4)) {
      for (let i = 0; i < classes.length; i++)
        for (let j = i + 1; j < classes.length; j++) this.clause([classes[i]!, classes[j]!], []);
      return;
    }
    let previous: ClassExpression = this.negativeName(classes[0]!);
    for (let i = 1; i < classes.length; i++) {
      const ci = this.negativeName(classes[i]!);
      this.clause([previous, ci], []);
      if (i + 1 < classes.length) {
        const p: ClassExpression = { kind: 'class', name: this.freshFor({ kind: 'or', operands: [previous, ci] }, 'super') };
        this.clause([previous], [p]);
        this.clause([ci], [p]);
        previous = p;
      }
    }
  }

  /** A class name X with C ⊑ X (C itself when it is a name). */
  private negativeName(c: ClassExpression): ClassExpression {
    if (c.kind === 'class') return c;
    const x: ClassExpression = { kind: 'class', name: this.freshFor(c, 'super') };
    this.clause([c], [x]);
    return x;
  }

  /** sub ⊑ sup. */
  private gci(sub: ClassExpression, sup: ClassExpression): void {
    this.clause([nnf(sub)], [nnf(sup)]);
  }

  /**
   * Normalises B1 ⊓ … ⊓ Bn ⊑ H1 ⊔ … ⊔ Hm where every Bi and Hj is in NNF (Bi as written, not negated).
   * Body items occur negatively, head items positively.
   */
  private clause(body: readonly Item[], head: readonly Item[]): void {
    const bodyNames: string[] = [], headNames: string[] = [], headComplex: Item[] = [];
    const bodyQueue = [...body];
    const headQueue = [...head];
    const single = body.length === 1;
    for (let bi = 0; bi < bodyQueue.length; bi++) {
      const b = bodyQueue[bi]!;
      const restEmpty = bi === bodyQueue.length - 1;
      switch (b.kind) {
        case 'class':
          if (b.name === OWL_NOTHING) return;        // ⊥ ⊓ … ⊑ H holds trivially
          if (b.name !== OWL_THING) bodyNames.push(b.name);
          break;
        case 'and': bodyQueue.push(...b.operands); break;
        case 'or':
          if (single && restEmpty && bodyNames.length === 0) {
            for (const o of b.operands) this.clause([o], [...headQueue]);   // (C ⊔ D) ⊑ H: C ⊑ H and D ⊑ H (H includes items moved right)
            return;
          }
          bodyNames.push(this.nameOfNegative(b));   // (C ⊔ D) ⊓ E ⊑ H: C ⊔ D ⊑ X, X ⊓ E ⊑ H
          break;
        case 'some': {
          // ∃R.C ⊑ X  ⟺  C ⊑ ∀R⁻.X   (the filler goes to the body of the new axiom)
          // Only item on the left, and at most one class name on the right: C ⊑ ∀R⁻.B directly.
          const alone = single && restEmpty && bodyNames.length === 0;
          if (alone && headQueue.length === 1 && isTop(headQueue[0]!)) return;
          const direct = alone && (headQueue.length === 0 || (headQueue.length === 1 && headQueue[0]!.kind === 'class'));
          const target: Item = direct ? (headQueue[0] ?? BOTTOM) : { kind: 'class', name: this.freshFor(b, 'super') };
          this.clause([b.filler], [{ kind: 'all', property: invert(b.property), filler: target }]);
          if (direct) return;
          bodyNames.push((target as { name: string }).name);
          break;
        }
        case 'not':
          if (b.operand.kind === 'class') { headQueue.push(b.operand); break; }
          headQueue.push(nnf(b, true));
          break;
        default:
          headQueue.push(nnf(b, true));   // ∀, ≥n (n ≥ 2), ≤n on the left: moved right as their negation
      }
    }
    for (let hi = 0; hi < headQueue.length; hi++) {
      const h = headQueue[hi]!;
      switch (h.kind) {
        case 'class':
          if (h.name === OWL_THING) return;          // B ⊑ ⊤ ⊔ … holds trivially
          if (h.name !== OWL_NOTHING) headNames.push(h.name);
          break;
        case 'or': headQueue.push(...h.operands); break;
        case 'not':
          if (h.operand.kind === 'class') bodyNames.push(h.operand.name);
          else throw new Error('normalise: construct outside ALCHIQ reached the normaliser');
          break;
        default: headComplex.push(h);
      }
    }
    if (headComplex.length === 1 && headNames.length === 0) {
      const h = headComplex[0]!;
      if (h.kind === 'and') {
        // B ⊑ C1 ⊓ … ⊓ Ck: one axiom per conjunct; a long body is named first so the output stays linear.
        const sub = bodyNames.length > 1 ? [this.bodyName(bodyNames)] : bodyNames;
        for (const o of h.operands) this.clause(sub.map(named), [o]);
        return;
      }
      this.restriction(this.bodyName(bodyNames), h);
      return;
    }
    for (const h of headComplex) {
      const x = this.freshFor(h, 'sub');
      headNames.push(x);
      this.clause([named(x)], [h]);
    }
    this.axioms.push({ kind: 'subsumption', body: dedupe(bodyNames), head: dedupe(headNames), source: this.source });
  }

  /** A name X with C ⊑ X, for a complex body item. */
  private nameOfNegative(c: Item): string {
    const x = this.freshFor(c, 'super');
    this.clause([c], [named(x)]);
    return x;
  }

  /** The one class name standing for a conjunction of body names (FRESH_TOP when empty). */
  private bodyName(names: readonly string[]): string {
    if (names.length === 0) return this.top();
    if (names.length === 1) return names[0]!;
    const x = this.freshFor({ kind: 'and', operands: names.map(named) }, 'super');
    this.axioms.push({ kind: 'subsumption', body: dedupe(names), head: [x], source: this.source });
    return x;
  }

  /** sub ⊑ ∃/∀/≥/≤ R.filler, naming a complex filler (positively, or negatively under ≤). */
  private restriction(sub: string, h: Item): void {
    const source = this.source;
    switch (h.kind) {
      case 'some': this.axioms.push({ kind: 'exists', sub, property: ref(h.property), filler: this.positiveFiller(h.filler), source }); break;
      case 'all': this.axioms.push({ kind: 'forall', sub, property: ref(h.property), filler: isBottom(h.filler) ? null : this.positiveFiller(h.filler), source }); break;
      case 'min': this.axioms.push({ kind: 'atLeast', sub, n: h.n, property: ref(h.property), filler: this.positiveFiller(h.filler ?? TOP), source }); break;
      case 'max': {
        // ≤n R.C with C ⊑ Y: fewer than n+1 Y-successors implies fewer than n+1 C-successors.
        const f = h.filler ?? TOP;
        const filler = isTop(f) ? null : f.kind === 'class' ? f.name : this.nameOfNegative(f);
        this.axioms.push({ kind: 'atMost', sub, n: h.n, property: ref(h.property), filler, source });
        break;
      }
      default: throw new Error(`normalise: unexpected ${h.kind} in a head`);
    }
  }

  /** Name for a filler in positive position: ⊤ is null, a class is itself, else a fresh Y with Y ⊑ C. */
  private positiveFiller(c: Item): string | null {
    if (isTop(c)) return null;
    if (c.kind === 'class') return c.name;
    const y = this.freshFor(c, 'sub');
    this.clause([named(y)], [c]);
    return y;
  }
}

const named = (name: string): ClassExpression => ({ kind: 'class', name });
const invert = (p: PropertyRef): PropertyRef => ({ name: p.name, inverse: !p.inverse });
const ref = (p: PropertyRef): PropertyRef => ({ name: p.name, inverse: p.inverse });
const dedupe = (names: readonly string[]): string[] => (names.length < 2 ? [...names] : [...new Set(names)]);

/** Where one source axiom's output lies in a Normaliser's arrays: [start, end) of axioms, assertions, data assertions. */
export type Slice = readonly [number, number, number, number, number, number];

/** Normalises one axiom and returns its slice. */
export function addWithSlice(n: Normaliser, a: Axiom): Slice {
  const s0 = n.axioms.length, a0 = n.assertions.length, d0 = n.dataAssertions.length;
  n.add(a);
  return [s0, n.axioms.length, a0, n.assertions.length, d0, n.dataAssertions.length];
}

/**
 * Builds the NormalOntology from slices of one Normaliser (the profile check normalises each axiom once;
 * normalising the kept axioms then only gathers their slices), with the user signature.
 */
export function assemble(all: readonly Axiom[], n: Normaliser, slices: readonly Slice[]): NormalOntology {
  const axioms: NormalAxiom[] = [], assertions: NormalAssertion[] = [], dataAssertions: Normaliser['dataAssertions'] = [];
  for (const [s0, s1, a0, a1, d0, d1] of slices) {
    for (let i = s0; i < s1; i++) axioms.push(n.axioms[i]!);
    for (let i = a0; i < a1; i++) assertions.push(n.assertions[i]!);
    for (let i = d0; i < d1; i++) dataAssertions.push(n.dataAssertions[i]!);
  }
  const usesTop = n.topDefinition !== null && axioms.some((x) => x.kind !== 'subsumption' && x.kind !== 'propertyInclusion' && x.kind !== 'propertyDisjointness' && x.sub === FRESH_TOP);
  if (usesTop) axioms.unshift(n.topDefinition!);
  const classes = new Set<string>(), properties = new Set<string>();
  const addClass = (c: string) => { if (!isFreshName(c) && c !== OWL_THING && c !== OWL_NOTHING) classes.add(c); };
  for (const a of all) {
    if (a.kind === 'Declaration' && a.entity === 'Class') addClass(a.iri);
    if (a.kind === 'Declaration' && a.entity === 'ObjectProperty') properties.add(a.iri);
  }
  for (const x of axioms) {
    switch (x.kind) {
      case 'subsumption': x.body.forEach(addClass); x.head.forEach(addClass); break;
      case 'propertyInclusion': properties.add(x.sub.name); properties.add(x.sup.name); break;
      case 'propertyDisjointness': x.properties.forEach((p) => properties.add(p.name)); break;
      default:
        addClass(x.sub); if (x.filler) addClass(x.filler);
        properties.add(x.property.name);
    }
  }
  for (const a of assertions) {
    if (a.kind === 'classAssertion') addClass(a.cls);
    if (a.kind === 'propertyAssertion') properties.add(a.property);
  }
  return { axioms, classes: [...classes], properties: [...properties], assertions, dataAssertions };
}

/** Normal form of the kept axioms, with the user signature (declared or used classes and object properties). */
export function normaliseAxioms(all: readonly Axiom[], kept: readonly Axiom[], options: NormaliseOptions = {}): NormalOntology {
  const n = new Normaliser(options);
  return assemble(all, n, kept.map((a) => addWithSlice(n, a)));
}
