// Turns an RDF graph into OWL 2 axioms: the reverse of the W3C OWL 2 Mapping to RDF Graphs (§3: Tables 8–18; axiom annotations §3.2.5).

import type { Annotation, AnnotationValue, AxiomInit, ClassExpression, DataRange, Literal, Ontology, Position, PropertyRef } from '../model/axioms.js';
import { OWL, RDF, RDFS, RDF_FIRST, RDF_NIL, RDF_REST, RDF_TYPE, XSD, isReservedIri } from '../model/vocabulary.js';
import { BUILTIN_ANNOTATION, CHARACTERISTIC, ENTITY_TYPES, GENERATOR_TYPES, STRUCTURAL, STRUCTURAL_TYPES, o } from './rdf-owl-vocabulary.js';
import { RdfSyntaxError, tripleText, type RdfTerm, type RdfTriple } from './rdf-graph.js';

const MAX_DEPTH = 1000;
const REIFICATION = new Set([o('annotatedSource'), o('annotatedProperty'), o('annotatedTarget')]);

/** Maps a graph to an ontology. Throws RdfSyntaxError naming the triple for malformed structures (bad lists, cycles). */
export function rdfToOntology(triples: readonly RdfTriple[], source: string, format: Ontology['format'], prefixes: Record<string, string> = {}): Ontology {
  // Triples must carry their index (the parsers in rdf-graph.ts number them); renumber if a caller did not.
  const indexed = triples.every((t, i) => t.i === i) ? triples : triples.map((t, i) => ({ ...t, i }));
  return new ReverseMapping(indexed, source).run(format, prefixes);
}

type Triple = RdfTriple;
const NONE: readonly Triple[] = [];

/** Marks of triples consumed by some axiom: one byte per triple rather than a Set of objects. */
class UsedTriples {
  private readonly marks: Uint8Array;
  constructor(size: number) { this.marks = new Uint8Array(size); }
  add(t: Triple): void { this.marks[t.i] = 1; }
  has(t: Triple): boolean { return this.marks[t.i] === 1; }
}

class ReverseMapping {
  private readonly bySubject = new Map<string, Triple[]>();
  private readonly used: UsedTriples;
  /** Blank nodes typed as axiom generators (owl:AllDisjointClasses, owl:Axiom, …): their triples are not axioms themselves. */
  private readonly generators = new Set<string>();
  private readonly axioms: AxiomInit[] = [];
  private readonly types = new Map<string, Set<string>>();
  private readonly literalValued = new Set<string>();
  private readonly reified = new Map<string, Annotation[]>();
  private readonly classCache = new Map<string, ClassExpression>();
  private readonly visiting = new Set<string>();
  private readonly warnings: string[] = [];

  constructor(private readonly triples: readonly Triple[], private readonly source: string) {
    this.used = new UsedTriples(triples.length);
    for (const t of triples) {
      let list = this.bySubject.get(t.s);
      if (!list) this.bySubject.set(t.s, (list = []));
      list.push(t);
      if (t.p === RDF_TYPE && t.o.kind === 'iri') {
        let set = this.types.get(t.s);
        if (!set) this.types.set(t.s, (set = new Set()));
        set.add(t.o.key);
        if (GENERATOR_TYPES.has(t.o.key) && t.s.startsWith('_:')) this.generators.add(t.s);
      }
      if (t.o.kind === 'literal' && !isReservedIri(t.p)) this.literalValued.add(t.p);
    }
  }

  private pos(t: Triple): Position {
    return { source: this.source, line: t.line, column: 0, triple: tripleText(t) };
  }

  private fail(t: Triple | undefined, message: string): never {
    throw Object.assign(new RdfSyntaxError(t ? `${message} (triple ${tripleText(t)})` : message, t?.line ?? 0), { triple: t ? tripleText(t) : undefined });
  }

  private has(s: string, type: string): boolean {
    return this.types.get(s)?.has(type) ?? false;
  }

