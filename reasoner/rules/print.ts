// Printer of rules in standard logical notation: body → head, with ∧, ∨, ∃, ≈, ≉, ⊤ and ⊥.

import { FRESH_PREFIX, isFreshName } from '../model/normal.js';
import { DISTINCT, EQUALS, isBuiltin, type Atom, type HeadDisjunct, type Rule } from './types.js';

/** How a predicate name is shown; the default writes IRIs in angle brackets and fresh names as `⟨fresh:…⟩`. */
export type NameStyle = (predicate: string) => string;

/** Default style: `<IRI>`, fresh names as `⟨fresh:n⟩` (they can never be confused with an IRI). */
export const fullNames: NameStyle = (p) => {
  if (isBuiltin(p)) return p;
  if (isFreshName(p)) return `⟨fresh:${p.slice(FRESH_PREFIX.length)}⟩`;
  return `<${p}>`;
};

/**
 * A compact style: the part of the IRI after the last `#` or `/` when that local name is unambiguous in `names`,
 * else the full `<IRI>`. Returns the style function.
 */
export function shortNames(names: Iterable<string>): NameStyle {
  const counts = new Map<string, number>();
  const local = (iri: string) => iri.slice(Math.max(iri.lastIndexOf('#'), iri.lastIndexOf('/')) + 1);
  for (const n of names) if (!isBuiltin(n) && !isFreshName(n)) counts.set(local(n), (counts.get(local(n)) ?? 0) + 1);
  return (p) => {
    if (isBuiltin(p) || isFreshName(p)) return fullNames(p);
    const l = local(p);
    return l !== '' && /^[\p{L}_][\p{L}\p{N}_.-]*$/u.test(l) && counts.get(l) === 1 ? l : `<${p}>`;
  };
}

/** Returns one atom as text: `A(x)`, `R(x, y)`, `x ≈ y`, `x ≉ y`. */
export function printAtom(atom: Atom, name: NameStyle = fullNames): string {
  if (atom.predicate === EQUALS || atom.predicate === DISTINCT) return `${atom.args[0]} ${atom.predicate} ${atom.args[1]}`;
  return `${name(atom.predicate)}(${atom.args.join(', ')})`;
}

function printDisjunct(d: HeadDisjunct, name: NameStyle, parenthesise: boolean): string {
  const body = d.atoms.map((a) => printAtom(a, name)).join(' ∧ ');
  if (d.exists.length > 0) return `∃${d.exists.join(', ')}. ${d.atoms.length > 1 ? `(${body})` : body}`;
  return parenthesise && d.atoms.length > 1 ? `(${body})` : body;
}

/** Returns the rule as `body → head`; an empty body prints as ⊤, an empty head as ⊥. */
export function printRule(rule: Rule, name: NameStyle = fullNames): string {
  const body = rule.body.length === 0 ? '⊤' : rule.body.map((a) => printAtom(a, name)).join(' ∧ ');
  const head = rule.head.length === 0 ? '⊥' : rule.head.map((d) => printDisjunct(d, name, rule.head.length > 1)).join(' ∨ ');
  return `${body} → ${head}`;
}
