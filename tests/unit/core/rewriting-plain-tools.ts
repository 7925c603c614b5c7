// Test helper for the published rewriting: runs the chase on the program of rewrite/disjunctive (dynamic blocking
// off) for a tiny knowledge base, and reads off the facts over the original vocabulary.

import { entail, type ChaseInput } from '../../../reasoner/chase/entail.js';
import { Guard } from '../../../reasoner/chase/guard.js';
import { isFreshName } from '../../../reasoner/model/normal.js';
import { rewriteToTerminatingRules } from '../../../reasoner/rewrite/disjunctive/index.js';
import type { ResourceLimits } from '../../../reasoner/api.js';
import type { TinyKb } from '../../reference/asp-reference.js';

/** Class and property names of a tiny knowledge base's axioms and facts. */
function vocabulary(kb: TinyKb): { classes: string[]; properties: string[] } {
  const classes = new Set<string>(kb.classFacts.map(([c]) => c)), properties = new Set<string>(kb.propertyFacts.map(([r]) => r));
  for (const a of kb.axioms) {
    if (a.kind === 'subsumption') { a.body.forEach((c) => classes.add(c)); a.head.forEach((c) => classes.add(c)); }
    else if (a.kind === 'propertyInclusion') { properties.add(a.sub.name); properties.add(a.sup.name); }
    else if (a.kind === 'propertyDisjointness') { properties.add(a.properties[0].name); properties.add(a.properties[1].name); }
    else { classes.add(a.sub); if (a.filler) classes.add(a.filler); properties.add(a.property.name); }
  }
  return { classes: [...classes], properties: [...properties] };
}

/** Facts as `C(a)`, `R(a,b)`, `a=b` (internal names left out), or null if inconsistent; also the run's statistics. */
export async function rewritingFacts(kb: TinyKb, limits?: ResourceLimits): Promise<{ facts: Set<string> | null; anonymous: number }> {
  const { classes, properties } = vocabulary(kb);
  const program = rewriteToTerminatingRules({ axioms: kb.axioms, classes, properties, assertions: [] });
  const individuals: string[] = [], idOf = new Map<string, number>();
  const ind = (n: string) => { let i = idOf.get(n); if (i === undefined) { i = individuals.length; idOf.set(n, i); individuals.push(n); } return i; };
  const same = kb.same ?? [], different = kb.different ?? [];
  const input: ChaseInput = {
    classPred: Int32Array.from(kb.classFacts.map(([c]) => classes.indexOf(c))),
    classInd: Int32Array.from(kb.classFacts.map(([, a]) => ind(a))),
    propPred: Int32Array.from(kb.propertyFacts.map(([r]) => properties.indexOf(r))),
    propSubj: Int32Array.from(kb.propertyFacts.map(([, a]) => ind(a))),
    propObj: Int32Array.from(kb.propertyFacts.map(([, , b]) => ind(b))),
    sameA: Int32Array.from(same.map(([a]) => ind(a))), sameB: Int32Array.from(same.map(([, b]) => ind(b))),
    diffA: Int32Array.from(different.map(([a]) => ind(a))), diffB: Int32Array.from(different.map(([, b]) => ind(b))),
    classNames: classes, propertyNames: properties, individuals: 0,
  };
  const facts = new Set<string>();
  const outcome = await entail(program, { ...input, individuals: individuals.length }, {
    unary: (c, i) => { if (!isFreshName(c)) facts.add(`${c}(${individuals[i]})`); },
    binary: (p, s, o) => { if (!isFreshName(p)) facts.add(`${p}(${individuals[s]},${individuals[o]})`); },
    same: (a, b) => facts.add(`${individuals[a]}=${individuals[b]}`),
  }, { guard: new Guard(limits) });
  return { facts: outcome.status === 'ok' ? facts : null, anonymous: outcome.stats.anonymousElements };
}
