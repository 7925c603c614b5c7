// Columnar, integer-encoded ABox: class, property, sameAs, differentFrom and data-property facts as growable Int32Array columns.

/**
 * Every number here is a term id of one `TermDictionary` (model/dictionary.ts). No object is kept per fact:
 * a class assertion costs 8 bytes, a property assertion 12, a data-property fact 12 (plus growth slack,
 * removed by `trim()`). Duplicates are kept as given (the chase deduplicates); `size` counts rows.
 *
 * Data-property facts (subject, property, literal) are stored so the server can serve them, but they are
 * not reasoned with: Thence does no datatype reasoning (see reasoner/README.md, Intake).
 */

/** A growable column of 32-bit ints. Grows by 1.5× (bounded slack); `trim()` drops the slack. */
export class IntColumn {
  private data: Int32Array;
  private length = 0;

  constructor(initialCapacity = 1024) {
    this.data = new Int32Array(Math.max(16, initialCapacity));
  }

  /** Appends one value. */
  push(value: number): void {
    if (this.length === this.data.length) this.grow(this.length + 1);
    this.data[this.length++] = value;
  }

  /** Returns the value at a row; undefined outside 0..length-1. */
  at(row: number): number | undefined {
    return row >= 0 && row < this.length ? this.data[row] : undefined;
  }

  get size(): number {
    return this.length;
  }

  /** Bytes allocated (capacity × 4). */
  get byteLength(): number {
    return this.data.byteLength;
  }

  /** A view (no copy) of the filled part; invalidated by the next push that grows the column. */
  view(): Int32Array {
    return this.data.subarray(0, this.length);
  }

  /** Shrinks the buffer to the filled length. */
  trim(): void {
    if (this.data.length !== this.length) this.data = this.data.slice(0, Math.max(16, this.length));
  }

  private grow(minimum: number): void {
    let capacity = Math.max(16, Math.floor(this.data.length * 1.5));
    while (capacity < minimum) capacity = Math.floor(capacity * 1.5);
    const next = new Int32Array(capacity);
    next.set(this.data.subarray(0, this.length));
    this.data = next;
  }
}

/** A table of rows of `arity` ints, one IntColumn per position. */
export class IntTable {
  readonly columns: readonly IntColumn[];

  constructor(readonly arity: number, initialCapacity = 1024) {
    this.columns = Array.from({ length: arity }, () => new IntColumn(initialCapacity));
  }

  get size(): number {
    return this.columns[0]!.size;
  }

  get byteLength(): number {
    return this.columns.reduce((sum, c) => sum + c.byteLength, 0);
  }

  trim(): void {
    for (const c of this.columns) c.trim();
  }
}

export interface AboxSizes {
  readonly classAssertions: number;
  readonly propertyAssertions: number;
  readonly sameAs: number;
  readonly differentFrom: number;
  readonly dataFacts: number;
}

/** The ABox: five tables of term ids. */
export class Abox {
  /** (class, individual) */
  readonly classes = new IntTable(2);
  /** (property, subject, object) */
  readonly properties = new IntTable(3);
  /** (a, b): a owl:sameAs b */
  readonly same = new IntTable(2, 16);
  /** (a, b): a owl:differentFrom b */
  readonly different = new IntTable(2, 16);
  /** (subject, property, literal) — kept, not reasoned with */
  readonly data = new IntTable(3, 16);

  /** Adds C(a). */
  addClass(cls: number, individual: number): void {
    this.classes.columns[0]!.push(cls);
    this.classes.columns[1]!.push(individual);
  }

  /** Adds R(a, b). Callers rewrite R⁻(a, b) as R(b, a) first. */
  addProperty(property: number, subject: number, object: number): void {
    this.properties.columns[0]!.push(property);
    this.properties.columns[1]!.push(subject);
    this.properties.columns[2]!.push(object);
  }

  /** Adds a ≈ b. */
  addSame(a: number, b: number): void {
    this.same.columns[0]!.push(a);
    this.same.columns[1]!.push(b);
  }

  /** Adds a ≉ b. */
  addDifferent(a: number, b: number): void {
    this.different.columns[0]!.push(a);
    this.different.columns[1]!.push(b);
  }

