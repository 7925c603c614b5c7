// Test helper: the forward W3C OWL 2 Mapping to RDF Graphs (§2, Tables 1–16) for class expressions and class axioms, written as Turtle.

import type { ClassExpression, PropertyRef } from '../../../reasoner/model/axioms.js';

const nn = (n: number) => `"${n}"^^<http://www.w3.org/2001/XMLSchema#nonNegativeInteger>`;

/** T(OPE): an IRI, or `[ owl:inverseOf P ]` (Table 1). */
function property(p: PropertyRef): string {
  return p.inverse ? `[ owl:inverseOf <${p.name}> ]` : `<${p.name}>`;
}

/** T(CE) (Table 1: class expressions), blank nodes written inline. */
export function classExpressionTurtle(c: ClassExpression): string {
  switch (c.kind) {
    case 'class': return `<${c.name}>`;
    case 'and': return `[ a owl:Class ; owl:intersectionOf ( ${c.operands.map(classExpressionTurtle).join(' ')} ) ]`;
    case 'or': return `[ a owl:Class ; owl:unionOf ( ${c.operands.map(classExpressionTurtle).join(' ')} ) ]`;
    case 'not': return `[ a owl:Class ; owl:complementOf ${classExpressionTurtle(c.operand)} ]`;
    case 'some': return `[ a owl:Restriction ; owl:onProperty ${property(c.property)} ; owl:someValuesFrom ${classExpressionTurtle(c.filler)} ]`;
    case 'all': return `[ a owl:Restriction ; owl:onProperty ${property(c.property)} ; owl:allValuesFrom ${classExpressionTurtle(c.filler)} ]`;
    case 'min': case 'max': case 'exact': {
      const word = c.kind === 'min' ? 'min' : c.kind === 'max' ? 'max' : '';
      if (!c.filler) return `[ a owl:Restriction ; owl:onProperty ${property(c.property)} ; owl:${word ? word + 'Cardinality' : 'cardinality'} ${nn(c.n)} ]`;
      const q = word ? `owl:${word}QualifiedCardinality` : 'owl:qualifiedCardinality';
      return `[ a owl:Restriction ; owl:onProperty ${property(c.property)} ; ${q} ${nn(c.n)} ; owl:onClass ${classExpressionTurtle(c.filler)} ]`;
    }
    default: throw new Error(`not written: ${c.kind}`);
  }
}

/** A Turtle document of SubClassOf axioms (Table 16: T(CE1) rdfs:subClassOf T(CE2)). */
export function subClassOfTurtle(pairs: readonly (readonly [ClassExpression, ClassExpression])[]): string {
  const lines = ['@prefix owl: <http://www.w3.org/2002/07/owl#> .', '@prefix rdfs: <http://www.w3.org/2000/01/rdf-schema#> .'];
  for (const [sub, sup] of pairs) lines.push(`${classExpressionTurtle(sub)} rdfs:subClassOf ${classExpressionTurtle(sup)} .`);
  return lines.join('\n') + '\n';
}
