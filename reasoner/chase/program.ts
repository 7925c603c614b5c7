// Compilation of a rule program for the chase: predicates to integer ids, variables to slots, and one join order per
// choice of the body atom that reads the delta (semi-naive evaluation), plus a join order to test each head.

import { DISTINCT, EQUALS, SUCCESSOR, TOP, ruleShape, type Atom, type Rule, type RuleProgram, type RuleShape } from '../rules/types.js';
import { DISTINCT_ID, TOP_ID } from './store.js';

export const UNARY = 0, BINARY = 1, EQUAL = 2;

/** An atom over variable slots: kind UNARY (pred, a), BINARY (pred, a, b; ≉ is BINARY with pred DISTINCT_ID), EQUAL (a ≈ b). */
export interface CompiledAtom {
  readonly kind: number;
  readonly pred: number;
  readonly a: number;
  readonly b: number;
}

/** One step of a join: the atom, and how it is read (all variables bound: lookup; one bound: index; none: scan). */
export interface JoinStep {
  readonly atom: CompiledAtom;
  /** Index of the atom in the rule body (for the semi-naive row bound), -1 for head atoms. */
  readonly bodyIndex: number;
}

export interface CompiledDisjunct {
  readonly exists: readonly number[];
  readonly atoms: readonly CompiledAtom[];
  /** Join order that tests whether the disjunct already holds for a body match (restricted chase); unused if counting. */
  readonly test: readonly JoinStep[];
  /** The head of ≥n R.B (n ≥ 2): tested by counting (counting.ts), not by a join of its n + n(n−1)/2 atoms. */
  readonly counting: CountingTemplate | null;
}

/**
 * The shape of a number restriction's rule, read by counting (counting.ts): the successors y₁…y_m of a centre c, each
 * with the same links to c and the same classes. A ≥n head has m = n and yᵢ ≉ yⱼ for every pair; a ≤n body has
 * m = n + 1, classes of c, and one disjunct yᵢ ≈ yⱼ for every pair.
 */
export interface CountingTemplate {
  readonly centre: number;
  readonly ys: readonly number[];
  /** R(c, y) (out) or R(y, c) for each link; at least one. */
  readonly links: readonly { readonly pred: number; readonly out: boolean }[];
  readonly classes: readonly number[];
  /** Classes the centre must have (≤n bodies; none for heads). */
  readonly centreClasses: readonly number[];
}

export interface CompiledRule {
  readonly id: number;
  readonly shape: RuleShape;
  readonly body: readonly CompiledAtom[];
  readonly head: readonly CompiledDisjunct[];
  /** Number of body variables (slots 0..bodyVars-1); existential variables follow. */
  readonly bodyVars: number;
  readonly vars: number;
  /** plans[i]: join order when body atom i reads the delta (the atom itself first). */
  readonly plans: readonly (readonly JoinStep[])[];
  /** For existential rules: the body variable the new elements hang from (their parent). */
  readonly center: number;
  /** Slots of the variables the rule is symmetric in: only matches with increasing elements are kept. */
  readonly symmetric: readonly number[];
  /** The body of ≤n R.B (n ≥ 1): matched by counting each centre's successors (counting.ts); `plans` is then empty. */
  readonly countingBody: CountingTemplate | null;
  /** When the head is yᵢ ≈ yⱼ for every pair of these slots (≤n): it holds iff two of them share a representative. */
  readonly pairwiseEq: readonly number[] | null;
  /**
   * The head's first `quiet` disjuncts lead to no existential rule (`generatingClasses`); the others follow them, in
   * the rule's order. A search tries the quiet ones first, either way round (search.ts), so that an element is not
   * given successors — n of them for ≥n — where a disjunct that needs none would do.
   */
  readonly quiet: number;
  readonly rule: Rule;
}

