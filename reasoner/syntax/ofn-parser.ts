// Parses an OWL 2 Functional-Style Syntax document (W3C OWL 2 Structural Specification §3–§11) into the axiom model, with positions.

import type { Annotation, AnnotationValue, AxiomInit, ClassExpression, DataRange, EntityKind, Literal, Ontology, PropertyRef } from '../model/axioms.js';
import { RDF_LANG_STRING, STANDARD_PREFIXES, XSD_STRING } from '../model/vocabulary.js';
import { OfnLexer, SyntaxError, describeToken, type Token } from './ofn-lexer.js';

export { SyntaxError as OfnSyntaxError } from './ofn-lexer.js';

export interface OfnParseOptions {
  /** Deepest nesting of class expressions / data ranges accepted (default 1000): refuses stack-exhausting inputs. */
  readonly maxDepth?: number;
  readonly maxTokenLength?: number;
  /** Called for constructs read but not supported (e.g. DLSafeRule), which are skipped. */
  readonly onWarning?: (message: string, line: number, column: number) => void;
}

const ENTITY_KINDS = new Set<string>(['Class', 'Datatype', 'ObjectProperty', 'DataProperty', 'AnnotationProperty', 'NamedIndividual']);
const CHARACTERISTICS = new Set<string>([
  'FunctionalObjectProperty', 'InverseFunctionalObjectProperty', 'ReflexiveObjectProperty', 'IrreflexiveObjectProperty',
  'SymmetricObjectProperty', 'AsymmetricObjectProperty', 'TransitiveObjectProperty',
]);
/** Extensions of the syntax that Thence reads past (with a warning) rather than refusing the file. */
const SKIPPED = new Set<string>(['DLSafeRule', 'DescriptionGraph']);

/** Parses a whole document. Throws OfnSyntaxError (line, column) at the first fault. */
export function parseOfn(text: string, source: string, options: OfnParseOptions = {}): Ontology {
  return new OfnParser(text, source, options).document();
}

class OfnParser {
  private readonly lexer: OfnLexer;
  private readonly prefixes: Record<string, string> = { ...STANDARD_PREFIXES };
  private readonly declared: Record<string, string> = {};
  private readonly axioms: AxiomInit[] = [];
  private readonly maxDepth: number;
  private depth = 0;

  constructor(text: string, private readonly source: string, private readonly options: OfnParseOptions) {
    this.lexer = new OfnLexer(text, { maxTokenLength: options.maxTokenLength });
    this.maxDepth = options.maxDepth ?? 1000;
  }

  private fail(token: Token, expected: string): never {
    throw new SyntaxError(`expected ${expected}, found ${describeToken(token)}`, token.line, token.column);
  }

  /** Consumes a token of the given type or fails naming what was expected. */
  private expect(type: Token['type'], expected: string): Token {
    const t = this.lexer.next();
    if (t.type !== type) this.fail(t, expected);
    return t;
  }

  private keyword(word: string): Token {
    const t = this.lexer.next();
    if (t.type !== 'keyword' || t.value !== word) this.fail(t, `"${word}"`);
    return t;
  }

  /** ontologyDocument := { prefixDeclaration } Ontology   (§3.7) */
  document(): Ontology {
    while (this.lexer.peek().type === 'keyword' && this.lexer.peek().value === 'Prefix') {
      this.lexer.next();
      this.expect('open', '"(" after Prefix');
      const name = this.expect('prefixedName', 'a prefix name such as "ex:"');
      if (!name.value.endsWith(':') || name.value.indexOf(':') !== name.value.length - 1) this.fail(name, 'a prefix name ending in ":"');
      this.expect('equals', '"="');
      const iri = this.expect('fullIRI', 'a full IRI in angle brackets');
      this.expect('close', '")"');
      this.prefixes[name.value] = iri.value;
      this.declared[name.value] = iri.value;
    }
    const start = this.keyword('Ontology');
    this.expect('open', '"(" after Ontology');
    let iri: string | undefined, versionIri: string | undefined;
    if (this.isIriNext()) {
      iri = this.iri();
      if (this.isIriNext()) versionIri = this.iri();
    }
    const imports: string[] = [];
    while (this.peekKeyword('Import')) {
      this.lexer.next();
      this.expect('open', '"(" after Import');
      imports.push(this.iri());
      this.expect('close', '")"');
    }
    const annotations = this.annotations();
    while (this.lexer.peek().type !== 'close') {
      if (this.lexer.peek().type === 'eof') this.fail(this.lexer.peek(), `")" closing the Ontology opened at line ${start.line}`);
      this.axiom();
    }
    this.lexer.next();
    const end = this.lexer.next();
    if (end.type !== 'eof') this.fail(end, 'end of input after the Ontology');
    return {
      source: this.source, format: 'ofn', iri, versionIri, imports, annotations,
      axioms: this.axioms as unknown as Ontology['axioms'],
      prefixes: { ...this.declared },
    };
  }

