// IRIs of the RDF, RDFS, OWL and XSD vocabularies that the parsers and the profile check name.

export const RDF = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#';
export const RDFS = 'http://www.w3.org/2000/01/rdf-schema#';
export const OWL = 'http://www.w3.org/2002/07/owl#';
export const XSD = 'http://www.w3.org/2001/XMLSchema#';

export const RDF_TYPE = RDF + 'type';
export const RDF_FIRST = RDF + 'first';
export const RDF_REST = RDF + 'rest';
export const RDF_NIL = RDF + 'nil';
export const RDF_LANG_STRING = RDF + 'langString';
export const RDF_PLAIN_LITERAL = RDF + 'PlainLiteral';
export const XSD_STRING = XSD + 'string';
export const XSD_NON_NEGATIVE_INTEGER = XSD + 'nonNegativeInteger';

export const OWL_THING = OWL + 'Thing';
export const OWL_NOTHING = OWL + 'Nothing';
export const OWL_TOP_OBJECT_PROPERTY = OWL + 'topObjectProperty';
export const OWL_BOTTOM_OBJECT_PROPERTY = OWL + 'bottomObjectProperty';
export const OWL_TOP_DATA_PROPERTY = OWL + 'topDataProperty';
export const OWL_BOTTOM_DATA_PROPERTY = OWL + 'bottomDataProperty';
export const OWL_SAME_AS = OWL + 'sameAs';
export const OWL_DIFFERENT_FROM = OWL + 'differentFrom';
export const OWL_NAMED_INDIVIDUAL = OWL + 'NamedIndividual';

/** The prefixes that OWL 2 Functional-Style Syntax predeclares (Structural Specification §3.7, Table 2). */
export const STANDARD_PREFIXES: Readonly<Record<string, string>> = {
  'rdf:': RDF,
  'rdfs:': RDFS,
  'xsd:': XSD,
  'owl:': OWL,
};

/** Returns true if the IRI is in one of the reserved vocabularies (rdf:, rdfs:, owl:, xsd:). */
export function isReservedIri(iri: string): boolean {
  return iri.startsWith(OWL) || iri.startsWith(RDF) || iri.startsWith(RDFS) || iri.startsWith(XSD);
}
