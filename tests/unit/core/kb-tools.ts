// Test helpers for the reasoner core: run the engine on a tiny knowledge base given by names, and random tiny
// knowledge bases (fast-check arbitraries, so counterexamples shrink).

import fc from 'fast-check';
import { isFreshName, type NormalAxiom, type NormalOntology, type PropertyRef } from '../../../reasoner/model/normal.js';
import type { RuleProgram } from '../../../reasoner/rules/types.js';
import { rewriteOntology } from '../../../reasoner/rewrite/rules-from-normal.js';
import { entail, type ChaseInput } from '../../../reasoner/chase/entail.js';
import { Guard } from '../../../reasoner/chase/guard.js';
import type { TinyKb } from '../../reference/asp-reference.js';
import type { ResourceLimits } from '../../../reasoner/api.js';

const SOURCE = { axiomId: 0, position: 'test:1:1' };

/** The normal form of the knowledge base's TBox, with its signature (and the facts' names too, when asked). */
export function normalOf(kb: TinyKb, withFactVocabulary = false): NormalOntology {
  const classes = new Set<string>(), properties = new Set<string>();
  if (withFactVocabulary) {
    kb.classFacts.forEach(([c]) => classes.add(c));
    kb.propertyFacts.forEach(([r]) => properties.add(r));
  }
  for (const a of kb.axioms) {
    if (a.kind === 'subsumption') { a.body.forEach((c) => classes.add(c)); a.head.forEach((c) => classes.add(c)); }
    else if (a.kind === 'propertyInclusion') { properties.add(a.sub.name); properties.add(a.sup.name); }
    else if (a.kind === 'propertyDisjointness') { properties.add(a.properties[0].name); properties.add(a.properties[1].name); }
    else { classes.add(a.sub); if (a.filler) classes.add(a.filler); properties.add(a.property.name); }
  }
  return { axioms: kb.axioms, classes: [...classes].sort(), properties: [...properties].sort(), assertions: [] };
}

/** The knowledge base's facts as chase input, and the individual names by id. */
export function inputOf(kb: TinyKb): { input: ChaseInput; individuals: string[] } {
  const individuals: string[] = [], idOf = new Map<string, number>();
  const ind = (n: string) => { let i = idOf.get(n); if (i === undefined) { i = individuals.length; idOf.set(n, i); individuals.push(n); } return i; };
  const classNames: string[] = [], propertyNames: string[] = [];
  const nameId = (list: string[], n: string) => { let i = list.indexOf(n); if (i < 0) { i = list.length; list.push(n); } return i; };
  const same = kb.same ?? [], different = kb.different ?? [];
  const input = {
    classPred: Int32Array.from(kb.classFacts.map(([c]) => nameId(classNames, c))),
    classInd: Int32Array.from(kb.classFacts.map(([, a]) => ind(a))),
    propPred: Int32Array.from(kb.propertyFacts.map(([r]) => nameId(propertyNames, r))),
    propSubj: Int32Array.from(kb.propertyFacts.map(([, a]) => ind(a))),
    propObj: Int32Array.from(kb.propertyFacts.map(([, , b]) => ind(b))),
    sameA: Int32Array.from(same.map(([a]) => ind(a))), sameB: Int32Array.from(same.map(([, b]) => ind(b))),
    diffA: Int32Array.from(different.map(([a]) => ind(a))), diffB: Int32Array.from(different.map(([, b]) => ind(b))),
    classNames, propertyNames,
  };
  return { input: { ...input, individuals: individuals.length }, individuals };
}

/**
 * Runs the engine on a rule program and the knowledge base's facts; facts as `C(a)`, `R(a,b)`, `a=b` (internal names
 * left out), or null if inconsistent; also how many anonymous elements the run made and, on the published rewriting,
 * how many merges outside its exactness argument it counted.
 */
export async function programFacts(
  program: RuleProgram,
  kb: TinyKb,
  limits?: ResourceLimits,
  path: 'optimised' | 'plain' = 'optimised',
): Promise<{ facts: Set<string> | null; anonymous: number; copiedMerges: number }> {
  const { input, individuals } = inputOf(kb);
  const facts = new Set<string>();
  const outcome = await entail(program, input, {
    unary: (c, i) => { if (!isFreshName(c)) facts.add(`${c}(${individuals[i]})`); },
    binary: (p, s, o) => { if (!isFreshName(p)) facts.add(`${p}(${individuals[s]},${individuals[o]})`); },
    same: (a, b) => facts.add(`${individuals[a]}=${individuals[b]}`),
  }, { guard: new Guard(limits), path });
  return { facts: outcome.status === 'ok' ? facts : null, anonymous: outcome.stats.anonymousElements, copiedMerges: outcome.stats.copiedMerges };
}

/** Runs the chase on the one-rule-per-axiom program of the knowledge base; facts as above, or null if inconsistent. */
export async function engineFacts(kb: TinyKb, path: 'optimised' | 'plain' = 'optimised', limits?: ResourceLimits): Promise<Set<string> | null> {
  return (await programFacts(rewriteOntology(normalOf(kb)), kb, limits, path)).facts;
}

/** Facts as one sorted line, or "inconsistent". */
export const sortedFacts = (s: Set<string> | null) => (s === null ? 'inconsistent' : [...s].sort().join(' '));

