// Generators for the reasoner core's benchmarks: synthetic normal-form ontologies and integer ABoxes of a chosen
// size (a product-catalogue scenario of our own: parts, assemblies, suppliers), deterministic from a seed.

import type { NormalAxiom, PropertyRef } from '../../reasoner/model/normal.js';
import type { ChaseInput } from '../../reasoner/chase/entail.js';

const SOURCE = { axiomId: 0, position: 'bench' };
const EX = 'http://example.org/catalogue#';

/** A small deterministic pseudo-random generator (xorshift32). */
export function random(seed: number): () => number {
  let s = seed | 0 || 1;
  return () => { s ^= s << 13; s ^= s >>> 17; s ^= s << 5; return (s >>> 0) / 4294967296; };
}

const cls = (i: number) => `${EX}Class${i}`;
const prop = (i: number) => `${EX}relation${i}`;
const ref = (i: number, inverse = false): PropertyRef => ({ name: prop(i), inverse });

/** A Horn, existential-free ontology (a Datalog program): class tree, property tree with an inverse, ∀ and ⊓ rules. */
export function hornDatalogOntology(classes = 60, properties = 10, seed = 1): { axioms: NormalAxiom[]; classes: string[]; properties: string[] } {
  const rnd = random(seed), axioms: NormalAxiom[] = [];
  for (let i = 1; i < classes; i++) axioms.push({ kind: 'subsumption', body: [cls(i)], head: [cls(Math.floor((i - 1) / 2))], source: SOURCE });
  for (let i = 1; i < properties; i++) axioms.push({ kind: 'propertyInclusion', sub: ref(i), sup: ref(Math.floor((i - 1) / 2), i % 3 === 0), source: SOURCE });
  for (let k = 0; k < classes / 2; k++) {
    const a = Math.floor(rnd() * classes), b = Math.floor(rnd() * classes), c = Math.floor(rnd() * classes);
    axioms.push({ kind: 'forall', sub: cls(a), property: ref(Math.floor(rnd() * properties), rnd() < 0.3), filler: cls(b), source: SOURCE });
    if (a !== b) axioms.push({ kind: 'subsumption', body: [cls(a), cls(b)], head: [cls(c)], source: SOURCE });
  }
  return { axioms, classes: Array.from({ length: classes }, (_, i) => cls(i)), properties: Array.from({ length: properties }, (_, i) => prop(i)) };
}

/** A random ABox: each individual gets `classFacts` classes among the leaves and `roleFacts` edges to random others. */
export function randomAbox(individuals: number, classFacts: number, roleFacts: number, classes: number, properties: number, seed = 2, cluster = 0): ChaseInput {
  const rnd = random(seed);
  const nc = individuals * classFacts, np = individuals * roleFacts;
  const classPred = new Int32Array(nc), classInd = new Int32Array(nc);
  for (let i = 0; i < nc; i++) { classInd[i] = Math.floor(i / classFacts); classPred[i] = Math.floor(classes / 2 + rnd() * (classes / 2)); }
  const propPred = new Int32Array(np), propSubj = new Int32Array(np), propObj = new Int32Array(np);
  for (let i = 0; i < np; i++) {
    const s = Math.floor(i / roleFacts);
    propSubj[i] = s; propPred[i] = Math.floor(rnd() * properties);
    // cluster > 0: edges stay within blocks of `cluster` individuals (many independent components).
    propObj[i] = cluster > 0 ? Math.min(individuals - 1, s - (s % cluster) + Math.floor(rnd() * cluster)) : Math.floor(rnd() * individuals);
  }
  const none = new Int32Array(0);
  return {
    individuals, classPred, classInd, propPred, propSubj, propObj, sameA: none, sameB: none, diffA: none, diffB: none,
    classNames: Array.from({ length: classes }, (_, i) => cls(i)), propertyNames: Array.from({ length: properties }, (_, i) => prop(i)),
  };
}

/**
 * A disjunctive catalogue ontology with number restrictions: every assembly has ≤ 3 parts and ≥ 2 parts of its own
 * kind, each part is metal or polymer, metal parts make an assembly heavy, a heavy assembly needs a reinforced
 * supplier, and so on. Class ids: 0 Assembly, 1 Part, 2 Metal, 3 Polymer, 4 Heavy, 5 Light, 6 Supplier, 7 Reinforced,
 * 8 Certified, 9 Checked; properties: 0 hasPart, 1 suppliedBy, 2 partOf (inverse of hasPart).
 */
