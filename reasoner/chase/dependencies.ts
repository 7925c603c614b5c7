// Dependency sets for backjumping (Motik, Shearer, Horrocks, JAIR 2009, §5.1 "backjumping"): each fact records the
// choice points (by depth on the search stack) it depends on; a clash jumps back to the newest of them.

/** Interned sorted sets of choice levels; id 0 is the empty set (facts that follow from the input alone). */
export class DependencySets {
  private readonly sets: Int32Array[] = [new Int32Array(0)];
  private readonly ids = new Map<string, number>([['', 0]]);
  private readonly unions = new Map<number, number>();

  /** The levels of a set, ascending. */
  levels(id: number): Int32Array { return this.sets[id]!; }

  /** The newest (deepest) level in the set, 0 if empty. */
  newest(id: number): number { const s = this.sets[id]!; return s.length === 0 ? 0 : s[s.length - 1]!; }

  private intern(levels: Int32Array): number {
    const key = levels.join(',');
    let id = this.ids.get(key);
    if (id === undefined) { id = this.sets.length; this.sets.push(levels); this.ids.set(key, id); }
    return id;
  }

  /** The set {level}. */
  single(level: number): number { return this.intern(Int32Array.of(level)); }

  /** Returns the union of two sets (memoised: unions of the same pair recur in joins). */
  union(a: number, b: number): number {
    if (a === b || b === 0) return a;
    if (a === 0) return b;
    if (a > b) { const t = a; a = b; b = t; }
    const key = a * 0x200000 + b;
    const hit = this.unions.get(key);
    if (hit !== undefined) return hit;
    const x = this.sets[a]!, y = this.sets[b]!, out: number[] = [];
    let i = 0, j = 0;
    while (i < x.length || j < y.length) {
      if (j >= y.length || (i < x.length && x[i]! < y[j]!)) out.push(x[i++]!);
      else if (i >= x.length || y[j]! < x[i]!) out.push(y[j++]!);
      else { out.push(x[i++]!); j++; }
    }
    const id = this.intern(Int32Array.from(out));
    this.unions.set(key, id);
    return id;
  }

  /** The set without levels ≥ `level`. */
  below(id: number, level: number): number {
    const s = this.sets[id]!;
    let n = s.length;
    while (n > 0 && s[n - 1]! >= level) n--;
    return n === s.length ? id : this.intern(s.slice(0, n));
  }
}