export interface CompiledProgram {
  readonly rules: readonly CompiledRule[];
  readonly unaryIds: ReadonlyMap<string, number>;
  readonly binaryIds: ReadonlyMap<string, number>;
  readonly unaryNames: readonly string[];
  readonly binaryNames: readonly string[];
  /** For each unary / binary predicate id: the (rule, body atom) pairs that read it, for dispatching delta rows. */
  readonly readersOfUnary: readonly (readonly [number, number][])[];
  readonly readersOfBinary: readonly (readonly [number, number][])[];
  /** false: the plain restricted chase of a self-terminating program (RuleProgram.blocking). */
  readonly blocking: boolean;
  /** Binary id of SUCCESSOR when the rules read it (recorded for every created element), else -1. */
  readonly successor: number;
  /** Some rule head has ≈ (the ≤n rules): dynamic blocking must then be pairwise (blocking.ts). */
  readonly equalities: boolean;
}

/** Orders atoms greedily: fully bound first, then those sharing a bound variable, scans last. */
function order(atoms: readonly { atom: CompiledAtom; bodyIndex: number }[], bound: Set<number>): JoinStep[] {
  const left = [...atoms], out: JoinStep[] = [];
  const vars = (a: CompiledAtom) => (a.kind === UNARY ? [a.a] : [a.a, a.b]);
  while (left.length > 0) {
    let best = 0, bestScore = -1;
    left.forEach((x, i) => {
      const vs = vars(x.atom), nb = vs.filter((v) => bound.has(v)).length;
      const score = nb === vs.length ? 4 : x.atom.kind === BINARY && nb === 1 ? 3 : x.atom.kind === UNARY ? 1 : 0;
      if (score > bestScore) { best = i; bestScore = score; }
    });
    const [pick] = left.splice(best, 1);
    out.push(pick!);
    for (const v of vars(pick!.atom)) bound.add(v);
  }
  return out;
}

/**
 * Recognises a number restriction's atoms over successor slots `ys` (counting.ts): every atom is a class of some y, a
 * link between a y and the one other variable (the centre), yᵢ ≉ yⱼ (heads: for every pair), or a class of the centre
 * (bodies); every y has the same links and classes. Returns null for any other shape (the rule is then joined).
 */
function countingTemplate(atoms: readonly CompiledAtom[], ys: readonly number[], head: boolean): CountingTemplate | null {
  if (ys.length < 2) return null;
  const yset = new Set(ys);
  if (yset.size !== ys.length) return null;
  let centre = -1;
  const isCentre = (v: number) => { if (centre < 0) centre = v; return centre === v; };
  const per = new Map<number, Set<string>>(ys.map((y) => [y, new Set()]));
  const centreClasses: number[] = [], pairs = new Set<number>();
  for (const a of atoms) {
    if (a.kind === UNARY) {
      if (yset.has(a.a)) per.get(a.a)!.add(`u${a.pred}`);
      else if (!head && isCentre(a.a)) centreClasses.push(a.pred);
      else return null;
    } else if (a.kind === BINARY && a.pred === DISTINCT_ID) {
      if (!head || !yset.has(a.a) || !yset.has(a.b) || a.a === a.b) return null;
      pairs.add(Math.min(a.a, a.b) * 65536 + Math.max(a.a, a.b));
    } else if (a.kind === BINARY && yset.has(a.b) && !yset.has(a.a) && isCentre(a.a)) per.get(a.b)!.add(`o${a.pred}`);
    else if (a.kind === BINARY && yset.has(a.a) && !yset.has(a.b) && isCentre(a.b)) per.get(a.a)!.add(`i${a.pred}`);
    else return null;
  }
  if (head && pairs.size !== (ys.length * (ys.length - 1)) / 2) return null;
  const shape = [...per.get(ys[0]!)!].sort().join(',');
  for (const y of ys) if ([...per.get(y)!].sort().join(',') !== shape) return null;
  const links: { pred: number; out: boolean }[] = [], classes: number[] = [];
  for (const k of per.get(ys[0]!)!) {
    if (k[0] === 'u') classes.push(Number(k.slice(1))); else links.push({ pred: Number(k.slice(1)), out: k[0] === 'o' });
  }
  if (links.length === 0 || centre < 0) return null;
  return { centre, ys, links, classes, centreClasses };
}

