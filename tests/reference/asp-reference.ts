// Reference for the reasoner core's tests: a direct ASP encoding of a normal-form knowledge base, solved by clingo
// (Debian package gringo). Written separately from reasoner/rewrite: its own predicates (inst/2, rel/3, eq/2), and
// existentials as Skolem terms with a depth bound, so that acyclic ontologies are encoded exactly.

import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import type { NormalAxiom, PropertyRef } from '../../reasoner/model/normal.js';

export const CLINGO = '/usr/bin/clingo';

/** Fails loudly (the tests must not silently skip the outside reference). */
export function requireClingo(): void {
  if (!existsSync(CLINGO)) throw new Error(`${CLINGO} is missing: install the Debian package gringo (apt-get install gringo)`);
}

/** A small knowledge base over plain names: classes, properties, individuals are short strings. */
export interface TinyKb {
  readonly axioms: readonly NormalAxiom[];
  readonly classFacts: readonly (readonly [string, string])[];
  readonly propertyFacts: readonly (readonly [string, string, string])[];
  readonly same?: readonly (readonly [string, string])[];
  readonly different?: readonly (readonly [string, string])[];
}

const q = (s: string) => JSON.stringify(s);

/** rel(R, X, Y) for R, rel(R, Y, X) for R⁻. */
function rel(p: PropertyRef, x: string, y: string): string {
  return p.inverse ? `rel(${q(p.name)},${y},${x})` : `rel(${q(p.name)},${x},${y})`;
}

/**
 * The ASP program. `depth` bounds the nesting of Skolem terms (each existential restriction A ⊑ ∃R.B, ≥n R.B gives
 * function symbols applied to the element that needs the successor): exact for ontologies whose existentials do not
 * recur deeper than `depth`, and a sound lower bound otherwise.
 */
export function aspProgram(kb: TinyKb, depth = 4): string {
  const lines: string[] = [];
  const individuals = new Set<string>();
  for (const [, a] of kb.classFacts) individuals.add(a);
  for (const [, a, b] of kb.propertyFacts) { individuals.add(a); individuals.add(b); }
  for (const [a, b] of [...(kb.same ?? []), ...(kb.different ?? [])]) { individuals.add(a); individuals.add(b); }
  for (const a of individuals) lines.push(`named(${q(a)}). lvl(${q(a)},0).`);
  for (const [c, a] of kb.classFacts) lines.push(`inst(${q(c)},${q(a)}).`);
  for (const [r, a, b] of kb.propertyFacts) lines.push(`rel(${q(r)},${q(a)},${q(b)}).`);
  for (const [a, b] of kb.same ?? []) lines.push(`eq(${q(a)},${q(b)}).`);
  for (const [a, b] of kb.different ?? []) lines.push(`neq(${q(a)},${q(b)}).`);
  const inst = (c: string, v: string) => `inst(${q(c)},${v})`;
  kb.axioms.forEach((ax, k) => {
    switch (ax.kind) {
      case 'subsumption': {
        const body = ax.body.length === 0 ? ['dom(X)'] : ax.body.map((b) => inst(b, 'X'));
        lines.push(`${ax.head.map((h) => inst(h, 'X')).join(' ; ')} :- ${body.join(', ')}.`);
        break;
      }
      case 'forall':
        lines.push(`${ax.filler === null ? '' : inst(ax.filler, 'Y')} :- ${inst(ax.sub, 'X')}, ${rel(ax.property, 'X', 'Y')}.`);
        break;
      case 'exists':
      case 'atLeast': {
        const n = ax.kind === 'exists' ? 1 : ax.n;
        const guard = `${inst(ax.sub, 'X')}, lvl(X,N), N < ${depth}`;
        for (let j = 0; j < n; j++) {
          const t = `sk${k}_${j}(X)`;
          lines.push(`${rel(ax.property, 'X', t)} :- ${guard}.`, `lvl(${t},N+1) :- ${guard}.`);
          if (ax.filler !== null) lines.push(`${inst(ax.filler, t)} :- ${guard}.`);
          for (let i = 0; i < j; i++) lines.push(`neq(sk${k}_${i}(X),${t}) :- ${guard}.`);
        }
        break;
      }
      case 'atMost': {
        const ys = Array.from({ length: ax.n + 1 }, (_, i) => `Y${i}`);
        const body = [inst(ax.sub, 'X'), ...ys.flatMap((y) => [rel(ax.property, 'X', y), ...(ax.filler === null ? [] : [inst(ax.filler, y)])])];
        const head: string[] = [];
        for (let i = 0; i < ys.length; i++) for (let j = i + 1; j < ys.length; j++) head.push(`eq(${ys[i]},${ys[j]})`);
        lines.push(`${head.join(' ; ')} :- ${body.join(', ')}.`);
        break;
      }
      case 'propertyInclusion':
        lines.push(`${rel(ax.sup, 'X', 'Y')} :- ${rel(ax.sub, 'X', 'Y')}.`);
        break;
      case 'propertyDisjointness':
        lines.push(`:- ${rel(ax.properties[0], 'X', 'Y')}, ${rel(ax.properties[1], 'X', 'Y')}.`);
        break;
    }
  });
  // The domain, and equality as a congruence (no unique name assumption: OWL 2 Direct Semantics §2.2).
  lines.push(
    'dom(X) :- lvl(X,_).',
    'eq(X,X) :- dom(X).', 'eq(Y,X) :- eq(X,Y).', 'eq(X,Z) :- eq(X,Y), eq(Y,Z).',
    'neq(Y,X) :- neq(X,Y).', ':- eq(X,Y), neq(X,Y).',
    'inst(C,Y) :- inst(C,X), eq(X,Y).', 'rel(R,Y,Z) :- rel(R,X,Z), eq(X,Y).', 'rel(R,X,Z) :- rel(R,X,Y), eq(Y,Z).',
    'neq(Y,Z) :- neq(X,Z), eq(X,Y).',
    'out_inst(C,X) :- inst(C,X), named(X).', 'out_rel(R,X,Y) :- rel(R,X,Y), named(X), named(Y).',
    'out_eq(X,Y) :- eq(X,Y), named(X), named(Y), X != Y.',
    '#show out_inst/2. #show out_rel/3. #show out_eq/2.',
  );
  return lines.join('\n') + '\n';
}

