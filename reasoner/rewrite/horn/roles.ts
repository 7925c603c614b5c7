// Roles of the Horn rewriting: a property or its inverse as a string key, the role hierarchy closed under
// inverses (R ⊑ S gives R⁻ ⊑ S⁻, DL Handbook 2003, ch. 2 "role hierarchies"), and the role atoms of the rule language.

import type { NormalAxiom, PropertyRef } from '../../model/normal.js';
import type { Atom } from '../../rules/types.js';

/** A role as a string: the property name, with a trailing U+207B (⁻) for the inverse. No IRI ends in that character. */
export type RoleKey = string;

const INVERSE_MARK = '\u207b';

/** Returns the key of a property reference. */
export function roleKey(p: PropertyRef): RoleKey {
  return p.inverse ? p.name + INVERSE_MARK : p.name;
}

/** Returns the key of the inverse role: R ↦ R⁻, R⁻ ↦ R. */
export function inverseKey(r: RoleKey): RoleKey {
  return r.endsWith(INVERSE_MARK) ? r.slice(0, -1) : r + INVERSE_MARK;
}

/** Returns the property reference of a key. */
export function roleRef(r: RoleKey): PropertyRef {
  return r.endsWith(INVERSE_MARK) ? { name: r.slice(0, -1), inverse: true } : { name: r, inverse: false };
}

/** The atom R(s, t) of a role key; an inverse is written with swapped arguments (no predicate of its own). */
export function roleAtom(r: RoleKey, s: string, t: string): Atom {
  const p = roleRef(r);
  return p.inverse ? { predicate: p.name, args: [t, s] } : { predicate: p.name, args: [s, t] };
}

/** The reflexive-transitive closure ⊑* of the property inclusions, over roles and their inverses. */
export class RoleHierarchy {
  private readonly up = new Map<RoleKey, Set<RoleKey>>();

  constructor(axioms: readonly NormalAxiom[]) {
    const direct = new Map<RoleKey, Set<RoleKey>>();
    const edge = (a: RoleKey, b: RoleKey) => { let s = direct.get(a); if (!s) direct.set(a, (s = new Set())); s.add(b); };
    const roles = new Set<RoleKey>();
    const see = (p: PropertyRef) => { roles.add(roleKey(p)); roles.add(inverseKey(roleKey(p))); };
    for (const a of axioms) {
      if (a.kind === 'propertyInclusion') {
        see(a.sub); see(a.sup);
        edge(roleKey(a.sub), roleKey(a.sup));
        edge(inverseKey(roleKey(a.sub)), inverseKey(roleKey(a.sup)));
      } else if (a.kind === 'propertyDisjointness') { see(a.properties[0]); see(a.properties[1]); }
      else if (a.kind !== 'subsumption') see(a.property);
    }
    // Closure by a search from each role: the hierarchy is small next to the ontology's class axioms.
    for (const r of roles) {
      const seen = new Set<RoleKey>([r]), stack = [r];
      while (stack.length > 0) for (const s of direct.get(stack.pop()!) ?? []) if (!seen.has(s)) { seen.add(s); stack.push(s); }
      this.up.set(r, seen);
    }
  }

  /** Returns { S | R ⊑* S } (R itself included). */
  supers(r: RoleKey): ReadonlySet<RoleKey> {
    return this.up.get(r) ?? new Set([r]);
  }
}
