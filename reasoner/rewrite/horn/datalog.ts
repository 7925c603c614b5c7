// Datalog over named individuals from the saturated contexts (saturation.ts): no existential, no disjunction.
//   • the axioms that create nothing, as rules-from-normal.ts writes them (B₁ ∧ … → C, A(x) ∧ R(x, y) → B(y),
//     R(x, y) → S(x, y), ≤1 as y₁ ≈ y₂ between named neighbours, ≤0 / ∀R.⊥ / disjoint properties as ⊥);
//   • K ⊑ C for each minimal context K of a generating axiom: ⋀K(x) → C(x), and ⋀K(x) → ⊥ for an unsatisfiable K;
//   • K ⊑ ∃ρ.K′ against A₁ ⊑ ≤1 S.B′ with S ∈ ρ and B′ ∈ K′: the successor must be any named S-neighbour z in B′,
//     so ⋀K(x) ∧ S(x, z) ∧ B′(z) → ⋀ρ(x, z) ∧ ⋀K′(z) (Kazakov 2009, the ≤-rule, with the second successor named).

import type { NormalOntology } from '../../model/normal.js';
import { ruleOfAxiom } from '../rules-from-normal.js';
import { TOP, type Atom, type Rule, type RuleProgram } from '../../rules/types.js';
import { roleAtom, roleKey, RoleHierarchy } from './roles.js';
import {
  ContextSaturator, everywhereClasses, generatingAxioms, HornSaturationLimitError, interfaceOf,
  type GeneratingInterface, type LocalModel, type SaturationLimits,
} from './saturation.js';

/** Counts of the rewriting, for the `rewrite` command's statistics. */
export interface HornRewritingStats {
  readonly generatingAxioms: number;
  readonly contexts: number;
  readonly largestInterface: number;
  readonly contextRules: number;
  readonly identificationRules: number;
}

const cls = (c: string, v: string): Atom => ({ predicate: c, args: [v] });

/** Masks 0 … 2ⁿ − 1 in order of the number of bits set, so every subset comes before its supersets. */
function masksBySize(n: number): number[] {
  const masks = Array.from({ length: 1 << n }, (_, i) => i);
  const bits = (m: number) => { let c = 0; for (; m; m &= m - 1) c++; return c; };
  return masks.sort((a, b) => bits(a) - bits(b) || a - b);
}

/** Remembers, per consequence, the masks it was emitted for; a superset of one of them needs no rule. */
class MinimalMasks {
  private readonly byKey = new Map<string, number[]>();
  covered(key: string, mask: number): boolean {
    const list = this.byKey.get(key);
    return list !== undefined && list.some((m) => (m & ~mask) === 0);
  }
  add(key: string, mask: number): void {
    let list = this.byKey.get(key);
    if (!list) this.byKey.set(key, (list = []));
    list.push(mask);
  }
}

/**
 * Rewrites a Horn-ALCHIQ normal form into Datalog (with ≈ between named individuals and ⊥) that has the same
 * entailed facts over named individuals, the same sameAs and the same consistency (README, "Horn path").
 * Throws HornSaturationLimitError when an interface or the number of contexts is over the limits.
 */
