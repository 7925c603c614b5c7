// Writes axioms, class expressions and whole ontologies in OWL 2 Functional-Style Syntax (the inverse of ofn-parser.ts).

import type { Annotation, AnnotationValue, Axiom, ClassExpression, DataRange, Literal, Ontology, PropertyRef } from '../model/axioms.js';
import { RDF_LANG_STRING, STANDARD_PREFIXES, XSD_STRING } from '../model/vocabulary.js';

/** Shortens IRIs with a prefix table, choosing the longest namespace whose remainder is a plain local name. */
export class IriShortener {
  private readonly entries: [string, string][];

  constructor(prefixes: Readonly<Record<string, string>> = {}) {
    const all = { ...STANDARD_PREFIXES, ...prefixes };
    this.entries = Object.entries(all).sort((a, b) => b[1].length - a[1].length);
  }

  private readonly cache = new Map<string, string>();

  /** Returns `prefix:local` when a prefix fits, else `<iri>` (memoised: IRIs repeat). */
  shorten(iri: string): string {
    let short = this.cache.get(iri);
    if (short === undefined) {
      short = this.compute(iri);
      if (this.cache.size < 1 << 20) this.cache.set(iri, short);
    }
    return short;
  }

  private compute(iri: string): string {
    for (const [prefix, ns] of this.entries) {
      if (iri.startsWith(ns)) {
        const local = iri.slice(ns.length);
        if (/^(?:[A-Za-z0-9_](?:[\w\-.]*[\w\-])?)?$/.test(local)) return prefix + local;
      }
    }
    return `<${iri}>`;
  }
}