/** The facts clingo finds in every answer set (cautious consequences), as `C(a)`, `R(a,b)`, `a=b`; null if unsatisfiable. */
export function clingoFacts(program: string): Set<string> | null {
  requireClingo();
  let out: string;
  try {
    out = execFileSync(CLINGO, ['--mode=clingo', '-n', '0', '--enum-mode=cautious', '--outf=0'], { input: program, encoding: 'utf8', maxBuffer: 1 << 28 });
  } catch (e) {
    // clingo's exit status encodes the result (10 satisfiable, 20 unsatisfiable, 30 all models): not an error.
    const err = e as { status?: number; stdout?: string; stderr?: string };
    if (err.status !== 10 && err.status !== 20 && err.status !== 30) throw new Error(`clingo failed (${err.status}): ${err.stderr}`);
    out = err.stdout ?? '';
  }
  const lines = out.split('\n').map((l) => l.trim());
  if (lines.includes('UNSATISFIABLE')) return null;
  // Under --enum-mode=cautious the last answer printed is the intersection of all answer sets (clingo guide, §7.2).
  let at = -1;
  lines.forEach((l, i) => { if (l.startsWith('Answer:')) at = i; });
  if (at < 0) throw new Error(`clingo printed no answer:\n${out}`);
  const last = lines[at + 1] ?? '';
  const facts = new Set<string>();
  for (const m of last.matchAll(/out_(inst|rel|eq)\(([^)]*)\)/g)) {
    const args = [...m[2]!.matchAll(/"((?:[^"\\]|\\.)*)"/g)].map((a) => a[1]!);
    if (m[1] === 'inst') facts.add(`${args[0]}(${args[1]})`);
    else if (m[1] === 'rel') facts.add(`${args[0]}(${args[1]},${args[2]})`);
    else facts.add(`${args[0]}=${args[1]}`);
  }
  return facts;
}