export function hornDatalog(normal: NormalOntology, limits: SaturationLimits = {}): { program: RuleProgram; stats: HornRewritingStats } {
  const maxInterface = limits.maxInterface ?? 12;
  const rules: Rule[] = [];
  for (const a of normal.axioms) {
    if (a.kind === 'exists' || a.kind === 'atLeast') continue;
    if (a.kind === 'atMost' && a.n > 1) throw new Error(`not Horn: ≤${a.n} at ${a.source.position}`);
    if (a.kind === 'subsumption' && a.head.length > 1) throw new Error(`not Horn: a disjunction at ${a.source.position}`);
    rules.push(ruleOfAxiom(a));
  }
  const generating = generatingAxioms(normal.axioms);
  const stats = { generatingAxioms: generating.length, contexts: 0, largestInterface: 0, contextRules: 0, identificationRules: 0 };
  const done = (): { program: RuleProgram; stats: HornRewritingStats } => ({ program: { rules, classes: normal.classes, properties: normal.properties, horn: true }, stats });
  if (generating.length === 0) return done();

  const saturator = new ContextSaturator(normal, generating, limits.maxContexts);
  const everywhere = everywhereClasses(saturator);
  if (everywhere === null) {
    // ⊤ is unsatisfiable: every element (and the domain is never empty) closes the run.
    rules.push({ body: [cls(TOP, 'x')], head: [], source: generating[0]!.axiom.source });
    stats.contexts = saturator.contexts; stats.contextRules = 1;
    return done();
  }

  const roles = new RoleHierarchy(normal.axioms);
  const atMostOne = normal.axioms.filter((a) => a.kind === 'atMost' && a.n === 1);
  const seenRule = new Set<string>(rules.map((r) => JSON.stringify([r.body, r.head])));
  const emit = (rule: Rule, kind: 'contextRules' | 'identificationRules') => {
    const key = JSON.stringify([rule.body, rule.head]);
    if (seenRule.has(key)) return;
    seenRule.add(key); rules.push(rule); stats[kind]++;
  };
  // What holds everywhere is derived from ⊤ once.
  for (const c of everywhere) emit({ body: [cls(TOP, 'x')], head: [{ exists: [], atoms: [cls(c, 'x')] }], source: generating[0]!.axiom.source }, 'contextRules');
  for (const g of generating) {
    const face: GeneratingInterface = interfaceOf(g, generating, normal.axioms, roles, everywhere);
    const n = face.classes.length;
    stats.largestInterface = Math.max(stats.largestInterface, n);
    if (n > maxInterface) throw new HornSaturationLimitError(`the subtree of ${g.axiom.source.position} reads ${n} classes of its element (limit ${maxInterface})`);
    const base = everywhere.has(g.sub) ? [...everywhere] : [...everywhere, g.sub];
    const classFacts = new MinimalMasks(), identifications = new MinimalMasks();
    let unsatisfiable: number[] = [];
    const models = new Map<number, LocalModel>();
    for (const mask of masksBySize(n)) {
      if (unsatisfiable.some((m) => (m & ~mask) === 0)) continue;
      // K ∪ {c} with c already implied by K has K's local model, and every rule it would give is one of K's (K is a
      // subset): only contexts closed within the interface are saturated.
      let implied: LocalModel | undefined;
      for (let i = 0; i < n && !implied; i++) {
        if (!(mask & (1 << i))) continue;
        const smaller = models.get(mask ^ (1 << i));
        if (smaller?.consistent && smaller.classes.has(face.classes[i]!)) implied = smaller;
      }
      if (implied) { models.set(mask, implied); continue; }
      const chosen = face.classes.filter((_, i) => mask & (1 << i));
      const model: LocalModel = saturator.saturate([...base, ...chosen]);
      models.set(mask, model);
      const bodyClasses = everywhere.has(g.sub) ? chosen : [g.sub, ...chosen];
      const body = bodyClasses.length === 0 ? [cls(TOP, 'x')] : bodyClasses.map((c) => cls(c, 'x'));
      const source = g.axiom.source;
      if (!model.consistent) { unsatisfiable.push(mask); emit({ body, head: [], source }, 'contextRules'); continue; }
      const known = new Set([...base, ...chosen]);
      for (const c of model.classes) {
        if (known.has(c) || classFacts.covered(c, mask)) continue;
        classFacts.add(c, mask);
        emit({ body, head: [{ exists: [], atoms: [cls(c, 'x')] }], source }, 'contextRules');
      }
      const y = model.successors[g.index];
      if (!y || g.n !== 1) continue;
      for (const a of atMostOne) {
        if (a.kind !== 'atMost') continue;
        const s = roleKey(a.property);
        if (!model.classes.has(a.sub) || !y.edge.has(s) || (a.filler !== null && !y.label.has(a.filler))) continue;
        const key = `${normal.axioms.indexOf(a)}`;
        if (identifications.covered(key, mask)) continue;
        identifications.add(key, mask);
        const idBody = [...body, roleAtom(s, 'x', 'z'), ...(a.filler === null ? [] : [cls(a.filler, 'z')])];
        const given = new Set(idBody.map((b) => JSON.stringify(b)));
        const head = [...[...y.edge].sort().map((r) => roleAtom(r, 'x', 'z')), ...[...y.label].sort().map((c) => cls(c, 'z'))].filter((h) => !given.has(JSON.stringify(h)));
        if (head.length === 0) continue;
        emit({ body: idBody, head: [{ exists: [], atoms: head }], source: a.source }, 'identificationRules');
      }
    }
    unsatisfiable = [];
  }
  stats.contexts = saturator.contexts;
  return done();
}
