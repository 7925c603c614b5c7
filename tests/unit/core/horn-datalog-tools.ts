// Test helpers for the Horn path: a tiny knowledge base as a normal form, and the engine run on a given rule program
// (the Datalog rewriting or the one-rule-per-axiom program), with facts as `C(a)`, `R(a,b)`, `a=b`.

import type { NormalOntology } from '../../../reasoner/model/normal.js';
import type { RuleProgram } from '../../../reasoner/rules/types.js';
import { entail, type ChaseInput } from '../../../reasoner/chase/entail.js';
import { Guard } from '../../../reasoner/chase/guard.js';
import type { TinyKb } from '../../reference/asp-reference.js';
import type { ResourceLimits } from '../../../reasoner/api.js';

/** The normal form of the knowledge base's TBox, with its signature. */
export function normalOf(kb: TinyKb): NormalOntology {
  const classes = new Set<string>(), properties = new Set<string>();
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

/** Runs the engine on the program and the knowledge base's facts; null if inconsistent. */
export async function programFacts(program: RuleProgram, kb: TinyKb, limits?: ResourceLimits): Promise<{ facts: Set<string> | null; anonymous: number }> {
  const { input, individuals } = inputOf(kb);
  const facts = new Set<string>();
  const outcome = await entail(program, input, {
    unary: (c, i) => facts.add(`${c}(${individuals[i]})`),
    binary: (p, s, o) => facts.add(`${p}(${individuals[s]},${individuals[o]})`),
    same: (a, b) => facts.add(`${individuals[a]}=${individuals[b]}`),
  }, { guard: new Guard(limits) });
  return { facts: outcome.status === 'ok' ? facts : null, anonymous: outcome.stats.anonymousElements };
}

/** Facts as one sorted line, or "inconsistent". */
export const sortedFacts = (s: Set<string> | null) => (s === null ? 'inconsistent' : [...s].sort().join(' '));