  private objects(s: string, p: string): Triple[] {
    const out: Triple[] = [];
    for (const t of this.bySubject.get(s) ?? NONE) if (t.p === p) out.push(t);
    return out;
  }

  /** The single object of (s, p) or undefined; marks the triple used. */
  private one(s: string, p: string): Triple | undefined {
    let found: Triple | undefined;
    for (const t of this.bySubject.get(s) ?? NONE) {
      if (t.p !== p) continue;
      if (found) this.fail(t, `more than one ${short(p)} on ${s}`);
      found = t;
    }
    if (found) this.used.add(found);
    return found;
  }

  private markType(s: string, type: string): void {
    for (const t of this.objects(s, RDF_TYPE)) if (t.o.key === type) this.used.add(t);
  }

  /** Reads an RDF list (rdf:first / rdf:rest … rdf:nil), marking its triples used. */
  private list(node: RdfTerm, at: Triple): RdfTerm[] {
    const items: RdfTerm[] = [];
    const seen = new Set<string>();
    let cur = node;
    while (!(cur.kind === 'iri' && cur.key === RDF_NIL)) {
      if (cur.kind !== 'blank') this.fail(at, 'expected an RDF list (blank nodes with rdf:first and rdf:rest)');
      if (seen.has(cur.key)) this.fail(at, 'cyclic RDF list');
      seen.add(cur.key);
      const first = this.one(cur.key, RDF_FIRST), rest = this.one(cur.key, RDF_REST);
      if (!first || !rest) this.fail(at, `malformed RDF list at ${cur.key}: rdf:first and rdf:rest expected`);
      this.markType(cur.key, RDF + 'List');
      items.push(first.o);
      cur = rest.o;
    }
    return items;
  }

  private isDatatype(key: string): boolean {
    return key.startsWith(XSD) || key === RDFS + 'Literal' || key === RDF + 'PlainLiteral' || key === RDF + 'langString'
      || key === RDF + 'XMLLiteral' || key === RDF + 'HTML' || this.has(key, RDFS + 'Datatype');
  }

  private isDataProperty(p: string): boolean {
    if (this.has(p, o('DatatypeProperty'))) return true;
    if (this.has(p, o('ObjectProperty')) || this.isAnnotationProperty(p)) return false;
    return this.literalValued.has(p);
  }

  private isAnnotationProperty(p: string): boolean {
    return BUILTIN_ANNOTATION.has(p) || this.has(p, o('AnnotationProperty'));
  }

  /** ObjectPropertyExpression (Table 11): an IRI, or a blank node with owl:inverseOf. */
  private property(node: RdfTerm, at: Triple): PropertyRef {
    if (node.kind === 'iri') return { name: node.key, inverse: false };
    if (node.kind === 'blank') {
      const inv = this.one(node.key, o('inverseOf'));
      if (inv && inv.o.kind === 'iri') return { name: inv.o.key, inverse: true };
    }
    return this.fail(at, 'expected an object property (an IRI or a blank node with owl:inverseOf)');
  }

  private literal(node: RdfTerm, at: Triple): Literal {
    if (node.kind !== 'literal') this.fail(at, 'expected a literal');
    return node.literal;
  }

  private count(node: RdfTerm, at: Triple): number {
    const l = this.literal(node, at);
    if (!/^\+?[0-9]+$/.test(l.lexical.trim())) this.fail(at, 'expected a non-negative integer');
    const n = Number(l.lexical.trim());
    if (!Number.isSafeInteger(n) || n > 0x7fffffff) this.fail(at, 'cardinality too large');
    return n;
  }

