// OWL 2 structural model: class expressions, data ranges, annotations and every axiom kind the parsers read (W3C OWL 2 Structural Specification).

import type { PropertyRef } from './normal.js';

export type { PropertyRef };

/**
 * Names are full IRIs (prefixes already expanded). Anonymous individuals are `_:label`.
 * `owl:Thing` and `owl:Nothing` stay class names, as in the Structural Specification (§5.1); the
 * normaliser reads them as ⊤ and ⊥.
 */

/** Where an axiom or an error is: `source:line:column` for text input, and the main triple for RDF input. */
export interface Position {
  readonly source: string;
  /** 1-based; 0 when unknown. */
  readonly line: number;
  /** 1-based; 0 when unknown. */
  readonly column: number;
  /** For RDF input: the triple the axiom was read from, in N-Triples-like text. */
  readonly triple?: string;
}

/** Returns `source:line:column`, or `source:line: <triple>` / `source: <triple>` for RDF input. */
export function formatPosition(position: Position): string {
  const at = position.line > 0 ? `${position.source}:${position.line}${position.column > 0 ? ':' + position.column : ''}` : position.source;
  return position.triple ? `${at}: ${position.triple}` : at;
}

/** A literal (Structural Specification §5.7). Plain `"abc"` is `"abc"^^xsd:string`; `"abc"@en` has datatype rdf:langString. */
export interface Literal {
  readonly lexical: string;
  readonly datatype: string;
  readonly lang?: string;
}

/** A data range (§7). */
export type DataRange =
  | { readonly kind: 'datatype'; readonly name: string }
  | { readonly kind: 'dataAnd'; readonly operands: readonly DataRange[] }
  | { readonly kind: 'dataOr'; readonly operands: readonly DataRange[] }
  | { readonly kind: 'dataNot'; readonly operand: DataRange }
  | { readonly kind: 'dataOneOf'; readonly literals: readonly Literal[] }
  | { readonly kind: 'datatypeRestriction'; readonly datatype: string; readonly facets: readonly { readonly facet: string; readonly value: Literal }[] };

/** A class expression (§8). `filler: null` in a cardinality restriction means unqualified (written without a class). */
export type ClassExpression =
  | { readonly kind: 'class'; readonly name: string }
  | { readonly kind: 'not'; readonly operand: ClassExpression }
  | { readonly kind: 'and'; readonly operands: readonly ClassExpression[] }
  | { readonly kind: 'or'; readonly operands: readonly ClassExpression[] }
  | { readonly kind: 'oneOf'; readonly individuals: readonly string[] }
  | { readonly kind: 'some'; readonly property: PropertyRef; readonly filler: ClassExpression }
  | { readonly kind: 'all'; readonly property: PropertyRef; readonly filler: ClassExpression }
  | { readonly kind: 'hasValue'; readonly property: PropertyRef; readonly individual: string }
  | { readonly kind: 'hasSelf'; readonly property: PropertyRef }
  | { readonly kind: 'min' | 'max' | 'exact'; readonly n: number; readonly property: PropertyRef; readonly filler: ClassExpression | null }
  | { readonly kind: 'dataSome' | 'dataAll'; readonly properties: readonly string[]; readonly range: DataRange }
  | { readonly kind: 'dataHasValue'; readonly property: string; readonly value: Literal }
  | { readonly kind: 'dataMin' | 'dataMax' | 'dataExact'; readonly n: number; readonly property: string; readonly range: DataRange | null };

/** An annotation value (§10.1): an IRI, an anonymous individual or a literal. */
export type AnnotationValue =
  | { readonly kind: 'iri'; readonly iri: string }
  | { readonly kind: 'anonymous'; readonly id: string }
  | { readonly kind: 'literal'; readonly literal: Literal };

/** An annotation (§10.1), possibly annotated itself. Kept, not reasoned with. */
export interface Annotation {
  readonly property: string;
  readonly value: AnnotationValue;
  readonly annotations: readonly Annotation[];
}

export type EntityKind = 'Class' | 'Datatype' | 'ObjectProperty' | 'DataProperty' | 'AnnotationProperty' | 'NamedIndividual';

interface Base {
  /** Index of the axiom in `Ontology.axioms` (stable within one parse). */
  readonly id: number;
  readonly position: Position;
  readonly annotations: readonly Annotation[];
}

type Characteristic =
  | 'FunctionalObjectProperty' | 'InverseFunctionalObjectProperty' | 'ReflexiveObjectProperty' | 'IrreflexiveObjectProperty'
  | 'SymmetricObjectProperty' | 'AsymmetricObjectProperty' | 'TransitiveObjectProperty';

