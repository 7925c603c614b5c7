// Normal-form axioms: the fixed set of shapes the rewriting consumes (issue 3 produces them, issue 4 reads them).

/** A property or its inverse: `R` or `R⁻`. Names are IRIs (or internal fresh names, see `isFreshName`). */
export interface PropertyRef {
  readonly name: string;
  readonly inverse: boolean;
}

/** Where an axiom came from: the id of the source axiom and a human-readable position. */
export interface SourceRef {
  /** Id of the source axiom in the parsed ontology (stable within one parse). */
  readonly axiomId: number;
  /** `file:line:column`, or the triple for RDF input. */
  readonly position: string;
}

/**
 * The normal-form shapes. Class names are IRIs of user classes or fresh internal names.
 * `owl:Thing` never appears (an empty `body` means ⊤); an empty `head` means ⊥.
 */
export type NormalAxiom =
  /** B1 ⊓ … ⊓ Bn ⊑ C1 ⊔ … ⊔ Cm   (n ≥ 0: empty body is ⊤; m ≥ 0: empty head is ⊥) */
  | { readonly kind: 'subsumption'; readonly body: readonly string[]; readonly head: readonly string[]; readonly source: SourceRef }
  /** A ⊑ ∃R.B  (B may be a fresh name; B absent means ⊤) */
  | { readonly kind: 'exists'; readonly sub: string; readonly property: PropertyRef; readonly filler: string | null; readonly source: SourceRef }
  /** A ⊑ ∀R.B  (B absent means ⊥, i.e. A ⊑ ∀R.⊥) */
  | { readonly kind: 'forall'; readonly sub: string; readonly property: PropertyRef; readonly filler: string | null; readonly source: SourceRef }
  /** A ⊑ ≥n R.B  (n ≥ 2; n = 1 is written as `exists`; B absent means ⊤) */
  | { readonly kind: 'atLeast'; readonly sub: string; readonly n: number; readonly property: PropertyRef; readonly filler: string | null; readonly source: SourceRef }
  /** A ⊑ ≤n R.B  (n ≥ 0; n = 0 may also be written as `forall` with the negated filler; B absent means ⊤) */
  | { readonly kind: 'atMost'; readonly sub: string; readonly n: number; readonly property: PropertyRef; readonly filler: string | null; readonly source: SourceRef }
  /** R ⊑ S  (either side may be an inverse) */
  | { readonly kind: 'propertyInclusion'; readonly sub: PropertyRef; readonly sup: PropertyRef; readonly source: SourceRef }
  /** R ⊓ S ⊑ ⊥ on pairs: disjoint object properties (kept only if the profile admits it) */
  | { readonly kind: 'propertyDisjointness'; readonly properties: readonly [PropertyRef, PropertyRef]; readonly source: SourceRef };

/** An ABox in normal form: assertions only on named classes and named properties; sameAs/differentFrom between individuals. */
export type NormalAssertion =
  | { readonly kind: 'classAssertion'; readonly cls: string; readonly individual: string; readonly source: SourceRef }
  | { readonly kind: 'propertyAssertion'; readonly property: string; readonly subject: string; readonly object: string; readonly source: SourceRef }
  | { readonly kind: 'sameIndividual'; readonly a: string; readonly b: string; readonly source: SourceRef }
  | { readonly kind: 'differentIndividuals'; readonly a: string; readonly b: string; readonly source: SourceRef };

/**
 * Prefix of internal names. It starts with a control character, which no IRI may contain
 * (RFC 3987 excludes U+0000–U+001F), so a fresh name can never clash with user vocabulary.
 */
export const FRESH_PREFIX = '\u0001fresh:';

/**
 * The fresh name that stands for ⊤ where a normal-form shape needs a class name on the left
 * (e.g. a range ⊤ ⊑ ∀R.C becomes FRESH_TOP ⊑ ∀R.C). The normaliser emits it with exactly one defining
 * axiom, `{ kind: 'subsumption', body: [], head: [FRESH_TOP] }`, so every element belongs to it.
 */
export const FRESH_TOP = FRESH_PREFIX + 'top';

/** Returns true for internal fresh names, which are never shown as user vocabulary nor output as facts. */
export function isFreshName(name: string): boolean {
  return name.startsWith(FRESH_PREFIX);
}

/** The normal form of one ontology: TBox axioms plus the user's signature (named classes and properties that occur). */
export interface NormalOntology {
  readonly axioms: readonly NormalAxiom[];
  /** Named classes of the user vocabulary that occur in the ontology (no owl:Thing, no fresh names). */
  readonly classes: readonly string[];
  /** Named object properties of the user vocabulary that occur. */
  readonly properties: readonly string[];
  /** ABox assertions written in the ontology file itself, normalised (complex class assertions become fresh names). */
  readonly assertions: readonly NormalAssertion[];
  /**
   * Data-property assertions written in the ontology file: kept as facts, not reasoned with (no datatype
   * reasoning). `literal` is the N-Triples encoding of the value (see model/dictionary.ts).
   */
  readonly dataAssertions?: readonly { readonly subject: string; readonly property: string; readonly literal: string; readonly source: SourceRef }[];
}