  /** DataRange (Table 12). */
  private dataRange(node: RdfTerm, at: Triple): DataRange {
    if (node.kind === 'iri') return { kind: 'datatype', name: node.key };
    if (node.kind !== 'blank') this.fail(at, 'expected a data range');
    const b = node.key;
    this.markType(b, RDFS + 'Datatype');
    let t: Triple | undefined;
    if ((t = this.one(b, o('intersectionOf')))) return { kind: 'dataAnd', operands: this.list(t.o, t).map((x) => this.dataRange(x, t!)) };
    if ((t = this.one(b, o('unionOf')))) return { kind: 'dataOr', operands: this.list(t.o, t).map((x) => this.dataRange(x, t!)) };
    if ((t = this.one(b, o('datatypeComplementOf')))) return { kind: 'dataNot', operand: this.dataRange(t.o, t) };
    if ((t = this.one(b, o('oneOf')))) return { kind: 'dataOneOf', literals: this.list(t.o, t).map((x) => this.literal(x, t!)) };
    if ((t = this.one(b, o('onDatatype')))) {
      const w = this.one(b, o('withRestrictions'));
      if (!w || t.o.kind !== 'iri') this.fail(t, 'DatatypeRestriction needs owl:onDatatype and owl:withRestrictions');
      const facets = this.list(w.o, w).map((f) => {
        const ft = f.kind === 'blank' ? (this.bySubject.get(f.key) ?? []) : [];
        if (ft.length !== 1) this.fail(w, 'each facet restriction is a blank node with one facet triple');
        this.used.add(ft[0]!);
        return { facet: ft[0]!.p, value: this.literal(ft[0]!.o, ft[0]!) };
      });
      return { kind: 'datatypeRestriction', datatype: t.o.key, facets };
    }
    return this.fail(at, `blank node ${b} is not a data range`);
  }

  /** ClassExpression (Table 13), memoised per blank node; cycles are errors. */
  private classExpression(node: RdfTerm, at: Triple): ClassExpression {
    if (node.kind === 'iri') return { kind: 'class', name: node.key };
    if (node.kind !== 'blank') this.fail(at, 'expected a class expression, found a literal');
    const cached = this.classCache.get(node.key);
    if (cached) return cached;
    if (this.visiting.has(node.key)) this.fail(at, `class expression ${node.key} refers to itself`);
    // The same cap as the functional-syntax parser: later stages recurse over expressions.
    if (this.visiting.size >= MAX_DEPTH) this.fail(at, `class expressions nested deeper than ${MAX_DEPTH} levels`);
    this.visiting.add(node.key);
    const c = this.readClassExpression(node.key, at);
    this.visiting.delete(node.key);
    this.classCache.set(node.key, c);
    return c;
  }