export function disjunctiveCatalogue(): { axioms: NormalAxiom[]; classes: string[]; properties: string[] } {
  const c = (i: number) => cls(i);
  const s = (body: number[], head: number[]): NormalAxiom => ({ kind: 'subsumption', body: body.map(c), head: head.map(c), source: SOURCE });
  const axioms: NormalAxiom[] = [
    { kind: 'atMost', sub: c(0), n: 3, property: ref(0), filler: null, source: SOURCE },
    { kind: 'atLeast', sub: c(0), n: 2, property: ref(0), filler: c(1), source: SOURCE },
    { kind: 'forall', sub: c(0), property: ref(0), filler: c(1), source: SOURCE },
    s([1], [2, 3]), s([2, 3], []),
    { kind: 'forall', sub: c(2), property: ref(0, true), filler: c(4), source: SOURCE },
    s([0], [4, 5]), s([4, 5], []),
    { kind: 'forall', sub: c(5), property: ref(0), filler: c(3), source: SOURCE },
    { kind: 'exists', sub: c(4), property: ref(1), filler: c(7), source: SOURCE },
    { kind: 'forall', sub: c(7), property: ref(1, true), filler: c(8), source: SOURCE },
    s([8, 0], [9]),
    { kind: 'atMost', sub: c(1), n: 1, property: ref(0, true), filler: null, source: SOURCE },
    { kind: 'propertyInclusion', sub: ref(2), sup: ref(0, true), source: SOURCE },
    { kind: 'propertyInclusion', sub: ref(0, true), sup: ref(2), source: SOURCE },
  ];
  return { axioms, classes: Array.from({ length: 10 }, (_, i) => c(i)), properties: [prop(0), prop(1), prop(2)] };
}

/** A synthetic normal form of about `n` axioms, mixing every shape (for the rewriting's size and time). */
export function mixedNormalForm(n: number, seed = 3): NormalAxiom[] {
  const rnd = random(seed), classes = Math.max(4, Math.floor(n / 3)), properties = Math.max(2, Math.floor(n / 20));
  const C = () => cls(Math.floor(rnd() * classes)), P = () => ref(Math.floor(rnd() * properties), rnd() < 0.3);
  const out: NormalAxiom[] = [];
  for (let i = 0; i < n; i++) {
    const k = i % 7;
    if (k === 0) out.push({ kind: 'subsumption', body: [C(), C()], head: [C()], source: SOURCE });
    else if (k === 1) out.push({ kind: 'subsumption', body: [C()], head: [C(), C()], source: SOURCE });
    else if (k === 2) out.push({ kind: 'exists', sub: C(), property: P(), filler: C(), source: SOURCE });
    else if (k === 3) out.push({ kind: 'forall', sub: C(), property: P(), filler: C(), source: SOURCE });
    else if (k === 4) out.push({ kind: 'atMost', sub: C(), n: 1 + Math.floor(rnd() * 3), property: P(), filler: C(), source: SOURCE });
    else if (k === 5) out.push({ kind: 'atLeast', sub: C(), n: 2 + Math.floor(rnd() * 2), property: P(), filler: C(), source: SOURCE });
    else out.push({ kind: 'propertyInclusion', sub: P(), sup: P(), source: SOURCE });
  }
  return out;
}

/**
 * The catalogue's ABox: assemblies with `partsEach` parts each (hasPart), 30% of parts asserted metal and 10% polymer,
 * and one supplier per `perSupplier` assemblies (suppliedBy), so components have perSupplier·(partsEach+1)+1 individuals.
 */
export function catalogueAbox(assemblies: number, partsEach = 3, perSupplier = 5, seed = 7): ChaseInput {
  const onto = disjunctiveCatalogue(), rnd = random(seed);
  const cp: number[] = [], ci: number[] = [], pp: number[] = [], ps: number[] = [], po: number[] = [];
  let next = 0, supplier = -1;
  for (let a = 0; a < assemblies; a++) {
    const id = next++;
    cp.push(0); ci.push(id);
    if (a % perSupplier === 0) { supplier = next++; cp.push(6); ci.push(supplier); }
    pp.push(1); ps.push(id); po.push(supplier);
    for (let k = 0; k < partsEach; k++) {
      const p = next++;
      pp.push(0); ps.push(id); po.push(p);
      cp.push(1); ci.push(p);
      const x = rnd();
      if (x < 0.3) { cp.push(2); ci.push(p); } else if (x < 0.4) { cp.push(3); ci.push(p); }
    }
  }
  const none = new Int32Array(0);
  return {
    individuals: next, classPred: Int32Array.from(cp), classInd: Int32Array.from(ci), propPred: Int32Array.from(pp), propSubj: Int32Array.from(ps), propObj: Int32Array.from(po),
    sameA: none, sameB: none, diffA: none, diffB: none, classNames: onto.classes, propertyNames: onto.properties,
  };
}
