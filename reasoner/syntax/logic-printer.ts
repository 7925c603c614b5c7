// Prints class expressions, axioms and normal-form axioms in standard description-logic notation (⊑ ⊓ ⊔ ¬ ∃ ∀ ≥ ≤ ⁻), per the DL Handbook, ch. 2.

import type { Axiom, ClassExpression, DataRange, PropertyRef } from '../model/axioms.js';
import { FRESH_PREFIX, FRESH_TOP, type NormalAssertion, type NormalAxiom } from '../model/normal.js';
import { OWL_NOTHING, OWL_THING } from '../model/vocabulary.js';
import { IriShortener, OfnWriter } from './ofn-writer.js';

/**
 * Fresh names print as `$X12` (and FRESH_TOP as `$Top`): `$` cannot start an IRI or a prefixed name in any
 * syntax Thence reads, so a reader never mistakes them for user vocabulary.
 */
export class LogicPrinter {
  private readonly names: IriShortener;
  private readonly ofn: OfnWriter;

  constructor(prefixes: Readonly<Record<string, string>> = {}) {
    this.names = new IriShortener(prefixes);
    this.ofn = new OfnWriter(this.names);
  }

  name(iri: string): string {
    if (iri === OWL_THING) return '⊤';
    if (iri === OWL_NOTHING) return '⊥';
    if (iri === FRESH_TOP) return '$Top';
    if (iri.startsWith(FRESH_PREFIX)) return '$X' + iri.slice(FRESH_PREFIX.length);
    const short = this.names.shorten(iri);
    return short;
  }

  individual(a: string): string {
    return a.startsWith('_:') ? a : this.name(a);
  }

  property(p: PropertyRef): string {
    return this.name(p.name) + (p.inverse ? '⁻' : '');
  }

  private filler(c: ClassExpression): string {
    return this.classExpression(c, true);
  }

  /** `nested` adds parentheses around ⊓ / ⊔ so the output reads unambiguously. */
  classExpression(c: ClassExpression, nested = false): string {
    const wrap = (s: string) => (nested ? `(${s})` : s);
    switch (c.kind) {
      case 'class': return this.name(c.name);
      case 'not': return '¬' + this.classExpression(c.operand, true);
      case 'and': return wrap(c.operands.map((o) => this.classExpression(o, true)).join(' ⊓ '));
      case 'or': return wrap(c.operands.map((o) => this.classExpression(o, true)).join(' ⊔ '));
      case 'oneOf': return `{${c.individuals.map((a) => this.individual(a)).join(', ')}}`;
      case 'some': return `∃${this.property(c.property)}.${this.filler(c.filler)}`;
      case 'all': return `∀${this.property(c.property)}.${this.filler(c.filler)}`;
      case 'hasValue': return `∃${this.property(c.property)}.{${this.individual(c.individual)}}`;
      case 'hasSelf': return `∃${this.property(c.property)}.Self`;
      case 'min': case 'max': case 'exact': {
        const op = c.kind === 'min' ? '≥' : c.kind === 'max' ? '≤' : '=';
        return `${op}${c.n} ${this.property(c.property)}.${c.filler ? this.filler(c.filler) : '⊤'}`;
      }
      case 'dataSome': return `∃${c.properties.map((p) => this.name(p)).join(',')}.${this.dataRange(c.range)}`;
      case 'dataAll': return `∀${c.properties.map((p) => this.name(p)).join(',')}.${this.dataRange(c.range)}`;
      case 'dataHasValue': return `∃${this.name(c.property)}.{${this.ofn.literal(c.value)}}`;
      case 'dataMin': case 'dataMax': case 'dataExact': {
        const op = c.kind === 'dataMin' ? '≥' : c.kind === 'dataMax' ? '≤' : '=';
        return `${op}${c.n} ${this.name(c.property)}.${c.range ? this.dataRange(c.range) : '⊤ᴰ'}`;
      }
    }
  }

  dataRange(d: DataRange): string {
    switch (d.kind) {
      case 'datatype': return this.name(d.name);
      case 'dataAnd': return `(${d.operands.map((o) => this.dataRange(o)).join(' ⊓ ')})`;
      case 'dataOr': return `(${d.operands.map((o) => this.dataRange(o)).join(' ⊔ ')})`;
      case 'dataNot': return '¬' + this.dataRange(d.operand);
      case 'dataOneOf': return `{${d.literals.map((l) => this.ofn.literal(l)).join(', ')}}`;
      case 'datatypeRestriction': return this.ofn.dataRange(d);
    }
  }

