// The chase's fact store and rule printing: undo to a mark restores exactly the earlier store (property test against a
// plain set model), and rules print in standard logical notation and export to ASP-Core-2 that clingo accepts.

import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { FactStore } from '../../../reasoner/chase/store.js';
import { printRule } from '../../../reasoner/rules/print.js';
import { toAsp } from '../../../reasoner/rules/asp.js';
import { rewriteOntology } from '../../../reasoner/rewrite/rules-from-normal.js';
import { atLeast, atMost, only, role, some, sub } from './kb-tools.js';
import { requireClingo } from '../../reference/asp-reference.js';
import { execFileSync } from 'node:child_process';

type Op = { kind: 'unary'; p: number; e: number } | { kind: 'binary'; p: number; s: number; o: number } | { kind: 'mark' } | { kind: 'undo' } | { kind: 'element' };

const ops = fc.array(fc.oneof(
  fc.record({ kind: fc.constant('unary' as const), p: fc.integer({ min: 0, max: 3 }), e: fc.integer({ min: 0, max: 5 }) }),
  fc.record({ kind: fc.constant('binary' as const), p: fc.integer({ min: 0, max: 2 }), s: fc.integer({ min: 0, max: 5 }), o: fc.integer({ min: 0, max: 5 }) }),
  fc.constant({ kind: 'mark' as const }), fc.constant({ kind: 'undo' as const }), fc.constant({ kind: 'element' as const }),
), { maxLength: 400 });

describe('fact store', () => {
  it('undo restores rows, indexes and hash sets exactly (against a set model)', () => {
    fc.assert(fc.property(ops, (list) => {
      const st = new FactStore(4, 3, 3);
      let model = new Set<string>(['u0 0', 'u0 1', 'u0 2']), elements = 3; // every element has ⊤
      const marks: { m: ReturnType<FactStore['mark']>; model: Set<string>; elements: number }[] = [];
      for (const op of list) {
        if (op.kind === 'mark') marks.push({ m: st.mark(), model: new Set(model), elements });
        else if (op.kind === 'undo') { const t = marks.pop(); if (t) { st.undo(t.m); model = t.model; elements = t.elements; } }
        else if (op.kind === 'element') { st.newElement(0); model.add(`u0 ${elements}`); elements++; }
        else if (op.kind === 'unary') { const e = op.e % elements; expect(st.addUnary(op.p, e, -1)).toBe(!model.has(`u${op.p} ${e}`)); model.add(`u${op.p} ${e}`); }
        else { const s = op.s % elements, o = op.o % elements; expect(st.addBinary(op.p, s, o, -1)).toBe(!model.has(`b${op.p} ${s} ${o}`)); model.add(`b${op.p} ${s} ${o}`); }
      }
      // Every index agrees with the model.
      const seen = new Set<string>();
      for (let p = 0; p < 4; p++) for (let r = st.firstUnaryOf(p); r >= 0; r = st.nextUnaryByPred(r)) seen.add(`u${p} ${st.unaryElem[r]}`);
      for (let p = 0; p < 3; p++) for (let r = st.firstBinaryOf(p); r >= 0; r = st.nextBinaryByPred(r)) seen.add(`b${p} ${st.binarySubj[r]} ${st.binaryObj[r]}`);
      expect([...seen].sort()).toEqual([...model].sort());
      for (const k of model) {
        const [head, ...rest] = k.split(' ');
        const p = Number(head!.slice(1)), args = rest.map(Number);
        if (head![0] === 'u') expect(st.hasUnary(p, args[0]!)).toBe(true);
        else {
          expect(st.hasBinary(p, args[0]!, args[1]!)).toBe(true);
          let found = false;
          for (let r = st.firstBinaryFrom(p, args[0]!); r >= 0; r = st.nextBinaryFrom(r)) if (st.binaryObj[r] === args[1]) found = true;
          expect(found).toBe(true);
        }
      }
      expect(st.elementCount).toBe(elements);
    }), { numRuns: 300, seed: 9 });
  });
});

describe('rule notation', () => {
  const name = (p: string) => p; // bare names for the check
  it('prints the rule shapes in standard logical notation (body → head with ∧, ∨, ∃, ≈, ≉, ⊥)', () => {
    const program = rewriteOntology({
      axioms: [sub(['A', 'B'], ['C', 'D']), sub(['A'], []), some('A', role('R'), 'B'), only('A', role('R', true), 'B'), atLeast('A', 2, role('R'), null), atMost('A', 1, role('R'), 'B')],
      classes: ['A', 'B', 'C', 'D'], properties: ['R'], assertions: [],
    });
    expect(program.rules.map((r) => printRule(r, name))).toEqual([
      'A(x) ∧ B(x) → C(x) ∨ D(x)',
      'A(x) → ⊥',
      'A(x) → ∃y. (R(x, y) ∧ B(y))',
      'A(x) ∧ R(y, x) → B(y)',
      'A(x) → ∃y1, y2. (R(x, y1) ∧ R(x, y2) ∧ y1 ≉ y2)',
      'A(x) ∧ R(x, y1) ∧ B(y1) ∧ R(x, y2) ∧ B(y2) → y1 ≈ y2',
    ]);
  });

  // ASP-Core-2 (2013) §2: disjunction ";" in heads, constraints ":- body."; clingo must accept the export as is.
  it('exports the existential-free part as ASP-Core-2 that clingo grounds and solves', () => {
    requireClingo();
    const program = rewriteOntology({ axioms: [sub(['A'], ['B', 'C']), sub(['B'], ['D']), sub(['C'], ['D']), some('D', role('R'), 'D'), atMost('A', 1, role('R'), null)], classes: ['A', 'B', 'C', 'D'], properties: ['R'], assertions: [] });
    const asp = toAsp(program);
    expect(asp.omitted).toBe(1);
    const a = asp.predicateIds.get('A')!, d = asp.predicateIds.get('D')!;
    const text = `${asp.text}${a}(k).\n#show ${d}/1.\n`;
    let out = '';
    try { out = execFileSync('/usr/bin/clingo', ['-n', '0', '--enum-mode=cautious'], { input: text, encoding: 'utf8' }); } catch (e) { out = (e as { stdout: string }).stdout; }
    expect(out).toMatch(new RegExp(`Answer: \\d+\\n${d}\\(k\\)`));
  });
});
