// Worked examples for the Horn path: the Datalog rewriting on examples from the description-logic literature and the
// OWL 2 documents, each with its source ("from memory" where the example is recalled, not copied). Every case is also
// checked against the chase and, where existentials are acyclic, against clingo on the Skolem reference encoding.

import { describe, expect, it } from 'vitest';
import { atMost, incl, only, role, some, sub, normalOf, programFacts, sortedFacts } from './kb-tools.js';
import { rewriteOntology } from '../../../reasoner/rewrite/rules-from-normal.js';
import { hornDatalog } from '../../../reasoner/rewrite/horn/index.js';
import { aspProgram, clingoFacts, type TinyKb } from '../../reference/asp-reference.js';

/** Facts of the Datalog path, after checking them against the chase (and clingo when `clingo` is set). */
async function horn(kb: TinyKb, clingo = true): Promise<Set<string> | null> {
  const { program } = hornDatalog(normalOf(kb));
  const datalog = await programFacts(program, kb);
  expect(datalog.anonymous).toBe(0);
  expect(sortedFacts(datalog.facts)).toBe(sortedFacts((await programFacts(rewriteOntology(normalOf(kb)), kb)).facts));
  if (clingo) expect(sortedFacts(datalog.facts)).toBe(sortedFacts(clingoFacts(aspProgram(kb, 6))));
  return datalog.facts;
}

const hasChild = role('hasChild'), hasChildInv = role('hasChild', true), hasParent = role('hasParent');

