// The Horn path against clingo (Debian package gringo): (1) the SAME Datalog program, exported as ASP-Core-2 by
// reasoner/rules/asp.ts with the knowledge base's facts, has one answer set, which must equal the engine's least model
// over the named individuals; (2) for acyclic existentials, clingo on the separately written Skolem encoding of
// tests/reference/asp-reference.ts (exact there) must give the same facts as the Datalog program.

import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { describeKb, tinyKb, type KbShape, normalOf, programFacts, sortedFacts } from './kb-tools.js';
import { rewriteHornToDatalog } from '../../../reasoner/rewrite/horn/index.js';
import { toAsp } from '../../../reasoner/rules/asp.js';
import type { RuleProgram } from '../../../reasoner/rules/types.js';
import { aspProgram, clingoFacts, CLINGO, requireClingo, type TinyKb } from '../../reference/asp-reference.js';

/** The program's ASP-Core-2 export plus the knowledge base's facts, solved by clingo; facts as `C(a)`, `R(a,b)`, `a=b`. */
function clingoOnProgram(program: RuleProgram, kb: TinyKb): Set<string> | null {
  requireClingo();
  const vocabulary = { ...program, classes: [...new Set([...program.classes, ...kb.classFacts.map(([c]) => c)])], properties: [...new Set([...program.properties, ...kb.propertyFacts.map(([r]) => r)])] };
  const asp = toAsp(vocabulary);
  const id = (p: string) => asp.predicateIds.get(p)!;
  const lines = [asp.text];
  // Every individual is an element of the domain, also one named only in a sameAs or differentFrom fact.
  const individuals = new Set([...kb.classFacts.map(([, a]) => a), ...kb.propertyFacts.flatMap(([, a, b]) => [a, b]), ...[...(kb.same ?? []), ...(kb.different ?? [])].flat()]);
  for (const a of individuals) lines.push(`top(${a}).`);
  for (const [c, a] of kb.classFacts) lines.push(`${id(c)}(${a}).`);
  for (const [r, a, b] of kb.propertyFacts) lines.push(`${id(r)}(${a},${b}).`);
  for (const [a, b] of kb.same ?? []) lines.push(`eq(${a},${b}).`);
  for (const [a, b] of kb.different ?? []) lines.push(`neq(${a},${b}).`);
  if ((kb.same?.length || kb.different?.length) && !asp.text.includes('eq(X,X)')) {
    // The export spells out the equality axioms only when the program uses ≈ or ≉; the input facts do here.
    lines.push('eq(X,X) :- top(X).', 'eq(Y,X) :- eq(X,Y).', 'eq(X,Z) :- eq(X,Y), eq(Y,Z).', ':- eq(X,Y), neq(X,Y).', 'neq(Y,X) :- neq(X,Y).');
    for (const [p, q] of asp.predicateIds) lines.push(q.startsWith('c') ? `${q}(Y) :- ${q}(X), eq(X,Y).` : `${q}(Y,Z) :- ${q}(X,Z), eq(X,Y).\n${q}(X,Z) :- ${q}(X,Y), eq(Y,Z).`);
    if (!asp.text.includes('top(X) :-')) for (const [, q] of asp.predicateIds) lines.push(q.startsWith('c') ? `top(X) :- ${q}(X).` : `top(X) :- ${q}(X,_).\ntop(Y) :- ${q}(_,Y).`);
  }
  let out: string;
  try {
    out = execFileSync(CLINGO, ['--mode=clingo', '-n', '1', '--outf=0', '--warn=none'], { input: lines.join('\n') + '\n', encoding: 'utf8', maxBuffer: 1 << 26 });
  } catch (e) {
    // clingo's exit status encodes the result (10 satisfiable, 20 unsatisfiable, 30 exhausted): not an error.
    const err = e as { status?: number; stdout?: string; stderr?: string };
    if (err.status !== 10 && err.status !== 20 && err.status !== 30) throw new Error(`clingo failed (${err.status}): ${err.stderr}`);
    out = err.stdout ?? '';
  }
  const outLines = out.split('\n').map((l) => l.trim());
  if (outLines.includes('UNSATISFIABLE')) return null;
  const at = outLines.findIndex((l) => l.startsWith('Answer:'));
  if (at < 0) throw new Error(`clingo printed no answer:\n${out}`);
  const name = new Map([...asp.predicateIds].map(([p, q]) => [q, p]));
  const user = new Set([...kb.classFacts.map(([c]) => c), ...kb.propertyFacts.map(([r]) => r), ...normalOf(kb).classes, ...normalOf(kb).properties]);
  const facts = new Set<string>();
  for (const m of (outLines[at + 1] ?? '').matchAll(/([a-z]\w*)\(([^)]*)\)/g)) {
    const args = m[2]!.split(',');
    if (m[1] === 'eq') { if (args[0] !== args[1]) facts.add(`${args[0]}=${args[1]}`); continue; }
    const p = name.get(m[1]!);
    if (p === undefined || !user.has(p)) continue;
    facts.add(args.length === 1 ? `${p}(${args[0]})` : `${p}(${args[0]},${args[1]})`);
  }
  return facts;
}

/** Engine facts restricted to what clingo is asked about (user vocabulary). */
async function engineOnDatalog(program: RuleProgram, kb: TinyKb): Promise<Set<string> | null> {
  return (await programFacts(program, kb)).facts;
}

const horn = (s: Omit<KbShape, 'disjunctive' | 'existential'>, acyclic = false): KbShape => ({ ...s, disjunctive: false, existential: true, acyclic });

describe('Horn Datalog rewriting against clingo', () => {
  it('finds clingo on this machine (fails loudly when gringo is not installed)', () => {
    expect(() => requireClingo()).not.toThrow();
  });

  it('the exported Datalog program has one answer set, equal to the engine\'s model (250 random knowledge bases)', async () => {
    await fc.assert(fc.asyncProperty(tinyKb(horn({ classes: 4, properties: 2, individuals: 3, axioms: 8, facts: 5 })), async (kb) => {
      const program = rewriteHornToDatalog(normalOf(kb));
      expect(sortedFacts(await engineOnDatalog(program, kb)), describeKb(kb)).toBe(sortedFacts(clingoOnProgram(program, kb)));
    }), { numRuns: 250, seed: 8080 });
  }, 120_000);

  it('acyclic existentials: the Datalog program gives the facts of clingo on the Skolem encoding (150 random)', async () => {
    const shape = horn({ classes: 4, properties: 2, individuals: 3, axioms: 7, facts: 4 }, true);
    await fc.assert(fc.asyncProperty(tinyKb(shape), async (kb) => {
      const reference = clingoFacts(aspProgram(kb, shape.classes + 1));
      expect(sortedFacts(await engineOnDatalog(rewriteHornToDatalog(normalOf(kb)), kb)), describeKb(kb)).toBe(sortedFacts(reference));
    }), { numRuns: 150, seed: 9090 });
  }, 120_000);

  it('larger knowledge bases (40 individuals, 60 facts): the engine and clingo agree on the same Datalog program', async () => {
    await fc.assert(fc.asyncProperty(tinyKb(horn({ classes: 6, properties: 3, individuals: 40, axioms: 12, facts: 60 })), async (kb) => {
      const program = rewriteHornToDatalog(normalOf(kb));
      expect(sortedFacts(await engineOnDatalog(program, kb)), describeKb(kb)).toBe(sortedFacts(clingoOnProgram(program, kb)));
    }), { numRuns: 12, seed: 1212 });
  }, 120_000);
});