  private readClassExpression(b: string, at: Triple): ClassExpression {
    let t: Triple | undefined;
    this.markType(b, o('Class'));
    if ((t = this.one(b, o('intersectionOf')))) return { kind: 'and', operands: this.list(t.o, t).map((x) => this.classExpression(x, t!)) };
    if ((t = this.one(b, o('unionOf')))) return { kind: 'or', operands: this.list(t.o, t).map((x) => this.classExpression(x, t!)) };
    if ((t = this.one(b, o('complementOf')))) return { kind: 'not', operand: this.classExpression(t.o, t) };
    if ((t = this.one(b, o('oneOf')))) return { kind: 'oneOf', individuals: this.list(t.o, t).map((x) => individual(x, t!, this)) };
    const onProperty = this.one(b, o('onProperty')), onProperties = this.one(b, o('onProperties'));
    if (!onProperty && !onProperties) return this.fail(at, `blank node ${b} is not a class expression`);
    this.markType(b, o('Restriction'));
    if (onProperties) {
      const properties = this.list(onProperties.o, onProperties).map((p) => p.key);
      const some = this.one(b, o('someValuesFrom')), all = this.one(b, o('allValuesFrom'));
      const r = some ?? all;
      if (!r) this.fail(onProperties, 'owl:onProperties needs owl:someValuesFrom or owl:allValuesFrom');
      return { kind: some ? 'dataSome' : 'dataAll', properties, range: this.dataRange(r.o, r) };
    }
    const p = onProperty!;
    const data = p.o.kind === 'iri' && this.isDataProperty(p.o.key);
    const pname = p.o.key;
    const valueOf = (word: string) => this.one(b, o(word));
    if ((t = valueOf('someValuesFrom')) || (t = valueOf('allValuesFrom'))) {
      const some = t.p === o('someValuesFrom');
      if (data || (t.o.kind === 'iri' && this.isDatatype(t.o.key)) || (t.o.kind === 'blank' && this.has(t.o.key, RDFS + 'Datatype')))
        return { kind: some ? 'dataSome' : 'dataAll', properties: [pname], range: this.dataRange(t.o, t) };
      return { kind: some ? 'some' : 'all', property: this.property(p.o, p), filler: this.classExpression(t.o, t) };
    }
    if ((t = valueOf('hasValue'))) {
      if (t.o.kind === 'literal') return { kind: 'dataHasValue', property: pname, value: t.o.literal };
      return { kind: 'hasValue', property: this.property(p.o, p), individual: individual(t.o, t, this) };
    }
    if ((t = valueOf('hasSelf'))) return { kind: 'hasSelf', property: this.property(p.o, p) };
    for (const [word, kind] of [['minCardinality', 'min'], ['maxCardinality', 'max'], ['cardinality', 'exact'],
      ['minQualifiedCardinality', 'min'], ['maxQualifiedCardinality', 'max'], ['qualifiedCardinality', 'exact']] as const) {
      if (!(t = valueOf(word))) continue;
      const n = this.count(t.o, t);
      const onClass = /qualified/i.test(word) ? this.one(b, o('onClass')) : undefined;
      const onRange = /qualified/i.test(word) ? this.one(b, o('onDataRange')) : undefined;
      if (onRange || (data && !onClass)) {
        const dk = kind === 'min' ? 'dataMin' : kind === 'max' ? 'dataMax' : 'dataExact';
        return { kind: dk, n, property: pname, range: onRange ? this.dataRange(onRange.o, onRange) : null };
      }
      return { kind, n, property: this.property(p.o, p), filler: onClass ? this.classExpression(onClass.o, onClass) : null };
    }
    return this.fail(p, `restriction ${b} has owl:onProperty but no owl:someValuesFrom, owl:allValuesFrom, owl:hasValue, owl:hasSelf or cardinality`);
  }

  /**
   * Annotations written on an ontology header, an owl:Axiom node or an axiom blank node: every remaining triple
   * outside the reserved vocabulary (Mapping §3.2.2, §3.2.5) — so undeclared properties such as dc:creator count too.
   */
  private annotationsOn(node: string): Annotation[] {
    const out: Annotation[] = [];
    for (const t of this.bySubject.get(node) ?? []) {
      if (this.used.has(t) || t.p === RDF_TYPE || REIFICATION.has(t.p)) continue;
      if (isReservedIri(t.p) && !BUILTIN_ANNOTATION.has(t.p)) continue;
      this.used.add(t);
      out.push({ property: t.p, value: annotationValue(t.o), annotations: [] });
    }
    return out;
  }