describe('Horn path: worked examples', () => {
  // Y. Kazakov, IJCAI 2009, the rule for ∀ over an inverse role (from memory): from A ⊑ ∃R.B and B ⊑ ∀R⁻.C follows
  // A ⊑ C. Here as the DL Handbook's (Baader et al. 2003, ch. 2, from memory) definition of a parent read from left to
  // right: ∃hasChild.Person ⊑ Parent is normalised to Person ⊑ ∀hasChild⁻.Parent.
  it('a fact sent back from an anonymous successor through an inverse role (Kazakov 2009, ∀ over R⁻)', async () => {
    const kb: TinyKb = {
      axioms: [some('Mother', hasChild, 'Person'), only('Person', hasChildInv, 'Parent')],
      classFacts: [['Mother', 'mary']], propertyFacts: [],
    };
    expect([...(await horn(kb))!].sort()).toEqual(['Mother(mary)', 'Parent(mary)']);
  });

  // DL Handbook (2003), ch. 2, Woman ⊓ ∃hasChild.Person ⊑ Mother (from memory): with Woman(x) and a child that is only
  // implied, x is a mother; the conjunction on the left needs the context {Woman} ∪ {the generating class}.
  it('a conjunction on the left with an implied successor (DL Handbook ch. 2, Mother)', async () => {
    const kb: TinyKb = {
      axioms: [some('Parent', hasChild, 'Person'), only('Person', hasChildInv, 'X'), sub(['Woman', 'X'], ['Mother'])],
      classFacts: [['Woman', 'ann'], ['Parent', 'ann'], ['Parent', 'bob']], propertyFacts: [],
    };
    const facts = (await horn(kb))!;
    expect(facts.has('Mother(ann)')).toBe(true);
    expect(facts.has('Mother(bob)')).toBe(false);
    expect(facts.has('X(bob)')).toBe(true);
  });

  // Kazakov 2009, the rule for at-most restrictions (from memory): A ⊑ ∃R.B, A ⊑ ∃R.C, A ⊑ ≤1 R.⊤ give one
  // successor in B ⊓ C; with B ⊓ C ⊑ D and D ⊑ ∀R⁻.E, A ⊑ E.
  it('two successors identified by a functional role meet a conjunction (Kazakov 2009, ≤-rule)', async () => {
    const R = role('R'), Rinv = role('R', true);
    const kb: TinyKb = {
      axioms: [some('A', R, 'B'), some('A', R, 'C'), atMost('A', 1, R, null), sub(['B', 'C'], ['D']), only('D', Rinv, 'E')],
      classFacts: [['A', 'a']], propertyFacts: [],
    };
    expect([...(await horn(kb))!].sort()).toEqual(['A(a)', 'E(a)']);
  });

  // W3C OWL 2 Primer (2nd ed.), §9 on functional properties (from memory): Mary hasHusband James and Mary hasHusband
  // Jim with hasHusband functional entail that James and Jim are the same individual.
  // ⊤ ⊑ ≤1 hasHusband.⊤ with ⊤ named by the class Everything (⊤ ⊑ Everything), as the normal form does with its own name.
  it('functional property: two named values are the same individual (OWL 2 Primer, hasHusband)', async () => {
    const kb: TinyKb = { axioms: [atMost('Everything', 1, role('hasHusband'), null), sub([], ['Everything'])], classFacts: [['Person', 'Mary']], propertyFacts: [['hasHusband', 'Mary', 'James'], ['hasHusband', 'Mary', 'Jim']] };
    const facts = (await horn(kb))!;
    expect(facts.has('James=Jim') && facts.has('Jim=James')).toBe(true);
  });

  // The implied successor of a functional role is the named one (Kazakov 2009, ≤-rule with a second successor that is
  // named; OWL 2 Direct Semantics, ObjectMaxCardinality): everything implied for the successor holds for the named value.
  it('an implied successor under ≤1 is the named successor: its classes move to it', async () => {
    const hasMother = role('hasMother');
    const kb: TinyKb = {
      axioms: [some('Person', hasMother, 'Woman'), atMost('Person', 1, hasMother, null), sub(['Woman'], ['Female'])],
      classFacts: [['Person', 'ann']], propertyFacts: [['hasMother', 'ann', 'carol']],
    };
    const facts = (await horn(kb))!;
    expect(facts.has('Woman(carol)') && facts.has('Female(carol)')).toBe(true);
  });

  // The same with a clash: the named value is declared disjoint from what the successor must be (DL Handbook ch. 2,
  // disjointness as C ⊓ D ⊑ ⊥, from memory) — the knowledge base is inconsistent.
  it('an implied successor identified with a named value that cannot be it: inconsistent', async () => {
    const hasMother = role('hasMother');
    const kb: TinyKb = {
      axioms: [some('Person', hasMother, 'Woman'), atMost('Person', 1, hasMother, null), sub(['Woman', 'Man'], [])],
      classFacts: [['Person', 'ann'], ['Man', 'dan']], propertyFacts: [['hasMother', 'ann', 'dan']],
    };
    expect(await horn(kb)).toBeNull();
  });

  // Every model of A ⊑ ∃R.A with A(a) is infinite (DL Handbook ch. 2 on cyclic TBoxes, from memory): the Datalog program
  // needs no element at all, and its evaluation stops with A(a) only.
  it('A ⊑ ∃R.A: only A(a), with no anonymous element', async () => {
    const kb: TinyKb = { axioms: [some('A', role('R'), 'A')], classFacts: [['A', 'a']], propertyFacts: [] };
    expect([...(await horn(kb, false))!]).toEqual(['A(a)']);
    const { program } = hornDatalog(normalOf(kb));
    expect(program.rules.every((r) => r.head.every((d) => d.exists.length === 0))).toBe(true);
  });

  // Inverse properties and a hierarchy (OWL 2 Primer, hasParent as the inverse of hasChild, from memory), with a cyclic
  // existential: every Person has a parent who is a Person; a Person's parent has a child that is the Person.
  it('inverses and a hierarchy through a cyclic existential (OWL 2 Primer, hasParent / hasChild)', async () => {
    const kb: TinyKb = {
      axioms: [some('Person', hasParent, 'Person'), incl(hasParent, hasChildInv), incl(hasChildInv, hasParent), only('Person', hasChildInv, 'Ancestor'), only('Ancestor', hasChild, 'Descendant')],
      classFacts: [['Person', 'eve']], propertyFacts: [],
    };
    expect([...(await horn(kb, false))!].sort()).toEqual(['Descendant(eve)', 'Person(eve)']);
  });
});