/** Writes a quoted string: only `"` and `\` are escaped (OWL 2 FS §2.3). */
export function quoteString(s: string): string {
  return '"' + s.replace(/[\\"]/g, (c) => '\\' + c) + '"';
}

export class OfnWriter {
  constructor(private readonly names: IriShortener = new IriShortener()) {}

  iri(iri: string): string {
    return this.names.shorten(iri);
  }

  individual(a: string): string {
    return a.startsWith('_:') ? a : this.iri(a);
  }

  literal(l: Literal): string {
    if (l.lang !== undefined && l.datatype === RDF_LANG_STRING) return `${quoteString(l.lexical)}@${l.lang}`;
    if (l.datatype === XSD_STRING) return quoteString(l.lexical);
    return `${quoteString(l.lexical)}^^${this.iri(l.datatype)}`;
  }

  property(p: PropertyRef): string {
    return p.inverse ? `ObjectInverseOf(${this.iri(p.name)})` : this.iri(p.name);
  }

  dataRange(d: DataRange): string {
    switch (d.kind) {
      case 'datatype': return this.iri(d.name);
      case 'dataAnd': return `DataIntersectionOf(${d.operands.map((o) => this.dataRange(o)).join(' ')})`;
      case 'dataOr': return `DataUnionOf(${d.operands.map((o) => this.dataRange(o)).join(' ')})`;
      case 'dataNot': return `DataComplementOf(${this.dataRange(d.operand)})`;
      case 'dataOneOf': return `DataOneOf(${d.literals.map((l) => this.literal(l)).join(' ')})`;
      case 'datatypeRestriction':
        return `DatatypeRestriction(${this.iri(d.datatype)} ${d.facets.map((f) => `${this.iri(f.facet)} ${this.literal(f.value)}`).join(' ')})`;
    }
  }

  classExpression(c: ClassExpression): string {
    switch (c.kind) {
      case 'class': return this.iri(c.name);
      case 'not': return `ObjectComplementOf(${this.classExpression(c.operand)})`;
      case 'and': return `ObjectIntersectionOf(${c.operands.map((o) => this.classExpression(o)).join(' ')})`;
      case 'or': return `ObjectUnionOf(${c.operands.map((o) => this.classExpression(o)).join(' ')})`;
      case 'oneOf': return `ObjectOneOf(${c.individuals.map((a) => this.individual(a)).join(' ')})`;
      case 'some': return `ObjectSomeValuesFrom(${this.property(c.property)} ${this.classExpression(c.filler)})`;
      case 'all': return `ObjectAllValuesFrom(${this.property(c.property)} ${this.classExpression(c.filler)})`;
      case 'hasValue': return `ObjectHasValue(${this.property(c.property)} ${this.individual(c.individual)})`;
      case 'hasSelf': return `ObjectHasSelf(${this.property(c.property)})`;
      case 'min': case 'max': case 'exact': {
        const word = c.kind === 'min' ? 'ObjectMinCardinality' : c.kind === 'max' ? 'ObjectMaxCardinality' : 'ObjectExactCardinality';
        return `${word}(${c.n} ${this.property(c.property)}${c.filler ? ' ' + this.classExpression(c.filler) : ''})`;
      }
      case 'dataSome': case 'dataAll':
        return `${c.kind === 'dataSome' ? 'DataSomeValuesFrom' : 'DataAllValuesFrom'}(${c.properties.map((p) => this.iri(p)).join(' ')} ${this.dataRange(c.range)})`;
      case 'dataHasValue': return `DataHasValue(${this.iri(c.property)} ${this.literal(c.value)})`;
      case 'dataMin': case 'dataMax': case 'dataExact': {
        const word = c.kind === 'dataMin' ? 'DataMinCardinality' : c.kind === 'dataMax' ? 'DataMaxCardinality' : 'DataExactCardinality';
        return `${word}(${c.n} ${this.iri(c.property)}${c.range ? ' ' + this.dataRange(c.range) : ''})`;
      }
    }
  }

  annotationValue(v: AnnotationValue): string {
    return v.kind === 'iri' ? this.iri(v.iri) : v.kind === 'anonymous' ? v.id : this.literal(v.literal);
  }

  annotation(a: Annotation): string {
    const inner = a.annotations.map((x) => this.annotation(x) + ' ').join('');
    return `Annotation(${inner}${this.iri(a.property)} ${this.annotationValue(a.value)})`;
  }

  /** Writes one axiom; `withAnnotations: false` leaves out axiom annotations (for short report lines). */
  axiom(a: Axiom, withAnnotations = true): string {
    const ann = withAnnotations ? a.annotations.map((x) => this.annotation(x) + ' ').join('') : '';
    const ces = (cs: readonly ClassExpression[]) => cs.map((c) => this.classExpression(c)).join(' ');
    const body = ((): string => {
      switch (a.kind) {
        case 'Declaration': return `${a.entity}(${this.iri(a.iri)})`;
        case 'SubClassOf': return `${this.classExpression(a.sub)} ${this.classExpression(a.sup)}`;
        case 'EquivalentClasses': case 'DisjointClasses': return ces(a.classes);
        case 'DisjointUnion': return `${this.iri(a.cls)} ${ces(a.classes)}`;
        case 'SubObjectPropertyOf': return `${this.property(a.sub)} ${this.property(a.sup)}`;
        case 'SubObjectPropertyChainOf': return `ObjectPropertyChain(${a.chain.map((p) => this.property(p)).join(' ')}) ${this.property(a.sup)}`;
        case 'EquivalentObjectProperties': case 'DisjointObjectProperties': return a.properties.map((p) => this.property(p)).join(' ');
        case 'InverseObjectProperties': return `${this.property(a.first)} ${this.property(a.second)}`;
        case 'ObjectPropertyDomain': case 'ObjectPropertyRange': return `${this.property(a.property)} ${this.classExpression(a.cls)}`;
        case 'FunctionalObjectProperty': case 'InverseFunctionalObjectProperty': case 'ReflexiveObjectProperty': case 'IrreflexiveObjectProperty':
        case 'SymmetricObjectProperty': case 'AsymmetricObjectProperty': case 'TransitiveObjectProperty':
          return this.property(a.property);
        case 'SubDataPropertyOf': return `${this.iri(a.sub)} ${this.iri(a.sup)}`;
        case 'EquivalentDataProperties': case 'DisjointDataProperties': return a.properties.map((p) => this.iri(p)).join(' ');
        case 'DataPropertyDomain': return `${this.iri(a.property)} ${this.classExpression(a.cls)}`;
        case 'DataPropertyRange': return `${this.iri(a.property)} ${this.dataRange(a.range)}`;
        case 'FunctionalDataProperty': return this.iri(a.property);
        case 'DatatypeDefinition': return `${this.iri(a.datatype)} ${this.dataRange(a.range)}`;
        case 'HasKey':
          return `${this.classExpression(a.cls)} (${a.objectProperties.map((p) => this.property(p)).join(' ')}) (${a.dataProperties.map((p) => this.iri(p)).join(' ')})`;
        case 'SameIndividual': case 'DifferentIndividuals': return a.individuals.map((i) => this.individual(i)).join(' ');
        case 'ClassAssertion': return `${this.classExpression(a.cls)} ${this.individual(a.individual)}`;
        case 'ObjectPropertyAssertion': case 'NegativeObjectPropertyAssertion':
          return `${this.property(a.property)} ${this.individual(a.subject)} ${this.individual(a.object)}`;
        case 'DataPropertyAssertion': case 'NegativeDataPropertyAssertion':
          return `${this.iri(a.property)} ${this.individual(a.subject)} ${this.literal(a.value)}`;
        case 'AnnotationAssertion': return `${this.iri(a.property)} ${this.individual(a.subject)} ${this.annotationValue(a.value)}`;
        case 'SubAnnotationPropertyOf': return `${this.iri(a.sub)} ${this.iri(a.sup)}`;
        case 'AnnotationPropertyDomain': case 'AnnotationPropertyRange': return `${this.iri(a.property)} ${this.iri(a.iri)}`;
      }
    })();
    const keyword = a.kind === 'SubObjectPropertyChainOf' ? 'SubObjectPropertyOf' : a.kind;
    return a.kind === 'Declaration' ? `Declaration(${ann}${body})` : `${keyword}(${ann}${body})`;
  }

  /** Writes a whole ontology document with its prefixes. */
  ontology(o: Ontology): string {
    const lines: string[] = [];
    for (const [p, ns] of Object.entries(o.prefixes)) lines.push(`Prefix(${p}=<${ns}>)`);
    const head = [o.iri ? `<${o.iri}>` : '', o.versionIri ? `<${o.versionIri}>` : ''].filter(Boolean).join(' ');
    lines.push(`Ontology(${head}`);
    for (const i of o.imports) lines.push(`Import(<${i}>)`);
    for (const a of o.annotations) lines.push(this.annotation(a));
    for (const a of o.axioms) lines.push(this.axiom(a));
    lines.push(')');
    return lines.join('\n') + '\n';
  }
}
