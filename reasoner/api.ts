// The reasoner's public contract: the types the server (and the command line) rely on. Implementations live in the inner rooms.

export type OntologyFormat = 'ofn' | 'turtle' | 'ntriples' | 'rdfxml';
export type DatasetFormat = 'ntriples' | 'turtle' | 'csv';

/** How a CSV dataset maps to facts: one column holds the subject IRI; other headers map to a class or a property IRI. */
export interface CsvMapping {
  /** Header of the column whose cells are subject IRIs (or names resolved against `base`). */
  readonly subjectColumn: string;
  /** Base IRI for cells that are not absolute IRIs. */
  readonly base?: string;
  /**
   * Header → mapping. `class`: a non-empty truthy cell (`true`, `1`, `yes`, `x`) asserts subject ∈ IRI.
   * `property`: the cell holds the object individual (IRI or name resolved against base); several separated by `|`.
   * `type`: the cell holds a class IRI (or name resolved against base) the subject belongs to.
   */
  readonly columns: Readonly<Record<string, { readonly kind: 'class' | 'property' | 'type'; readonly iri?: string }>>;
}

export interface OntologySource { readonly path: string; readonly format?: OntologyFormat }
export interface DatasetSource { readonly path: string; readonly format?: DatasetFormat; readonly csv?: CsvMapping }

export type ProfileMode = 'strict' | 'approximate';
export type Stage = 'parse' | 'profile' | 'normalise' | 'rewrite' | 'materialise';

export interface Progress { readonly stage: Stage; /** 0..1 within the stage */ readonly fraction: number; readonly message?: string }

/** One problem found in the input, always with where. */
export interface Diagnostic {
  readonly severity: 'error' | 'warning' | 'info';
  /** `file:line:column`, or the offending triple for RDF input. */
  readonly position: string;
  readonly message: string;
  /** The axiom's text as written, when the diagnostic is about an axiom. */
  readonly axiom?: string;
}

export type AxiomClass = 'horn' | 'alchiq' | 'outside';

export interface ProfileEntry {
  readonly axiomId: number;
  readonly position: string;
  readonly text: string;
  readonly classification: AxiomClass;
  /** Why the axiom is outside ALCHIQ or needs non-Horn reasoning (e.g. "nominals", "transitivity", "disjunction"). */
  readonly reasons: readonly string[];
}

export interface ProfileReport {
  readonly mode: ProfileMode;
  /** 'horn' if every kept axiom is Horn-ALCHIQ, 'alchiq' if some need disjunction or ≤n with n > 1, 'outside' if strict mode refused. */
  readonly verdict: AxiomClass;
  readonly counts: { readonly horn: number; readonly alchiq: number; readonly outside: number; readonly annotations: number };
  readonly entries: readonly ProfileEntry[];
  /** Axioms dropped in approximate mode (answers then sound but possibly incomplete). */
  readonly dropped: readonly ProfileEntry[];
  readonly warnings: readonly string[];
}

export interface RewritingStats {
  readonly normalAxioms: number;
  readonly rules: number;
  /** Rule counts by shape, e.g. { datalog: 120, existential: 12, disjunctive: 4, equality: 3, constraint: 9 }. */
  readonly byShape: Readonly<Record<string, number>>;
  readonly largestBody: number;
  readonly largestArity: number;
}

/** A sink for entailed facts. IRIs as strings; `asserted` tells facts given in the input from those only entailed. */
export interface FactSink {
  write(subject: string, predicate: string, object: string, asserted: boolean): void | Promise<void>;
}

export interface ResourceLimits {
  readonly maxElements?: number;
  readonly maxBranches?: number;
  readonly timeoutMs?: number;
  readonly maxMemoryBytes?: number;
}

export interface ReasonOptions {
  readonly ontology: OntologySource;
  readonly datasets: readonly DatasetSource[];
  readonly mode?: ProfileMode;
  readonly signal?: AbortSignal;
  readonly onProgress?: (progress: Progress) => void;
  readonly limits?: ResourceLimits;
  /** Worker threads for independent components; default: available parallelism. */
  readonly threads?: number;
  /**
   * How a Horn ontology is evaluated: 'datalog' (default) runs its Datalog rewriting (rewrite/horn, no anonymous
   * element); 'chase' runs the one-rule-per-axiom program with anonymous elements. Disjunctive ontologies always chase.
   * 'rewriting' (any ontology) runs the published rewriting (rewrite/disjunctive) by the plain restricted chase with
   * dynamic blocking off — the reference the optimised path is tested against; slower, never the default. A run that
   * merges elements holding copied successor edges, which its exactness argument does not cover, comes with a warning
   * diagnostic and `timings.copiedMerges` (reasoner/README.md, "The published rewriting").
   */
  readonly path?: 'datalog' | 'chase' | 'rewriting';
}

export interface Explanation {
  /** Facts (as N-Triples-like text) and axioms (as written, with position) involved in the clash. */
  readonly facts: readonly string[];
  readonly axioms: readonly { readonly position: string; readonly text: string }[];
}

export interface Counts {
  readonly assertedFacts: number;
  readonly entailedFacts: number;
  /** Entailed fact counts per class IRI and per property IRI (asserted included). */
  readonly perPredicate: Readonly<Record<string, { readonly asserted: number; readonly entailed: number }>>;
  readonly individuals: number;
  readonly dataPropertyFacts: number;
}

export type ReasonResult =
  | { readonly status: 'ok'; readonly profile: ProfileReport; readonly rewriting: RewritingStats; readonly program: string; readonly counts: Counts; readonly timings: Readonly<Record<string, number>>; readonly diagnostics: readonly Diagnostic[] }
  | { readonly status: 'inputError'; readonly diagnostics: readonly Diagnostic[] }
  | { readonly status: 'outsideProfile'; readonly profile: ProfileReport; readonly diagnostics: readonly Diagnostic[] }
  | { readonly status: 'inconsistent'; readonly profile: ProfileReport; readonly rewriting: RewritingStats; readonly program: string; readonly explanation: Explanation; readonly diagnostics: readonly Diagnostic[] }
  | { readonly status: 'cancelled' }
  | { readonly status: 'resourceLimit'; readonly message: string };