  /** One axiom in DL notation where there is one (class and property axioms, assertions); else functional syntax. */
  axiom(a: Axiom): string {
    const ce = (c: ClassExpression) => this.classExpression(c);
    const p = (r: PropertyRef) => this.property(r);
    switch (a.kind) {
      case 'SubClassOf': return `${ce(a.sub)} ⊑ ${ce(a.sup)}`;
      case 'EquivalentClasses': return a.classes.map(ce).join(' ≡ ');
      case 'DisjointClasses': return `${a.classes.map((c) => this.classExpression(c, true)).join(' ⊓ ')} ⊑ ⊥ (pairwise)`;
      case 'DisjointUnion': return `${this.name(a.cls)} ≡ ${a.classes.map((c) => this.classExpression(c, true)).join(' ⊔ ')} (disjoint)`;
      case 'SubObjectPropertyOf': return `${p(a.sub)} ⊑ ${p(a.sup)}`;
      case 'SubObjectPropertyChainOf': return `${a.chain.map(p).join(' ∘ ')} ⊑ ${p(a.sup)}`;
      case 'EquivalentObjectProperties': return a.properties.map(p).join(' ≡ ');
      case 'InverseObjectProperties': return `${p(a.first)} ≡ ${p({ ...a.second, inverse: !a.second.inverse })}`;
      case 'ObjectPropertyDomain': return `∃${p(a.property)}.⊤ ⊑ ${ce(a.cls)}`;
      case 'ObjectPropertyRange': return `⊤ ⊑ ∀${p(a.property)}.${this.filler(a.cls)}`;
      case 'FunctionalObjectProperty': return `⊤ ⊑ ≤1 ${p(a.property)}.⊤`;
      case 'InverseFunctionalObjectProperty': return `⊤ ⊑ ≤1 ${p({ ...a.property, inverse: !a.property.inverse })}.⊤`;
      case 'SymmetricObjectProperty': return `${p(a.property)} ⊑ ${p({ ...a.property, inverse: !a.property.inverse })}`;
      case 'TransitiveObjectProperty': return `${p(a.property)} ∘ ${p(a.property)} ⊑ ${p(a.property)}`;
      case 'ClassAssertion': return `${this.classExpression(a.cls, true)}(${this.individual(a.individual)})`;
      case 'ObjectPropertyAssertion': return `${p(a.property)}(${this.individual(a.subject)}, ${this.individual(a.object)})`;
      case 'NegativeObjectPropertyAssertion': return `¬${p(a.property)}(${this.individual(a.subject)}, ${this.individual(a.object)})`;
      case 'SameIndividual': return a.individuals.map((i) => this.individual(i)).join(' ≈ ');
      case 'DifferentIndividuals': return a.individuals.map((i) => this.individual(i)).join(' ≉ ') + (a.individuals.length > 2 ? ' (pairwise)' : '');
      default: return this.ofn.axiom(a, false);
    }
  }

  /** One normal-form axiom. */
  normalAxiom(x: NormalAxiom): string {
    const f = (filler: string | null, none: string) => (filler === null ? none : this.name(filler));
    switch (x.kind) {
      case 'subsumption': {
        const body = x.body.length ? x.body.map((b) => this.name(b)).join(' ⊓ ') : '⊤';
        const head = x.head.length ? x.head.map((h) => this.name(h)).join(' ⊔ ') : '⊥';
        return `${body} ⊑ ${head}`;
      }
      case 'exists': return `${this.name(x.sub)} ⊑ ∃${this.property(x.property)}.${f(x.filler, '⊤')}`;
      case 'forall': return `${this.name(x.sub)} ⊑ ∀${this.property(x.property)}.${f(x.filler, '⊥')}`;
      case 'atLeast': return `${this.name(x.sub)} ⊑ ≥${x.n} ${this.property(x.property)}.${f(x.filler, '⊤')}`;
      case 'atMost': return `${this.name(x.sub)} ⊑ ≤${x.n} ${this.property(x.property)}.${f(x.filler, '⊤')}`;
      case 'propertyInclusion': return `${this.property(x.sub)} ⊑ ${this.property(x.sup)}`;
      case 'propertyDisjointness': return `${this.property(x.properties[0])} ⊓ ${this.property(x.properties[1])} ⊑ ⊥`;
    }
  }

  normalAssertion(x: NormalAssertion): string {
    switch (x.kind) {
      case 'classAssertion': return `${this.name(x.cls)}(${this.individual(x.individual)})`;
      case 'propertyAssertion': return `${this.name(x.property)}(${this.individual(x.subject)}, ${this.individual(x.object)})`;
      case 'sameIndividual': return `${this.individual(x.a)} ≈ ${this.individual(x.b)}`;
      case 'differentIndividuals': return `${this.individual(x.a)} ≉ ${this.individual(x.b)}`;
    }
  }
}