export const sub = (body: string[], head: string[]): NormalAxiom => ({ kind: 'subsumption', body, head, source: SOURCE });
export const role = (name: string, inverse = false): PropertyRef => ({ name, inverse });
export const some = (a: string, r: PropertyRef, b: string | null): NormalAxiom => ({ kind: 'exists', sub: a, property: r, filler: b, source: SOURCE });
export const only = (a: string, r: PropertyRef, b: string | null): NormalAxiom => ({ kind: 'forall', sub: a, property: r, filler: b, source: SOURCE });
export const atLeast = (a: string, n: number, r: PropertyRef, b: string | null): NormalAxiom => ({ kind: 'atLeast', sub: a, n, property: r, filler: b, source: SOURCE });
export const atMost = (a: string, n: number, r: PropertyRef, b: string | null): NormalAxiom => ({ kind: 'atMost', sub: a, n, property: r, filler: b, source: SOURCE });
export const incl = (r: PropertyRef, s: PropertyRef): NormalAxiom => ({ kind: 'propertyInclusion', sub: r, sup: s, source: SOURCE });
export const disjointRoles = (r: PropertyRef, s: PropertyRef): NormalAxiom => ({ kind: 'propertyDisjointness', properties: [r, s], source: SOURCE });

export interface KbShape {
  readonly classes: number;
  readonly properties: number;
  readonly individuals: number;
  readonly axioms: number;
  readonly facts: number;
  /** Allow disjunctive heads and ≤n with n ≥ 2. */
  readonly disjunctive: boolean;
  /** Allow ∃ and ≥n (existential heads). */
  readonly existential: boolean;
  /** Existentials only from class Ai to fillers Aj with j > i (an acyclic TBox: the Skolem chase is finite). */
  readonly acyclic?: boolean;
  /** Allow ≤n (default true); without it the optimised path blocks on single labels (chase/blocking.ts). */
  readonly atMost?: boolean;
}

/** Random tiny knowledge bases of the given shape. */
export function tinyKb(shape: KbShape): fc.Arbitrary<TinyKb> {
  const cls = fc.integer({ min: 0, max: shape.classes - 1 });
  const className = cls.map((i) => `A${i}`);
  const prop = fc.record({ name: fc.integer({ min: 0, max: shape.properties - 1 }).map((i) => `R${i}`), inverse: fc.boolean() });
  const filler = fc.option(className, { freq: 4 });
  // ⊥ heads are rarer than others, so that most random knowledge bases stay consistent.
  const heads = fc.oneof({ arbitrary: fc.constant([] as string[]), weight: 1 }, { arbitrary: fc.array(className, { minLength: 1, maxLength: shape.disjunctive ? 3 : 1 }), weight: 6 });
  const kinds: fc.Arbitrary<NormalAxiom>[] = [
    fc.tuple(fc.array(className, { minLength: 0, maxLength: 2 }), heads).map(([b, h]) => sub([...new Set(b)], [...new Set(h)])),
    fc.tuple(fc.array(className, { minLength: 1, maxLength: 2 }), className).map(([b, h]) => sub([...new Set(b)], [h])),
    fc.tuple(className, prop, fc.option(className, { freq: 8 })).map(([a, r, b]) => only(a, r, b)),
    // Kept in its place (the order of the kinds fixes what each seed of the suites draws).
    ...(shape.atMost === false ? [] : [fc.tuple(className, fc.integer({ min: 0, max: shape.disjunctive ? 2 : 1 }), prop, filler).map(([a, n, r, b]) => atMost(a, n, r, b))]),
    fc.tuple(prop, prop).map(([r, s]) => incl(r, s)),
    fc.tuple(prop, prop).filter(([r, s]) => r.name !== s.name).map(([r, s]) => disjointRoles(r, s)),
  ];
  if (shape.existential) {
    const pair = shape.acyclic
      ? fc.tuple(cls, cls).filter(([i, j]) => i < j).map(([i, j]) => [`A${i}`, `A${j}`] as const)
      : fc.tuple(className, className);
    kinds.push(
      fc.tuple(pair, prop, fc.boolean()).map(([[a, b], r, top]) => some(a, r, top ? null : b)),
      fc.tuple(pair, prop).map(([[a, b], r]) => some(a, r, b)),
      fc.tuple(pair, fc.integer({ min: 2, max: 3 }), prop).map(([[a, b], n, r]) => atLeast(a, n, r, b)),
    );
  }
  const individual = fc.integer({ min: 0, max: shape.individuals - 1 }).map((i) => `i${i}`);
  const propName = fc.integer({ min: 0, max: shape.properties - 1 }).map((i) => `R${i}`);
  return fc.record({
    axioms: fc.array(fc.oneof(...kinds), { minLength: 1, maxLength: shape.axioms }),
    classFacts: fc.array(fc.tuple(className, individual), { minLength: 1, maxLength: shape.facts }),
    propertyFacts: fc.array(fc.tuple(propName, individual, individual), { maxLength: shape.facts }),
    same: fc.array(fc.tuple(individual, individual), { maxLength: 1 }),
    different: fc.array(fc.tuple(individual, individual).filter(([a, b]) => a !== b), { maxLength: 2 }),
  });
}

/** Compact text of a knowledge base for failure messages. */
export function describeKb(kb: TinyKb): string {
  return JSON.stringify({ ...kb, axioms: kb.axioms.map(({ source: _s, ...a }) => a) });
}