/** The slots of a head whose disjuncts are exactly yᵢ ≈ yⱼ for every pair of them, else null. */
function pairwiseEqualities(head: readonly { atoms: readonly CompiledAtom[]; exists: readonly number[] }[]): number[] | null {
  if (head.length === 0) return null;
  const vars = new Set<number>(), pairs = new Set<number>();
  for (const d of head) {
    const a = d.atoms[0];
    if (d.atoms.length !== 1 || d.exists.length > 0 || a!.kind !== EQUAL || a!.a === a!.b) return null;
    vars.add(a!.a); vars.add(a!.b);
    pairs.add(Math.min(a!.a, a!.b) * 65536 + Math.max(a!.a, a!.b));
  }
  return pairs.size === head.length && pairs.size === (vars.size * (vars.size - 1)) / 2 ? [...vars] : null;
}

/**
 * The classes whose elements an existential rule gives successors: the class of an existential rule's one-atom body,
 * and, to a fixpoint, the body class of a one-atom Datalog rule whose head has such a class.
 */
function generatingClasses(rules: readonly CompiledRule[]): Set<number> {
  const gen = new Set<number>();
  for (const r of rules) if (r.shape === 'existential' && r.body.length === 1 && r.body[0]!.kind === UNARY && r.body[0]!.pred !== TOP_ID) gen.add(r.body[0]!.pred);
  for (let changed = gen.size > 0; changed;) {
    changed = false;
    for (const r of rules) {
      if (r.shape !== 'datalog' || r.body.length !== 1 || r.body[0]!.kind !== UNARY || gen.has(r.body[0]!.pred)) continue;
      if (r.head[0]!.atoms.some((a) => a.kind === UNARY && a.a === r.body[0]!.a && gen.has(a.pred))) { gen.add(r.body[0]!.pred); changed = true; }
    }
  }
  return gen;
}

/** Puts the disjuncts of each disjunctive head that lead to no existential rule first (CompiledRule.quiet). */
function quietFirst(rules: CompiledRule[]): void {
  const gen = generatingClasses(rules);
  if (gen.size === 0) return;
  rules.forEach((r, i) => {
    if (r.shape !== 'disjunctive' || r.pairwiseEq !== null) return;
    const loud = (d: CompiledDisjunct) => d.atoms.some((a) => a.kind === UNARY && gen.has(a.pred));
    const quiet = r.head.filter((d) => !loud(d));
    if (quiet.length === r.head.length || quiet.length === 0) return;
    rules[i] = { ...r, head: [...quiet, ...r.head.filter(loud)], quiet: quiet.length };
  });
}