  private peekKeyword(word: string): boolean {
    const t = this.lexer.peek();
    return t.type === 'keyword' && t.value === word;
  }

  private isIriNext(): boolean {
    const t = this.lexer.peek().type;
    return t === 'fullIRI' || t === 'prefixedName';
  }

  /** IRI := fullIRI | abbreviatedIRI   (§2.3); prefixes expand per §3.7. */
  private iri(): string {
    const t = this.lexer.next();
    if (t.type === 'fullIRI') return t.value;
    if (t.type === 'prefixedName') return this.expand(t);
    return this.fail(t, 'an IRI');
  }

  private expand(t: Token): string {
    const colon = t.value.indexOf(':');
    const ns = this.prefixes[t.value.slice(0, colon + 1)];
    if (ns === undefined) throw new SyntaxError(`undeclared prefix "${t.value.slice(0, colon + 1)}"`, t.line, t.column);
    // PN_LOCAL_ESC: a backslash escapes a reserved character.
    const local = t.value.slice(colon + 1);
    return ns + (local.includes('\\') ? local.replace(/\\(.)/g, '$1') : local);
  }

  /** Individual := NamedIndividual | AnonymousIndividual   (§5.6) */
  private individual(): string {
    const t = this.lexer.peek();
    if (t.type === 'nodeID') { this.lexer.next(); return t.value; }
    if (t.type === 'fullIRI' || t.type === 'prefixedName') return this.iri();
    return this.fail(t, 'an individual (an IRI or a blank node "_:x")');
  }

  /** Literal := typedLiteral | stringLiteralNoLanguage | stringLiteralWithLanguage   (§5.7) */
  private literal(): Literal {
    const t = this.expect('string', 'a literal in double quotes');
    const next = this.lexer.peek();
    if (next.type === 'caret') {
      this.lexer.next();
      return { lexical: t.value, datatype: this.iri() };
    }
    if (next.type === 'langTag') {
      this.lexer.next();
      return { lexical: t.value, datatype: RDF_LANG_STRING, lang: next.value.toLowerCase() };
    }
    return { lexical: t.value, datatype: XSD_STRING };
  }

  /** Annotation := 'Annotation' '(' annotationAnnotations AnnotationProperty AnnotationValue ')'   (§10.1) */
  private annotations(): Annotation[] {
    const out: Annotation[] = [];
    while (this.peekKeyword('Annotation')) {
      this.lexer.next();
      this.expect('open', '"(" after Annotation');
      const annotations = this.annotations();
      const property = this.iri();
      const value = this.annotationValue();
      this.expect('close', '")" closing Annotation');
      out.push({ property, value, annotations });
    }
    return out;
  }

  private annotationValue(): AnnotationValue {
    const t = this.lexer.peek();
    if (t.type === 'string') return { kind: 'literal', literal: this.literal() };
    if (t.type === 'nodeID') { this.lexer.next(); return { kind: 'anonymous', id: t.value }; }
    if (t.type === 'fullIRI' || t.type === 'prefixedName') return { kind: 'iri', iri: this.iri() };
    return this.fail(t, 'an annotation value (an IRI, a blank node or a literal)');
  }

  private annotationSubject(): string {
    const t = this.lexer.peek();
    if (t.type === 'nodeID') { this.lexer.next(); return t.value; }
    return this.iri();
  }

  private enter(t: Token): void {
    if (++this.depth > this.maxDepth) throw new SyntaxError(`expressions nested deeper than ${this.maxDepth} levels`, t.line, t.column);
  }

  /** ObjectPropertyExpression := ObjectProperty | 'ObjectInverseOf' '(' ObjectProperty ')'   (§6.1) */
  private objectProperty(): PropertyRef {
    if (this.peekKeyword('ObjectInverseOf')) {
      this.lexer.next();
      this.expect('open', '"(" after ObjectInverseOf');
      const name = this.iri();
      this.expect('close', '")" closing ObjectInverseOf');
      return { name, inverse: true };
    }
    const t = this.lexer.peek();
    if (t.type !== 'fullIRI' && t.type !== 'prefixedName') this.fail(t, 'an object property (an IRI or ObjectInverseOf(…))');
    return { name: this.iri(), inverse: false };
  }

