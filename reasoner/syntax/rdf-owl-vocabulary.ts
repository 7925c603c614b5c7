// The OWL vocabulary of the Mapping to RDF Graphs that the reverse mapping (rdf-to-owl.ts) looks for, grouped by role.

import type { EntityKind } from '../model/axioms.js';
import { OWL, RDF, RDFS, RDF_FIRST, RDF_REST } from '../model/vocabulary.js';

export const o = (l: string) => OWL + l;
export const ENTITY_TYPES: Record<string, EntityKind> = {
  [o('Class')]: 'Class', [RDFS + 'Datatype']: 'Datatype', [o('ObjectProperty')]: 'ObjectProperty',
  [o('DatatypeProperty')]: 'DataProperty', [o('AnnotationProperty')]: 'AnnotationProperty', [o('NamedIndividual')]: 'NamedIndividual',
};
export const CHARACTERISTIC: Record<string, string> = {
  [o('InverseFunctionalProperty')]: 'InverseFunctionalObjectProperty', [o('ReflexiveProperty')]: 'ReflexiveObjectProperty',
  [o('IrreflexiveProperty')]: 'IrreflexiveObjectProperty', [o('SymmetricProperty')]: 'SymmetricObjectProperty',
  [o('AsymmetricProperty')]: 'AsymmetricObjectProperty', [o('TransitiveProperty')]: 'TransitiveObjectProperty',
};
/** Built-in annotation properties (Structural Specification §5.5). */
export const BUILTIN_ANNOTATION = new Set([RDFS + 'label', RDFS + 'comment', RDFS + 'seeAlso', RDFS + 'isDefinedBy', o('deprecated'),
  o('versionInfo'), o('priorVersion'), o('backwardCompatibleWith'), o('incompatibleWith')]);
/** Predicates whose triples on a blank node belong to a class expression, data range, list or inverse (Tables 8–13). */
export const STRUCTURAL = new Set([RDF_FIRST, RDF_REST, o('intersectionOf'), o('unionOf'), o('complementOf'), o('oneOf'), o('onProperty'),
  o('onProperties'), o('someValuesFrom'), o('allValuesFrom'), o('hasValue'), o('hasSelf'), o('minCardinality'), o('maxCardinality'),
  o('cardinality'), o('minQualifiedCardinality'), o('maxQualifiedCardinality'), o('qualifiedCardinality'), o('onClass'), o('onDataRange'),
  o('inverseOf'), o('onDatatype'), o('withRestrictions'), o('datatypeComplementOf')]);
export const STRUCTURAL_TYPES = new Set([o('Restriction'), o('Class'), RDFS + 'Datatype', RDF + 'List']);
export const GENERATOR_TYPES = new Set([o('AllDisjointClasses'), o('AllDisjointProperties'), o('AllDifferent'), o('NegativePropertyAssertion'), o('Axiom'), o('Annotation')]);