  run(format: Ontology['format'], prefixes: Record<string, string>): Ontology {
    // Axiom annotations (§3.2.5): x rdf:type owl:Axiom; owl:annotatedSource s; owl:annotatedProperty p; owl:annotatedTarget o.
    for (const [s, set] of this.types) {
      if (!set.has(o('Axiom')) && !set.has(o('Annotation'))) continue;
      const src = this.one(s, o('annotatedSource')), p = this.one(s, o('annotatedProperty')), tgt = this.one(s, o('annotatedTarget'));
      this.markType(s, o('Axiom')); this.markType(s, o('Annotation'));
      if (!src || !p || !tgt) continue;
      this.reified.set(`${src.o.key} ${p.o.key} ${tgt.o.key}`, this.annotationsOn(s));
    }
    let iri: string | undefined, versionIri: string | undefined;
    const imports: string[] = [], ontologyAnnotations: Annotation[] = [];
    for (const [s, set] of this.types) {
      if (!set.has(o('Ontology'))) continue;
      this.markType(s, o('Ontology'));
      if (!s.startsWith('_:')) iri ??= s;
      const v = this.one(s, o('versionIRI'));
      if (v) versionIri = v.o.key;
      for (const t of this.objects(s, o('imports'))) { this.used.add(t); imports.push(t.o.key); }
      ontologyAnnotations.push(...this.annotationsOn(s));
    }
    for (const t of this.triples) {
      if (this.used.has(t)) continue;
      if (this.generators.has(t.s)) continue;
      if (t.s.startsWith('_:') && (STRUCTURAL.has(t.p) || (t.p === RDF_TYPE && (STRUCTURAL_TYPES.has(t.o.key) || GENERATOR_TYPES.has(t.o.key))))) continue;
      if (REIFICATION.has(t.p)) continue;
      this.axiomFrom(t);
    }
    for (const t of this.triples) {
      if (this.used.has(t) || !(t.p === RDF_TYPE && GENERATOR_TYPES.has(t.o.key))) continue;
      this.generator(t);
    }
    // Anything structural nobody referred to (e.g. a lonely restriction) is reported, not silently lost.
    for (const t of this.triples) {
      if (!this.used.has(t) && !(t.p === RDF_TYPE && (t.o.key === o('Axiom') || t.o.key === o('Annotation'))))
        this.warnings.push(`triple not part of any axiom: ${tripleText(t)}`);
    }
    const axioms = this.axioms.map((a, id) => ({ ...a, id })) as unknown as Ontology['axioms'];
    return { source: this.source, format, iri, versionIri, imports, annotations: ontologyAnnotations, axioms, prefixes, warnings: this.warnings };
  }

  private push(t: Triple, axiom: Record<string, unknown>): void {
    this.used.add(t);
    const annotations = this.reified.size ? this.reified.get(`${t.s} ${t.p} ${t.o.key}`) ?? [] : [];
    this.axioms.push({ ...axiom, position: this.pos(t), annotations } as unknown as AxiomInit);
  }