  /** ClassExpression   (§8) */
  private classExpression(): ClassExpression {
    const t = this.lexer.peek();
    if (t.type === 'fullIRI' || t.type === 'prefixedName') return { kind: 'class', name: this.iri() };
    if (t.type !== 'keyword') return this.fail(t, 'a class expression');
    this.lexer.next();
    this.enter(t);
    this.expect('open', `"(" after ${t.value}`);
    let result: ClassExpression;
    switch (t.value) {
      case 'ObjectIntersectionOf': case 'ObjectUnionOf': {
        const operands = this.classExpressions(2, t.value);
        result = { kind: t.value === 'ObjectIntersectionOf' ? 'and' : 'or', operands };
        break;
      }
      case 'ObjectComplementOf': result = { kind: 'not', operand: this.classExpression() }; break;
      case 'ObjectOneOf': {
        const individuals: string[] = [this.individual()];
        while (this.lexer.peek().type !== 'close') individuals.push(this.individual());
        result = { kind: 'oneOf', individuals };
        break;
      }
      case 'ObjectSomeValuesFrom': case 'ObjectAllValuesFrom': {
        const property = this.objectProperty();
        result = { kind: t.value === 'ObjectSomeValuesFrom' ? 'some' : 'all', property, filler: this.classExpression() };
        break;
      }
      case 'ObjectHasValue': { const property = this.objectProperty(); result = { kind: 'hasValue', property, individual: this.individual() }; break; }
      case 'ObjectHasSelf': result = { kind: 'hasSelf', property: this.objectProperty() }; break;
      case 'ObjectMinCardinality': case 'ObjectMaxCardinality': case 'ObjectExactCardinality': {
        const n = this.cardinality();
        const property = this.objectProperty();
        const filler = this.lexer.peek().type === 'close' ? null : this.classExpression();
        result = { kind: t.value === 'ObjectMinCardinality' ? 'min' : t.value === 'ObjectMaxCardinality' ? 'max' : 'exact', n, property, filler };
        break;
      }
      case 'DataSomeValuesFrom': case 'DataAllValuesFrom': {
        // DataPropertyExpression { DataPropertyExpression } DataRange: the last argument is the range.
        const args: (string | DataRange)[] = [];
        while (this.lexer.peek().type !== 'close') args.push(this.isIriNext() ? this.iri() : this.dataRange());
        if (args.length < 2) this.fail(this.lexer.peek(), 'a data property and a data range');
        const last = args.pop()!;
        const range: DataRange = typeof last === 'string' ? { kind: 'datatype', name: last } : last;
        if (args.some((a) => typeof a !== 'string')) this.fail(t, 'data properties before the data range');
        result = { kind: t.value === 'DataSomeValuesFrom' ? 'dataSome' : 'dataAll', properties: args as string[], range };
        break;
      }
      case 'DataHasValue': { const property = this.iri(); result = { kind: 'dataHasValue', property, value: this.literal() }; break; }
      case 'DataMinCardinality': case 'DataMaxCardinality': case 'DataExactCardinality': {
        const n = this.cardinality();
        const property = this.iri();
        const range = this.lexer.peek().type === 'close' ? null : this.dataRange();
        result = { kind: t.value === 'DataMinCardinality' ? 'dataMin' : t.value === 'DataMaxCardinality' ? 'dataMax' : 'dataExact', n, property, range };
        break;
      }
      default: return this.fail(t, 'a class expression (a class IRI, ObjectIntersectionOf, ObjectSomeValuesFrom, …)');
    }
    this.expect('close', `")" closing ${t.value}`);
    this.depth--;
    return result;
  }

  private classExpressions(min: number, inside: string): ClassExpression[] {
    const out: ClassExpression[] = [];
    while (this.lexer.peek().type !== 'close') out.push(this.classExpression());
    if (out.length < min) this.fail(this.lexer.peek(), `at least ${min} class expressions in ${inside}`);
    return out;
  }

  private cardinality(): number {
    const t = this.expect('integer', 'a non-negative integer');
    const n = Number(t.value);
    if (!Number.isSafeInteger(n) || n > 0x7fffffff) throw new SyntaxError(`cardinality ${t.value.slice(0, 30)} is too large`, t.line, t.column);
    return n;
  }

