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
  /** Join order that tests whether the disjunct already holds for a body match (restricted chase). */
  readonly test: readonly JoinStep[];
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
      for (const a of atoms) for (const v of a.kind === UNARY ? [a.a] : [a.a, a.b]) {
        if (v >= bodyVars && !exists.includes(v)) throw new Error('a head variable is neither in the body nor existential');
      }
      const test = order(atoms.filter((a) => a.kind !== EQUAL).map((a) => ({ atom: a, bodyIndex: -1 })), new Set(Array.from({ length: bodyVars }, (_, i) => i)));
      return { exists, atoms, test };
    });
    const plans = body.map((a, i) => [{ atom: a, bodyIndex: i }, ...order(body.map((atom, j) => ({ atom, bodyIndex: j })).filter((x) => x.bodyIndex !== i), new Set(a.kind === UNARY ? [a.a] : [a.a, a.b]))]);
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
    return { id, shape, body, head, bodyVars, vars: slots.size, plans, center, rule, symmetric };
  });
  const readersOfUnary: [number, number][][] = unaryNames.map(() => []), readersOfBinary: [number, number][][] = binaryNames.map(() => []);
  for (const r of rules) r.body.forEach((a, i) => {
    if (a.kind === UNARY) readersOfUnary[a.pred]!.push([r.id, i]);
    else if (a.kind === BINARY) readersOfBinary[a.pred]!.push([r.id, i]);
  });
  const blocking = program.blocking !== false;
  const equalities = rules.some((r) => r.head.some((d) => d.atoms.some((a) => a.kind === EQUAL)));
  return { rules, unaryIds, binaryIds, unaryNames, binaryNames, readersOfUnary, readersOfBinary, blocking, successor: blocking ? -1 : binaryIds.get(SUCCESSOR) ?? -1, equalities };
}