  /** One axiom from one main triple (Tables 16–18). */
  private axiomFrom(t: Triple): void {
    const s: RdfTerm = { kind: t.s.startsWith('_:') ? 'blank' : 'iri', key: t.s } as RdfTerm;
    const ce = (n: RdfTerm) => this.classExpression(n, t);
    switch (t.p) {
      case RDF_TYPE: {
        const entity = ENTITY_TYPES[t.o.key];
        if (entity && s.kind === 'iri') return this.push(t, { kind: 'Declaration', entity, iri: t.s });
        if (t.o.key === o('FunctionalProperty'))
          return this.push(t, this.isDataProperty(t.s) ? { kind: 'FunctionalDataProperty', property: t.s } : { kind: 'FunctionalObjectProperty', property: this.property(s, t) });
        if (CHARACTERISTIC[t.o.key]) return this.push(t, { kind: CHARACTERISTIC[t.o.key], property: this.property(s, t) });
        if (t.o.kind === 'iri' && isReservedIri(t.o.key) && t.o.key !== o('Thing') && t.o.key !== o('Nothing')) {
          if (t.o.key === RDFS + 'Class' || t.o.key === RDF + 'Property') return void this.used.add(t);   // RDFS typing: no OWL meaning
          return;   // reported as unused
        }
        return this.push(t, { kind: 'ClassAssertion', cls: ce(t.o), individual: t.s });
      }
      case RDFS + 'subClassOf': return this.push(t, { kind: 'SubClassOf', sub: ce(s), sup: ce(t.o) });
      case o('equivalentClass'):
        if (this.isDatatype(t.s) || (t.o.kind === 'blank' && this.has(t.o.key, RDFS + 'Datatype')))
          return this.push(t, { kind: 'DatatypeDefinition', datatype: t.s, range: this.dataRange(t.o, t) });
        return this.push(t, { kind: 'EquivalentClasses', classes: [ce(s), ce(t.o)] });
      case o('disjointWith'): return this.push(t, { kind: 'DisjointClasses', classes: [ce(s), ce(t.o)] });
      case o('disjointUnionOf'): return this.push(t, { kind: 'DisjointUnion', cls: t.s, classes: this.list(t.o, t).map(ce) });
      case RDFS + 'subPropertyOf':
        if (this.isAnnotationProperty(t.s)) return this.push(t, { kind: 'SubAnnotationPropertyOf', sub: t.s, sup: t.o.key });
        if (this.isDataProperty(t.s) || this.isDataProperty(t.o.key)) return this.push(t, { kind: 'SubDataPropertyOf', sub: t.s, sup: t.o.key });
        return this.push(t, { kind: 'SubObjectPropertyOf', sub: this.property(s, t), sup: this.property(t.o, t) });
      case o('propertyChainAxiom'):
        return this.push(t, { kind: 'SubObjectPropertyChainOf', chain: this.list(t.o, t).map((x) => this.property(x, t)), sup: this.property(s, t) });
      case o('equivalentProperty'):
        if (this.isDataProperty(t.s) || this.isDataProperty(t.o.key)) return this.push(t, { kind: 'EquivalentDataProperties', properties: [t.s, t.o.key] });
        return this.push(t, { kind: 'EquivalentObjectProperties', properties: [this.property(s, t), this.property(t.o, t)] });
      case o('propertyDisjointWith'):
        if (this.isDataProperty(t.s) || this.isDataProperty(t.o.key)) return this.push(t, { kind: 'DisjointDataProperties', properties: [t.s, t.o.key] });
        return this.push(t, { kind: 'DisjointObjectProperties', properties: [this.property(s, t), this.property(t.o, t)] });
      case o('inverseOf'): return this.push(t, { kind: 'InverseObjectProperties', first: this.property(s, t), second: this.property(t.o, t) });
      case RDFS + 'domain':
        if (this.isAnnotationProperty(t.s)) return this.push(t, { kind: 'AnnotationPropertyDomain', property: t.s, iri: t.o.key });
        if (this.isDataProperty(t.s)) return this.push(t, { kind: 'DataPropertyDomain', property: t.s, cls: ce(t.o) });
        return this.push(t, { kind: 'ObjectPropertyDomain', property: this.property(s, t), cls: ce(t.o) });
      case RDFS + 'range':
        if (this.isAnnotationProperty(t.s)) return this.push(t, { kind: 'AnnotationPropertyRange', property: t.s, iri: t.o.key });
        if (this.isDataProperty(t.s) || (t.o.kind === 'iri' && this.isDatatype(t.o.key)) || (t.o.kind === 'blank' && this.has(t.o.key, RDFS + 'Datatype')))
          return this.push(t, { kind: 'DataPropertyRange', property: t.s, range: this.dataRange(t.o, t) });
        return this.push(t, { kind: 'ObjectPropertyRange', property: this.property(s, t), cls: ce(t.o) });
      case o('hasKey'): {
        const keys = this.list(t.o, t);
        return this.push(t, {
          kind: 'HasKey', cls: ce(s),
          objectProperties: keys.filter((k) => !(k.kind === 'iri' && this.isDataProperty(k.key))).map((k) => this.property(k, t)),
          dataProperties: keys.filter((k) => k.kind === 'iri' && this.isDataProperty(k.key)).map((k) => k.key),
        });
      }
      case o('sameAs'): return this.push(t, { kind: 'SameIndividual', individuals: [t.s, individual(t.o, t, this)] });
      case o('differentFrom'): return this.push(t, { kind: 'DifferentIndividuals', individuals: [t.s, individual(t.o, t, this)] });
    }
    if (isReservedIri(t.p) && !BUILTIN_ANNOTATION.has(t.p)) return;   // reported as unused
    if (this.isAnnotationProperty(t.p) || this.isSchemaEntity(t.s) && !this.has(t.p, o('ObjectProperty')) && !this.has(t.p, o('DatatypeProperty')))
      return this.push(t, { kind: 'AnnotationAssertion', property: t.p, subject: t.s, value: annotationValue(t.o) });
    if (t.o.kind === 'literal') return this.push(t, { kind: 'DataPropertyAssertion', property: t.p, subject: t.s, value: t.o.literal });
    return this.push(t, { kind: 'ObjectPropertyAssertion', property: { name: t.p, inverse: false }, subject: t.s, object: t.o.key });
  }