/** Compiles a rule program; class and property names of the vocabulary get ids even when no rule mentions them. */
export function compileProgram(program: RuleProgram, extraRules: readonly Rule[] = []): CompiledProgram {
  const unaryIds = new Map<string, number>([[TOP, TOP_ID]]), binaryIds = new Map<string, number>([[DISTINCT, DISTINCT_ID]]);
  const unaryNames = [TOP], binaryNames = [DISTINCT];
  const idOf = (name: string, arity: number) => {
    const ids = arity === 1 ? unaryIds : binaryIds, names = arity === 1 ? unaryNames : binaryNames;
    let id = ids.get(name);
    if (id === undefined) { id = names.length; ids.set(name, id); names.push(name); }
    return id;
  };
  for (const c of program.classes) idOf(c, 1);
  for (const p of program.properties) idOf(p, 2);
  const all = [...program.rules, ...extraRules];
  const rules = all.map((rule, id): CompiledRule => {
    const slots = new Map<string, number>();
    const slot = (v: string) => { let s = slots.get(v); if (s === undefined) { s = slots.size; slots.set(v, s); } return s; };
    const atom = (a: Atom): CompiledAtom => {
      if (a.predicate === EQUALS) return { kind: EQUAL, pred: -1, a: slot(a.args[0]!), b: slot(a.args[1]!) };
      if (a.args.length === 1) return { kind: UNARY, pred: idOf(a.predicate, 1), a: slot(a.args[0]!), b: -1 };
      if (a.args.length === 2) return { kind: BINARY, pred: a.predicate === DISTINCT ? DISTINCT_ID : idOf(a.predicate, 2), a: slot(a.args[0]!), b: slot(a.args[1]!) };
      throw new Error(`the chase reads unary and binary atoms only; ${a.predicate} has arity ${a.args.length}`);
    };
    const body = rule.body.map(atom);
    const bodyVars = slots.size;
    const head = rule.head.map((d) => {
      if (d.exists.length > 0 && rule.head.length > 1) throw new Error('an existential disjunct inside a disjunction is not supported by the chase');
      const exists = d.exists.map(slot);
      const atoms = d.atoms.map(atom);
      const known = new Set(exists);
      for (const a of atoms) for (const v of a.kind === UNARY ? [a.a] : [a.a, a.b]) {
        if (v >= bodyVars && !known.has(v)) throw new Error('a head variable is neither in the body nor existential');
      }
      const counting = exists.length >= 2 ? countingTemplate(atoms, exists, true) : null;
      const tested = counting !== null ? [] : atoms.filter((a) => a.kind !== EQUAL);
      const test = tested.length === 0 ? [] : order(tested.map((a) => ({ atom: a, bodyIndex: -1 })), new Set(Array.from({ length: bodyVars }, (_, i) => i)));
      return { exists, atoms, test, counting };
    });
    const pairwiseEq = pairwiseEqualities(head);
    const countingBody = pairwiseEq !== null && pairwiseEq.length === bodyVars - 1 ? countingTemplate(body, pairwiseEq, false) : null;
    const plans = countingBody !== null ? [] : body.map((a, i) => [{ atom: a, bodyIndex: i }, ...order(body.map((atom, j) => ({ atom, bodyIndex: j })).filter((x) => x.bodyIndex !== i), new Set(a.kind === UNARY ? [a.a] : [a.a, a.b]))]);
    const shape = ruleShape(rule);
    let center = -1;
    if (shape === 'existential') {
      const d = head[0]!;
      for (const a of d.atoms) if (a.kind === BINARY) {
        if (a.a < bodyVars && d.exists.includes(a.b)) { center = a.a; break; }
        if (a.b < bodyVars && d.exists.includes(a.a)) { center = a.b; break; }
      }
      if (center < 0) throw new Error('an existential rule must link each new element to a body variable');
    }
    const symmetric = (rule.symmetric ?? []).map((v) => slots.get(v)!).filter((v) => v !== undefined && v < bodyVars);
    return { id, shape, body, head, bodyVars, vars: slots.size, plans, center, rule, symmetric, countingBody, pairwiseEq, quiet: head.length };
  });
  quietFirst(rules);
  const readersOfUnary: [number, number][][] = unaryNames.map(() => []), readersOfBinary: [number, number][][] = binaryNames.map(() => []);
  for (const r of rules) r.body.forEach((a, i) => {
    // A counting body reads a row once for all its successors: the atoms of y₁ and of the centre stand for the rest.
    const t = r.countingBody;
    // ⊤(c) reads every new element and says nothing a link row does not say again.
    if (t !== null && a.a !== t.ys[0] && a.b !== t.ys[0] && !(a.kind === UNARY && a.a === t.centre && a.pred !== TOP_ID)) return;
    if (a.kind === UNARY) readersOfUnary[a.pred]!.push([r.id, i]);
    else if (a.kind === BINARY) readersOfBinary[a.pred]!.push([r.id, i]);
  });
  const blocking = program.blocking !== false;
  const equalities = rules.some((r) => r.head.some((d) => d.atoms.some((a) => a.kind === EQUAL)));
  return { rules, unaryIds, binaryIds, unaryNames, binaryNames, readersOfUnary, readersOfBinary, blocking, successor: blocking ? -1 : binaryIds.get(SUCCESSOR) ?? -1, equalities };
}
