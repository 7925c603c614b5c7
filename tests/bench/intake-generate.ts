// Generators for intake benchmarks: large ALCHIQ ontologies (functional syntax) and large N-Triples datasets, deterministic by seed.

import { createWriteStream } from 'node:fs';

/** A small deterministic PRNG (mulberry32) so runs are comparable. */
export function random(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * An ontology of `axioms` logical axioms over `axioms / 10` classes and 200 properties, mixing the shapes that
 * real TBoxes use most (atomic subsumptions, existentials, conjunctions, domains and ranges, disjointness,
 * qualified cardinalities, a few disjunctions and inverses) plus 10% declarations.
 */
export function generateOntology(axioms: number, seed = 1): string {
  const rnd = random(seed);
  const classes = Math.max(10, Math.floor(axioms / 10)), properties = 200;
  const c = () => `:C${Math.floor(rnd() * classes)}`;
  const p = () => (rnd() < 0.1 ? `ObjectInverseOf(:p${Math.floor(rnd() * properties)})` : `:p${Math.floor(rnd() * properties)}`);
  const lines = ['Prefix(:=<http://bench.example/onto#>)', 'Ontology(<http://bench.example/onto>'];
  for (let i = 0; i < Math.floor(axioms / 10); i++) lines.push(`Declaration(Class(:C${i}))`);
  for (let i = 0; i < axioms; i++) {
    const r = rnd();
    if (r < 0.35) lines.push(`SubClassOf(${c()} ${c()})`);
    else if (r < 0.55) lines.push(`SubClassOf(${c()} ObjectSomeValuesFrom(${p()} ${c()}))`);
    else if (r < 0.65) lines.push(`EquivalentClasses(${c()} ObjectIntersectionOf(${c()} ObjectSomeValuesFrom(${p()} ${c()})))`);
    else if (r < 0.72) lines.push(`SubClassOf(ObjectSomeValuesFrom(${p()} ${c()}) ${c()})`);
    else if (r < 0.78) lines.push(`ObjectPropertyDomain(${p()} ${c()})`);
    else if (r < 0.84) lines.push(`ObjectPropertyRange(${p()} ${c()})`);
    else if (r < 0.88) lines.push(`DisjointClasses(${c()} ${c()})`);
    else if (r < 0.92) lines.push(`SubClassOf(${c()} ObjectAllValuesFrom(${p()} ${c()}))`);
    else if (r < 0.95) lines.push(`SubClassOf(${c()} ObjectMaxCardinality(1 ${p()} ${c()}))`);
    else if (r < 0.97) lines.push(`SubClassOf(${c()} ObjectUnionOf(${c()} ${c()}))`);
    else if (r < 0.99) lines.push(`SubObjectPropertyOf(${p()} ${p()})`);
    else lines.push(`ClassAssertion(${c()} :i${Math.floor(rnd() * 1000)})`);
  }
  lines.push(')');
  return lines.join('\n') + '\n';
}

/**
 * Writes `triples` N-Triples lines: 30% rdf:type over 200 classes, 60% object-property triples over 100
 * properties, 10% literals; `triples / 10` individuals (so terms repeat as in real data). Resolves when written.
 */
export async function writeNTriples(path: string, triples: number, seed = 2): Promise<void> {
  const rnd = random(seed);
  const individuals = Math.max(10, Math.floor(triples / 10));
  const out = createWriteStream(path, { highWaterMark: 1 << 20 });
  const ind = () => `<http://bench.example/data/i${Math.floor(rnd() * individuals)}>`;
  const type = '<http://www.w3.org/1999/02/22-rdf-syntax-ns#type>';
  let buffer = '';
  for (let i = 0; i < triples; i++) {
    const r = rnd();
    if (r < 0.3) buffer += `${ind()} ${type} <http://bench.example/onto#C${Math.floor(rnd() * 200)}> .\n`;
    else if (r < 0.9) buffer += `${ind()} <http://bench.example/onto#p${Math.floor(rnd() * 100)}> ${ind()} .\n`;
    else buffer += `${ind()} <http://bench.example/onto#name> "value ${Math.floor(rnd() * 1000)}"@en .\n`;
    if (buffer.length > 1 << 20) {
      if (!out.write(buffer)) await new Promise<void>((r) => out.once('drain', () => r()));
      buffer = '';
    }
  }
  out.write(buffer);
  await new Promise<void>((resolve, reject) => out.end((e?: Error | null) => (e ? reject(e) : resolve())));
}