/** The axioms of the Structural Specification §9–§11, one kind per functional-syntax keyword. */
export type Axiom = Base & (
  | { readonly kind: 'Declaration'; readonly entity: EntityKind; readonly iri: string }
  | { readonly kind: 'SubClassOf'; readonly sub: ClassExpression; readonly sup: ClassExpression }
  | { readonly kind: 'EquivalentClasses' | 'DisjointClasses'; readonly classes: readonly ClassExpression[] }
  | { readonly kind: 'DisjointUnion'; readonly cls: string; readonly classes: readonly ClassExpression[] }
  | { readonly kind: 'SubObjectPropertyOf'; readonly sub: PropertyRef; readonly sup: PropertyRef }
  /** SubObjectPropertyOf(ObjectPropertyChain(R1 … Rn) S), n ≥ 2 */
  | { readonly kind: 'SubObjectPropertyChainOf'; readonly chain: readonly PropertyRef[]; readonly sup: PropertyRef }
  | { readonly kind: 'EquivalentObjectProperties' | 'DisjointObjectProperties'; readonly properties: readonly PropertyRef[] }
  | { readonly kind: 'InverseObjectProperties'; readonly first: PropertyRef; readonly second: PropertyRef }
  | { readonly kind: 'ObjectPropertyDomain' | 'ObjectPropertyRange'; readonly property: PropertyRef; readonly cls: ClassExpression }
  | { readonly kind: Characteristic; readonly property: PropertyRef }
  | { readonly kind: 'SubDataPropertyOf'; readonly sub: string; readonly sup: string }
  | { readonly kind: 'EquivalentDataProperties' | 'DisjointDataProperties'; readonly properties: readonly string[] }
  | { readonly kind: 'DataPropertyDomain'; readonly property: string; readonly cls: ClassExpression }
  | { readonly kind: 'DataPropertyRange'; readonly property: string; readonly range: DataRange }
  | { readonly kind: 'FunctionalDataProperty'; readonly property: string }
  | { readonly kind: 'DatatypeDefinition'; readonly datatype: string; readonly range: DataRange }
  | { readonly kind: 'HasKey'; readonly cls: ClassExpression; readonly objectProperties: readonly PropertyRef[]; readonly dataProperties: readonly string[] }
  | { readonly kind: 'SameIndividual' | 'DifferentIndividuals'; readonly individuals: readonly string[] }
  | { readonly kind: 'ClassAssertion'; readonly cls: ClassExpression; readonly individual: string }
  | { readonly kind: 'ObjectPropertyAssertion' | 'NegativeObjectPropertyAssertion'; readonly property: PropertyRef; readonly subject: string; readonly object: string }
  | { readonly kind: 'DataPropertyAssertion' | 'NegativeDataPropertyAssertion'; readonly property: string; readonly subject: string; readonly value: Literal }
  | { readonly kind: 'AnnotationAssertion'; readonly property: string; readonly subject: string; readonly value: AnnotationValue }
  | { readonly kind: 'SubAnnotationPropertyOf'; readonly sub: string; readonly sup: string }
  | { readonly kind: 'AnnotationPropertyDomain' | 'AnnotationPropertyRange'; readonly property: string; readonly iri: string }
);

export type AxiomKind = Axiom['kind'];

/** Axiom kinds with no logical content (declarations and annotation axioms): counted, not classified. */
export const NON_LOGICAL_KINDS: ReadonlySet<AxiomKind> = new Set<AxiomKind>([
  'Declaration', 'AnnotationAssertion', 'SubAnnotationPropertyOf', 'AnnotationPropertyDomain', 'AnnotationPropertyRange',
]);

/** A parsed ontology (§3). */
export interface Ontology {
  /** File name (or label) the ontology was read from; used in every position. */
  readonly source: string;
  readonly format: 'ofn' | 'turtle' | 'ntriples' | 'rdfxml';
  readonly iri?: string;
  readonly versionIri?: string;
  readonly imports: readonly string[];
  readonly annotations: readonly Annotation[];
  /** Axioms in source order; `axioms[i].id === i`. */
  readonly axioms: readonly Axiom[];
  /** Prefix name (with colon, e.g. `ex:`) → IRI, as declared (for printing). */
  readonly prefixes: Readonly<Record<string, string>>;
  /** Things read but not turned into axioms (e.g. RDF triples that belong to no axiom, skipped rule syntax). */
  readonly warnings?: readonly string[];
}

/** Distributes Omit over a union, so `AxiomInit` keeps each kind's own fields. */
type DistributiveOmit<T, K extends keyof any> = T extends unknown ? Omit<T, K> : never;

/** An axiom before it gets its id (what the parsers build). */
export type AxiomInit = DistributiveOmit<Axiom, 'id'>;

/** Shorthand constructors. */
export const named = (name: string): ClassExpression => ({ kind: 'class', name });
export const prop = (name: string, inverse = false): PropertyRef => ({ name, inverse });