  /** Classes, properties and datatypes (by their typing triples): a non-annotation predicate on them is an annotation (punning aside). */
  private isSchemaEntity(s: string): boolean {
    const set = this.types.get(s);
    if (!set) return false;
    for (const type of set) if (type !== o('NamedIndividual') && ENTITY_TYPES[type]) return true;
    return false;
  }

  /** Axioms written as a typed blank node with members (Table 18: owl:AllDisjointClasses, owl:AllDifferent, …, owl:NegativePropertyAssertion). */
  private generator(t: Triple): void {
    const b = t.s;
    this.used.add(t);
    const annotations = this.annotationsOn(b);
    const push = (axiom: Record<string, unknown>) => this.axioms.push({ ...axiom, position: this.pos(t), annotations } as unknown as AxiomInit);
    const members = () => {
      const m = this.one(b, o('members')) ?? this.one(b, o('distinctMembers'));
      if (!m) this.fail(t, `${short(t.o.key)} needs owl:members`);
      return { list: this.list(m.o, m), at: m };
    };
    switch (t.o.key) {
      case o('AllDisjointClasses'): { const { list, at } = members(); return void push({ kind: 'DisjointClasses', classes: list.map((x) => this.classExpression(x, at)) }); }
      case o('AllDisjointProperties'): {
        const { list, at } = members();
        if (list.some((x) => x.kind === 'iri' && this.isDataProperty(x.key))) return void push({ kind: 'DisjointDataProperties', properties: list.map((x) => x.key) });
        return void push({ kind: 'DisjointObjectProperties', properties: list.map((x) => this.property(x, at)) });
      }
      case o('AllDifferent'): { const { list, at } = members(); return void push({ kind: 'DifferentIndividuals', individuals: list.map((x) => individual(x, at, this)) }); }
      case o('NegativePropertyAssertion'): {
        const src = this.one(b, o('sourceIndividual')), p = this.one(b, o('assertionProperty'));
        const target = this.one(b, o('targetIndividual')), value = this.one(b, o('targetValue'));
        if (!src || !p || (!target && !value)) this.fail(t, 'owl:NegativePropertyAssertion needs owl:sourceIndividual, owl:assertionProperty and a target');
        if (value) return void push({ kind: 'NegativeDataPropertyAssertion', property: p.o.key, subject: src.o.key, value: this.literal(value.o, value) });
        return void push({ kind: 'NegativeObjectPropertyAssertion', property: this.property(p.o, p), subject: individual(src.o, src, this), object: individual(target!.o, target!, this) });
      }
    }
  }

  /** Exposed for `individual()`. */
  failAt(t: Triple, message: string): never {
    return this.fail(t, message);
  }
}

function individual(node: RdfTerm, at: Triple, m: ReverseMapping): string {
  if (node.kind === 'literal') m.failAt(at, 'expected an individual, found a literal');
  return node.key;
}

function annotationValue(node: RdfTerm): AnnotationValue {
  if (node.kind === 'literal') return { kind: 'literal', literal: node.literal };
  if (node.kind === 'blank') return { kind: 'anonymous', id: node.key };
  return { kind: 'iri', iri: node.key };
}

function short(iri: string): string {
  return iri.startsWith(OWL) ? 'owl:' + iri.slice(OWL.length) : iri.startsWith(RDFS) ? 'rdfs:' + iri.slice(RDFS.length) : iri;
}