  /** DataRange   (§7) */
  private dataRange(): DataRange {
    const t = this.lexer.peek();
    if (t.type === 'fullIRI' || t.type === 'prefixedName') return { kind: 'datatype', name: this.iri() };
    if (t.type !== 'keyword') return this.fail(t, 'a data range');
    this.lexer.next();
    this.enter(t);
    this.expect('open', `"(" after ${t.value}`);
    let result: DataRange;
    switch (t.value) {
      case 'DataIntersectionOf': case 'DataUnionOf': {
        const operands: DataRange[] = [];
        while (this.lexer.peek().type !== 'close') operands.push(this.dataRange());
        if (operands.length < 2) this.fail(this.lexer.peek(), `at least 2 data ranges in ${t.value}`);
        result = { kind: t.value === 'DataIntersectionOf' ? 'dataAnd' : 'dataOr', operands };
        break;
      }
      case 'DataComplementOf': result = { kind: 'dataNot', operand: this.dataRange() }; break;
      case 'DataOneOf': {
        const literals: Literal[] = [this.literal()];
        while (this.lexer.peek().type !== 'close') literals.push(this.literal());
        result = { kind: 'dataOneOf', literals };
        break;
      }
      case 'DatatypeRestriction': {
        const datatype = this.iri();
        const facets: { facet: string; value: Literal }[] = [];
        do facets.push({ facet: this.iri(), value: this.literal() }); while (this.lexer.peek().type !== 'close');
        result = { kind: 'datatypeRestriction', datatype, facets };
        break;
      }
      default: return this.fail(t, 'a data range (a datatype IRI, DataIntersectionOf, DatatypeRestriction, …)');
    }
    this.expect('close', `")" closing ${t.value}`);
    this.depth--;
    return result;
  }

  /** Skips a balanced parenthesised group (for SKIPPED constructs); the "(" is already consumed. */
  private skipGroup(): void {
    let depth = 1;
    while (depth > 0) {
      const t = this.lexer.next();
      if (t.type === 'eof') this.fail(t, '")"');
      if (t.type === 'open') depth++;
      else if (t.type === 'close') depth--;
    }
  }

