// ASP-Core-2 export of the existential-free part of a rule program (ASP-Core-2 Input Language Format, 2013: §2 syntax).

import { isFreshName } from '../model/normal.js';
import { DISTINCT, EQUALS, TOP, type Atom, type Rule, type RuleProgram } from './types.js';
import { ruleShape } from './types.js';

/**
 * Predicate names become ASP identifiers: `c<N>`/`r<N>` (class / property, numbered in program order) so any IRI
 * is safe; the mapping is written as comments at the top. `⊤` becomes `top/1`, which every element satisfies.
 * Equality needs the equality axioms spelled out in ASP (no built-in merging of constants): `eq/2` is made
 * reflexive on elements, symmetric and transitive, and every predicate is closed under substitution of equals.
 */
export interface AspExport {
  readonly text: string;
  /** Rules left out because they have an existential head (ASP has no existential quantification). */
  readonly omitted: number;
  /** Predicate name → ASP identifier, for writing facts against the program. */
  readonly predicateIds: ReadonlyMap<string, string>;
}

/** Writes the existential-free rules of the program as an ASP-Core-2 program. Disjunction uses `;` (ASP-Core-2 §2.2). */
export function toAsp(program: RuleProgram): AspExport {
  const ids = new Map<string, string>();
  const lines: string[] = ['% Existential-free part of a Thence rule program, in ASP-Core-2.'];
  let nc = 0, nr = 0;
  const unary = new Set<string>(), binary = new Set<string>();
  const collect = (a: Atom) => {
    if (a.predicate === EQUALS || a.predicate === DISTINCT || a.predicate === TOP) return;
    (a.args.length === 1 ? unary : binary).add(a.predicate);
  };
  for (const r of program.rules) { r.body.forEach(collect); r.head.forEach((d) => d.atoms.forEach(collect)); }
  for (const c of program.classes) unary.add(c);
  for (const p of program.properties) binary.add(p);
  for (const p of unary) { const id = `c${nc++}`; ids.set(p, id); lines.push(`% ${id} = ${isFreshName(p) ? 'internal name' : p}`); }
  for (const p of binary) { const id = `r${nr++}`; ids.set(p, id); lines.push(`% ${id} = ${isFreshName(p) ? 'internal name' : p}`); }

  const atom = (a: Atom): string => {
    const args = a.args.map((v) => v.toUpperCase().replace(/[^A-Z0-9_]/g, '_'));
    if (a.predicate === EQUALS) return `eq(${args[0]},${args[1]})`;
    if (a.predicate === DISTINCT) return `neq(${args[0]},${args[1]})`;
    if (a.predicate === TOP) return `top(${args[0]})`;
    return `${ids.get(a.predicate)}(${args.join(',')})`;
  };
  let omitted = 0;
  for (const r of program.rules) {
    const shape = ruleShape(r);
    if (shape === 'existential') { omitted++; continue; }
    // Every head variable occurs in the body (safety, ASP-Core-2 §2.4) because the rewriting binds all of them.
    const body = r.body.map(atom);
    const bodyVars = new Set(r.body.flatMap((a) => a.args));
    for (const d of r.head) for (const a of d.atoms) for (const v of a.args) if (!bodyVars.has(v)) body.push(`top(${v.toUpperCase()})`);
    if (r.head.length === 1 && r.head[0]!.atoms.length > 1) {
      // A conjunctive head is written as one rule per conjunct (same meaning).
      for (const a of r.head[0]!.atoms) lines.push(`${atom(a)} :- ${body.join(', ')}.`);
      continue;
    }
    if (r.head.some((d) => d.atoms.length > 1)) {
      // ASP-Core-2 heads are disjunctions of atoms; the rewriting never produces a conjunction inside a disjunction.
      omitted++;
      continue;
    }
    const head = r.head.map((d) => atom(d.atoms[0]!)).join(' ; ');
    lines.push(head === '' ? `:- ${body.join(', ')}.` : `${head} :- ${body.join(', ')}.`);
  }
  const text = lines.join('\n');
  const usesTop = text.includes('top('), usesEquality = text.includes('eq(');
  if (usesTop || usesEquality) {
    lines.push('% every element satisfies top');
    for (const p of unary) lines.push(`top(X) :- ${ids.get(p)}(X).`);
    for (const p of binary) lines.push(`top(X) :- ${ids.get(p)}(X,_).`, `top(Y) :- ${ids.get(p)}(_,Y).`);
  }
  if (usesEquality) {
    // Only programs with ≈ or ≉ need the equality axioms (they make grounding much larger).
    lines.push('% equality is a congruence', 'eq(X,X) :- top(X).', 'eq(Y,X) :- eq(X,Y).', 'eq(X,Z) :- eq(X,Y), eq(Y,Z).', ':- eq(X,Y), neq(X,Y).', 'neq(Y,X) :- neq(X,Y).');
    for (const p of unary) lines.push(`${ids.get(p)}(Y) :- ${ids.get(p)}(X), eq(X,Y).`);
    for (const p of binary) lines.push(`${ids.get(p)}(Y,Z) :- ${ids.get(p)}(X,Z), eq(X,Y).`, `${ids.get(p)}(X,Z) :- ${ids.get(p)}(X,Y), eq(Y,Z).`);
  }
  return { text: lines.join('\n') + '\n', omitted, predicateIds: ids };
}
