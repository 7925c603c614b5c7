// Intake facade: ontology and datasets in (parse), ALCHIQ profile check, normal form out. The rest of the reasoner calls only this.

import type { DatasetSource, Diagnostic, OntologySource, ProfileMode, ProfileReport, Progress } from './api.js';
import type { Axiom, Ontology } from './model/axioms.js';
import type { NormalOntology } from './model/normal.js';
import type { TermDictionary } from './model/dictionary.js';
import type { Abox } from './model/abox.js';

export type { Ontology, Axiom } from './model/axioms.js';

/** An input problem (syntax error, unreadable file, bad encoding): carries every diagnostic, each with file:line:column. */
export class InputError extends Error {
  readonly diagnostics: readonly Diagnostic[];

  constructor(diagnostics: readonly Diagnostic[]) {
    const first = diagnostics[0];
    super(first ? `${first.position}: ${first.message}` : 'input error');
    this.name = 'InputError';
    this.diagnostics = diagnostics;
  }
}

export interface LoadOntologyOptions {
  /** Parse this text instead of reading `source.path` (which is then only the name used in positions). */
  readonly text?: string | Uint8Array;
  /** Refuse files larger than this (default 512 MiB). */
  readonly maxBytes?: number;
  readonly signal?: AbortSignal;
}

/** The profile report plus the axioms that the normaliser may use (all logical in-profile axioms). */
export interface ProfileResult extends ProfileReport {
  /** Axioms kept for reasoning: in strict mode all logical axioms when none is outside, else none; in approximate mode the in-profile ones. */
  readonly kept: readonly Axiom[];
}

export interface LoadDatasetsOptions {
  readonly signal?: AbortSignal;
  readonly onProgress?: (progress: Progress) => void;
  /** Refuse a line (N-Triples) or a token (Turtle) longer than this many bytes (default 16 MiB). */
  readonly maxLineBytes?: number;
}

const notYet = (what: string): never => {
  throw new Error(`${what}: not implemented yet (issue 3 in progress)`);
};

/**
 * Reads an ontology in OWL 2 Functional-Style Syntax, Turtle, N-Triples or RDF/XML (format from `source.format`,
 * else from the extension, else sniffed). Throws `InputError` on any syntax error (position file:line:column);
 * returns warnings (e.g. unsupported imports) as diagnostics.
 */
export async function loadOntology(source: OntologySource, opts: LoadOntologyOptions = {}): Promise<{ ontology: Ontology; diagnostics: Diagnostic[] }> {
  void source; void opts;
  return notYet('loadOntology');
}

/** Classifies every logical axiom (Horn-ALCHIQ, ALCHIQ, outside) and decides what is kept, per mode. */
export function profile(ontology: Ontology, mode: ProfileMode = 'strict'): ProfileResult {
  void ontology; void mode;
  return notYet('profile');
}

/** Normal form of the kept axioms (and of the assertions among them). */
export function normalise(ontology: Ontology, keptAxioms: readonly Axiom[]): NormalOntology {
  void ontology; void keptAxioms;
  return notYet('normalise');
}

/**
 * Streams datasets (N-Triples, Turtle, CSV with a mapping) into `abox`, interning terms in `dictionary`.
 * Throws `InputError` on syntax errors (with file:line:column); rejects with an AbortError when `signal` aborts.
 * Data-property facts are stored in `abox.data`, not reasoned with.
 */
export async function loadDatasets(
  sources: readonly DatasetSource[],
  dictionary: TermDictionary,
  abox: Abox,
  opts: LoadDatasetsOptions = {},
): Promise<{ diagnostics: Diagnostic[] }> {
  void sources; void dictionary; void abox; void opts;
  return notYet('loadDatasets');
}

/**
 * Adds the ontology's own (normalised) assertions to an ABox: class, property, sameAs and differentFrom rows.
 * Use after `normalise` so that facts written in the ontology file join the datasets' facts.
 */
export function addAssertionsToAbox(normal: NormalOntology, dictionary: TermDictionary, abox: Abox): void {
  for (const a of normal.assertions) {
    switch (a.kind) {
      case 'classAssertion': abox.addClass(dictionary.intern(a.cls), dictionary.intern(a.individual)); break;
      case 'propertyAssertion': abox.addProperty(dictionary.intern(a.property), dictionary.intern(a.subject), dictionary.intern(a.object)); break;
      case 'sameIndividual': abox.addSame(dictionary.intern(a.a), dictionary.intern(a.b)); break;
      case 'differentIndividuals': abox.addDifferent(dictionary.intern(a.a), dictionary.intern(a.b)); break;
    }
  }
}
