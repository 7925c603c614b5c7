// The chase's input built from the intake's columnar ABox (term ids → dense individual ids) and the buffer that
// collects entailed facts as integers until the run is known to be consistent.

import type { Abox } from '../model/abox.js';
import type { TermDictionary } from '../model/dictionary.js';
import { TripleSet } from './hash.js';
import type { ChaseInput, EntailedSink } from './entail.js';

export interface BuiltInput extends ChaseInput {
  /** individual id → term id */
  readonly individualTerms: Int32Array;
  /** Asserted facts over term ids: (0, class, individual), (1 + property, subject, object), (-1, a, b) for sameAs. */
  readonly assertedSet: TripleSet;
}

/** Builds the chase input: individuals are every subject/object of the ABox plus the declared ones, in first-seen order. */
export function buildChaseInput(dictionary: TermDictionary, abox: Abox, declared: readonly number[]): BuiltInput {
  const cols = abox.columns();
  const individualOf = new Map<number, number>(), terms: number[] = [];
  const ind = (t: number) => { let i = individualOf.get(t); if (i === undefined) { i = terms.length; individualOf.set(t, i); terms.push(t); } return i; };
  const classOf = new Map<number, number>(), classNames: string[] = [];
  const propOf = new Map<number, number>(), propertyNames: string[] = [];
  const cls = (t: number) => { let i = classOf.get(t); if (i === undefined) { i = classNames.length; classOf.set(t, i); classNames.push(dictionary.term(t)); } return i; };
  const prop = (t: number) => { let i = propOf.get(t); if (i === undefined) { i = propertyNames.length; propOf.set(t, i); propertyNames.push(dictionary.term(t)); } return i; };
  const asserted = new TripleSet(1024);
  const nc = cols.classes.cls.length, np = cols.properties.property.length;
  const classPred = new Int32Array(nc), classInd = new Int32Array(nc);
  for (let r = 0; r < nc; r++) {
    classPred[r] = cls(cols.classes.cls[r]!); classInd[r] = ind(cols.classes.individual[r]!);
    asserted.add(0, cols.classes.cls[r]!, cols.classes.individual[r]!);
  }
  const propPred = new Int32Array(np), propSubj = new Int32Array(np), propObj = new Int32Array(np);
  for (let r = 0; r < np; r++) {
    propPred[r] = prop(cols.properties.property[r]!); propSubj[r] = ind(cols.properties.subject[r]!); propObj[r] = ind(cols.properties.object[r]!);
    asserted.add(1 + cols.properties.property[r]!, cols.properties.subject[r]!, cols.properties.object[r]!);
  }
  const pairs = (a: Int32Array, b: Int32Array, same: boolean) => {
    const x = new Int32Array(a.length), y = new Int32Array(a.length);
    for (let r = 0; r < a.length; r++) { x[r] = ind(a[r]!); y[r] = ind(b[r]!); if (same) asserted.add(-1, a[r]!, b[r]!); }
    return [x, y] as const;
  };
  const [sameA, sameB] = pairs(cols.same.a, cols.same.b, true);
  const [diffA, diffB] = pairs(cols.different.a, cols.different.b, false);
  for (const t of declared) ind(t);
  return {
    individuals: terms.length, classPred, classInd, propPred, propSubj, propObj, sameA, sameB, diffA, diffB,
    classNames, propertyNames, individualTerms: Int32Array.from(terms), assertedSet: asserted,
  };
}

/** Growable int column. */
class Column {
  data = new Int32Array(1024);
  length = 0;
  push(v: number): void {
    if (this.length === this.data.length) { const n = new Int32Array(this.data.length * 2); n.set(this.data); this.data = n; }
    this.data[this.length++] = v;
  }
}

/** Collects entailed facts as integer rows (predicate names interned here); 8–12 bytes a fact. */
export class FactBuffer implements EntailedSink {
  readonly unaryNames: string[] = [];
  readonly binaryNames: string[] = [];
  private readonly unaryIds = new Map<string, number>();
  private readonly binaryIds = new Map<string, number>();
  private readonly u = [new Column(), new Column()];
  private readonly b = [new Column(), new Column(), new Column()];
  private readonly s = [new Column(), new Column()];

  unary(cls: string, individual: number): void {
    let id = this.unaryIds.get(cls);
    if (id === undefined) { id = this.unaryNames.length; this.unaryIds.set(cls, id); this.unaryNames.push(cls); }
    this.u[0]!.push(id); this.u[1]!.push(individual);
  }

  binary(property: string, subject: number, object: number): void {
    let id = this.binaryIds.get(property);
    if (id === undefined) { id = this.binaryNames.length; this.binaryIds.set(property, id); this.binaryNames.push(property); }
    this.b[0]!.push(id); this.b[1]!.push(subject); this.b[2]!.push(object);
  }

  same(a: number, b: number): void { this.s[0]!.push(a); this.s[1]!.push(b); }

  get size(): number { return this.u[0]!.length + this.b[0]!.length + this.s[0]!.length; }

  /** Unary rows as columns (predicate index in unaryNames, individual) and their count. */
  unaryColumns(): { pred: Int32Array; ind: Int32Array; length: number } {
    return { pred: this.u[0]!.data, ind: this.u[1]!.data, length: this.u[0]!.length };
  }

  /** Binary rows as columns (predicate index in binaryNames, subject, object) and their count. */
  binaryColumns(): { pred: Int32Array; subj: Int32Array; obj: Int32Array; length: number } {
    return { pred: this.b[0]!.data, subj: this.b[1]!.data, obj: this.b[2]!.data, length: this.b[0]!.length };
  }

  *unaryFacts(): IterableIterator<[string, number]> {
    const [p, e] = this.u;
    for (let i = 0; i < p!.length; i++) yield [this.unaryNames[p!.data[i]!]!, e!.data[i]!];
  }

  *binaryFacts(): IterableIterator<[string, number, number]> {
    const [p, s, o] = this.b;
    for (let i = 0; i < p!.length; i++) yield [this.binaryNames[p!.data[i]!]!, s!.data[i]!, o!.data[i]!];
  }

  *sameFacts(): IterableIterator<[number, number]> {
    const [a, b] = this.s;
    for (let i = 0; i < a!.length; i++) yield [a!.data[i]!, b!.data[i]!];
  }
}