  /** Adds a data-property fact (subject, property, literal-term id). */
  addData(subject: number, property: number, literal: number): void {
    this.data.columns[0]!.push(subject);
    this.data.columns[1]!.push(property);
    this.data.columns[2]!.push(literal);
  }

  get classAssertionCount(): number { return this.classes.size; }
  get propertyAssertionCount(): number { return this.properties.size; }
  get sameAsCount(): number { return this.same.size; }
  get differentFromCount(): number { return this.different.size; }
  /** Number of data-property facts kept (not reasoned with). */
  get dataFactCount(): number { return this.data.size; }

  /** All row counts at once. */
  sizes(): AboxSizes {
    return {
      classAssertions: this.classes.size,
      propertyAssertions: this.properties.size,
      sameAs: this.same.size,
      differentFrom: this.different.size,
      dataFacts: this.data.size,
    };
  }

  /** Rows over all tables. */
  get size(): number {
    return this.classes.size + this.properties.size + this.same.size + this.different.size + this.data.size;
  }

  /** Bytes held by the columns (capacity, so including growth slack until `trim()`). */
  get byteLength(): number {
    return this.classes.byteLength + this.properties.byteLength + this.same.byteLength + this.different.byteLength + this.data.byteLength;
  }

  /** Calls fn(class, individual) per class assertion, in insertion order. */
  forEachClass(fn: (cls: number, individual: number) => void): void {
    const c = this.classes.columns[0]!.view(), i = this.classes.columns[1]!.view();
    for (let r = 0; r < c.length; r++) fn(c[r]!, i[r]!);
  }

  /** Calls fn(property, subject, object) per property assertion. */
  forEachProperty(fn: (property: number, subject: number, object: number) => void): void {
    const p = this.properties.columns[0]!.view(), s = this.properties.columns[1]!.view(), o = this.properties.columns[2]!.view();
    for (let r = 0; r < p.length; r++) fn(p[r]!, s[r]!, o[r]!);
  }

  /** Calls fn(a, b) per sameAs pair. */
  forEachSame(fn: (a: number, b: number) => void): void {
    const a = this.same.columns[0]!.view(), b = this.same.columns[1]!.view();
    for (let r = 0; r < a.length; r++) fn(a[r]!, b[r]!);
  }

  /** Calls fn(a, b) per differentFrom pair. */
  forEachDifferent(fn: (a: number, b: number) => void): void {
    const a = this.different.columns[0]!.view(), b = this.different.columns[1]!.view();
    for (let r = 0; r < a.length; r++) fn(a[r]!, b[r]!);
  }

  /** Calls fn(subject, property, literal) per data-property fact. */
  forEachData(fn: (subject: number, property: number, literal: number) => void): void {
    const s = this.data.columns[0]!.view(), p = this.data.columns[1]!.view(), l = this.data.columns[2]!.view();
    for (let r = 0; r < s.length; r++) fn(s[r]!, p[r]!, l[r]!);
  }

  /** Column views (no copy) for bulk consumers such as the chase: invalidated by later additions. */
  columns(): {
    classes: { cls: Int32Array; individual: Int32Array };
    properties: { property: Int32Array; subject: Int32Array; object: Int32Array };
    same: { a: Int32Array; b: Int32Array };
    different: { a: Int32Array; b: Int32Array };
    data: { subject: Int32Array; property: Int32Array; literal: Int32Array };
  } {
    const v = (t: IntTable, i: number) => t.columns[i]!.view();
    return {
      classes: { cls: v(this.classes, 0), individual: v(this.classes, 1) },
      properties: { property: v(this.properties, 0), subject: v(this.properties, 1), object: v(this.properties, 2) },
      same: { a: v(this.same, 0), b: v(this.same, 1) },
      different: { a: v(this.different, 0), b: v(this.different, 1) },
      data: { subject: v(this.data, 0), property: v(this.data, 1), literal: v(this.data, 2) },
    };
  }

  /** Drops growth slack in every column (call once loading is done). */
  trim(): void {
    this.classes.trim(); this.properties.trim(); this.same.trim(); this.different.trim(); this.data.trim();
  }
}