  /** Axiom := Declaration | ClassAxiom | ObjectPropertyAxiom | … | Assertion | AnnotationAxiom   (§9–§10) */
  private axiom(): void {
    const t = this.lexer.next();
    if (t.type !== 'keyword') this.fail(t, 'an axiom (Declaration, SubClassOf, ClassAssertion, …) or ")"');
    this.expect('open', `"(" after ${t.value}`);
    if (SKIPPED.has(t.value)) {
      this.skipGroup();
      this.options.onWarning?.(`${t.value} is not supported and was skipped`, t.line, t.column);
      return;
    }
    const annotations = this.annotations();
    const position = { source: this.source, line: t.line, column: t.column };
    const push = (a: Record<string, unknown>) => {
      // The axiom object is completed in place (id, position, annotations): no copy per axiom.
      a.id = this.axioms.length; a.position = position; a.annotations = annotations;
      this.axioms.push(a as unknown as AxiomInit);
    };
    const k = t.value;
    switch (k) {
      case 'Declaration': {
        const e = this.expect('keyword', 'an entity kind (Class, ObjectProperty, DataProperty, AnnotationProperty, NamedIndividual, Datatype)');
        if (!ENTITY_KINDS.has(e.value)) this.fail(e, 'an entity kind (Class, ObjectProperty, DataProperty, AnnotationProperty, NamedIndividual, Datatype)');
        this.expect('open', `"(" after ${e.value}`);
        push({ kind: 'Declaration', entity: e.value as EntityKind, iri: this.iri() });
        this.expect('close', `")" closing ${e.value}`);
        break;
      }
      case 'SubClassOf': { const sub = this.classExpression(); push({ kind: k, sub, sup: this.classExpression() }); break; }
      case 'EquivalentClasses': case 'DisjointClasses': push({ kind: k, classes: this.classExpressions(2, k) }); break;
      case 'DisjointUnion': { const cls = this.iri(); push({ kind: k, cls, classes: this.classExpressions(2, k) }); break; }
      case 'SubObjectPropertyOf': {
        if (this.peekKeyword('ObjectPropertyChain')) {
          this.lexer.next();
          this.expect('open', '"(" after ObjectPropertyChain');
          const chain: PropertyRef[] = [];
          while (this.lexer.peek().type !== 'close') chain.push(this.objectProperty());
          if (chain.length < 2) this.fail(this.lexer.peek(), 'at least 2 properties in ObjectPropertyChain');
          this.lexer.next();
          push({ kind: 'SubObjectPropertyChainOf', chain, sup: this.objectProperty() });
        } else {
          const sub = this.objectProperty();
          push({ kind: k, sub, sup: this.objectProperty() });
        }
        break;
      }
      case 'EquivalentObjectProperties': case 'DisjointObjectProperties': {
        const properties: PropertyRef[] = [];
        while (this.lexer.peek().type !== 'close') properties.push(this.objectProperty());
        if (properties.length < 2) this.fail(this.lexer.peek(), `at least 2 object properties in ${k}`);
        push({ kind: k, properties });
        break;
      }
      case 'InverseObjectProperties': { const first = this.objectProperty(); push({ kind: k, first, second: this.objectProperty() }); break; }
      case 'ObjectPropertyDomain': case 'ObjectPropertyRange': { const property = this.objectProperty(); push({ kind: k, property, cls: this.classExpression() }); break; }
      case 'SubDataPropertyOf': { const sub = this.iri(); push({ kind: k, sub, sup: this.iri() }); break; }
      case 'EquivalentDataProperties': case 'DisjointDataProperties': {
        const properties: string[] = [];
        while (this.lexer.peek().type !== 'close') properties.push(this.iri());
        if (properties.length < 2) this.fail(this.lexer.peek(), `at least 2 data properties in ${k}`);
        push({ kind: k, properties });
        break;
      }
      case 'DataPropertyDomain': { const property = this.iri(); push({ kind: k, property, cls: this.classExpression() }); break; }
      case 'DataPropertyRange': { const property = this.iri(); push({ kind: k, property, range: this.dataRange() }); break; }
      case 'FunctionalDataProperty': push({ kind: k, property: this.iri() }); break;
      case 'DatatypeDefinition': { const datatype = this.iri(); push({ kind: k, datatype, range: this.dataRange() }); break; }
      case 'HasKey': {
        const cls = this.classExpression();
        const objectProperties: PropertyRef[] = [], dataProperties: string[] = [];
        this.expect('open', '"(" opening the object properties of HasKey');
        while (this.lexer.peek().type !== 'close') objectProperties.push(this.objectProperty());
        this.lexer.next();
        this.expect('open', '"(" opening the data properties of HasKey');
        while (this.lexer.peek().type !== 'close') dataProperties.push(this.iri());
        this.lexer.next();
        push({ kind: k, cls, objectProperties, dataProperties });
        break;
      }
      case 'SameIndividual': case 'DifferentIndividuals': {
        const individuals: string[] = [];
        while (this.lexer.peek().type !== 'close') individuals.push(this.individual());
        if (individuals.length < 2) this.fail(this.lexer.peek(), `at least 2 individuals in ${k}`);
        push({ kind: k, individuals });
        break;
      }
      case 'ClassAssertion': { const cls = this.classExpression(); push({ kind: k, cls, individual: this.individual() }); break; }
      case 'ObjectPropertyAssertion': case 'NegativeObjectPropertyAssertion': {
        const property = this.objectProperty();
        const subject = this.individual();
        push({ kind: k, property, subject, object: this.individual() });
        break;
      }
      case 'DataPropertyAssertion': case 'NegativeDataPropertyAssertion': {
        const property = this.iri();
        const subject = this.individual();
        push({ kind: k, property, subject, value: this.literal() });
        break;
      }
      case 'AnnotationAssertion': {
        const property = this.iri();
        const subject = this.annotationSubject();
        push({ kind: k, property, subject, value: this.annotationValue() });
        break;
      }
      case 'SubAnnotationPropertyOf': { const sub = this.iri(); push({ kind: k, sub, sup: this.iri() }); break; }
      case 'AnnotationPropertyDomain': case 'AnnotationPropertyRange': { const property = this.iri(); push({ kind: k, property, iri: this.iri() }); break; }
      default:
        if (CHARACTERISTICS.has(k)) { push({ kind: k, property: this.objectProperty() }); break; }
        throw new SyntaxError(`unknown axiom "${k}": expected an OWL 2 axiom such as SubClassOf, EquivalentClasses or ClassAssertion`, t.line, t.column);
    }
    this.expect('close', `")" closing ${k}`);
  }
}
