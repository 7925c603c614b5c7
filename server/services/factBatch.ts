// Fact lookups coalesced per (version, pattern shape): the lookups that arrive within one turn of the event loop are
// sent as ONE statement over unnest() arrays, flushed by setImmediate (after the poll phase has read every request that
// was waiting). Each caller gets its own page, exactly what lookupFacts (server/services/factStore.ts) would return for
// it; nothing is cached or shared between requests. This is the usual request coalescing ("micro-batching") of
// concurrent small reads: it saves the per-statement cost on both ends of the connection — one wire round trip, one
// executor start-up and one result set per batch instead of per lookup.
import type pg from 'pg';
import {
  decodeCursor, factsTable, MAX_PAGE_SIZE, ORDERS, orderFor, selectList, termsTable, toPage,
  type FactPage, type FactPattern, type FactRowOut, type Position,
} from './factStore.js';

/** Most lookups per statement, and most rows one statement may return (the sum of its lookups' limits + 1); larger batches are split. */
export const MAX_BATCH = 128;
export const MAX_BATCH_ROWS = 10_000;

const NAMES = { s: 'subject', p: 'predicate', o: 'object' } as const;

/** Called once with the page, or with the error (an InvalidCursorError before anything is queued, or the statement's); must not throw. */
export type PageCallback = (error: unknown, page: FactPage | null) => void;
interface Pending { pattern: FactPattern; after: [number, number, number] | null; limit: number; done: PageCallback }
interface Shape { storeKey: number; bound: Position[]; cursor: boolean; order: 'spo' | 'pos' | 'osp'; name: string; text: string }

/**
 * A shape with its statement. Row i of the arrays (WITH ORDINALITY) is lookup i: its bound terms, its cursor's three
 * ids if it has one, and its limit + 1. For each row a LATERAL sub-query does what lookupFacts's own statement does —
 * resolve the bound terms by the dictionary's hash index, walk the fact index from the cursor in order, stop at the
 * limit, read the unbound terms by id — so the answers are the same; ORDER BY restores each lookup's order. Named per
 * (version, shape), so each pooled connection plans it once; the text is built once per shape, not per batch.
 */
function shapeOf(storeKey: number, bound: Position[], cursor: boolean, order: 'spo' | 'pos' | 'osp'): Shape {
  const f = factsTable(storeKey), t = termsTable(storeKey), cols = ORDERS[order]!;
  const types: string[] = [], names: string[] = [], where: string[] = [];
  for (const pos of bound) {
    types.push('text[]');
    names.push(`b_${pos}`);
    where.push(`f.${pos} = (SELECT id FROM ${t} WHERE term = q.b_${pos})`);
  }
  if (cursor) {
    for (let c = 0; c < 3; c++) {
      types.push('int[]');
      names.push(`c${c}`);
    }
    where.push(`(f.${cols[0]}, f.${cols[1]}, f.${cols[2]}) > (q.c0, q.c1, q.c2)`);
  }
  types.push('int[]');
  names.push('lim');
  const pattern = Object.fromEntries(bound.map((pos) => [NAMES[pos], ''])) as FactPattern;
  const text = `SELECT q.i::int AS i, r.* FROM unnest(${types.map((ty, n) => `$${n + 1}::${ty}`).join(', ')}) WITH ORDINALITY AS q(${names.join(', ')}, i)
    CROSS JOIN LATERAL (SELECT ${selectList(storeKey, pattern).join(', ')} FROM ${f} f
      ${where.length ? 'WHERE ' + where.join(' AND ') : ''}
      ORDER BY f.${cols[0]}, f.${cols[1]}, f.${cols[2]} LIMIT q.lim) r
    ORDER BY q.i, r.${cols[0]}, r.${cols[1]}, r.${cols[2]}`;
  const key = `${bound.join('')}${cursor ? 'c' : ''}`;
  return { storeKey, bound, cursor, order, name: `thence-facts-batch-${storeKey}-${key || 'all'}`, text };
}

/** The statement for a batch of one shape: the shape's named statement with the batch's arrays (see shapeOf). */
export function batchStatement(shape: Shape, pending: readonly Pending[]): pg.QueryConfig {
  const arrays: unknown[][] = [];
  for (const pos of shape.bound) arrays.push(pending.map((x) => x.pattern[NAMES[pos]]));
  if (shape.cursor) for (let c = 0; c < 3; c++) arrays.push(pending.map((x) => x.after![c]));
  arrays.push(pending.map((x) => x.limit + 1));
  return { name: shape.name, text: shape.text, values: arrays };
}

export class FactLookupBatcher {
  private readonly queues = new Map<string, { shape: Shape; pending: Pending[] }>();
  private readonly shapes = new Map<string, Shape>();
  private scheduled = false;
  private readonly flushAll = () => {
    this.scheduled = false;
    const queues = [...this.queues.values()];
    this.queues.clear();
    for (const { shape, pending } of queues) {
      let from = 0, rows = 0;
      for (let i = 0; i < pending.length; i++) {
        const need = pending[i]!.limit + 1;
        if (i > from && (i - from === MAX_BATCH || rows + need > MAX_BATCH_ROWS)) {
          this.send(shape, pending.slice(from, i));
          from = i;
          rows = 0;
        }
        rows += need;
      }
      this.send(shape, pending.slice(from));
    }
  };

  constructor(private readonly pool: pg.Pool | pg.PoolClient) {}

  /** The same page as lookupFacts(pool, storeKey, pattern, page), answered with the other lookups of this turn. */
  lookup(storeKey: number, pattern: FactPattern, page: { limit: number; cursor?: string | null }): Promise<FactPage> {
    return new Promise((resolve, reject) => this.lookupThen(storeKey, pattern, page, (error, found) => (found ? resolve(found) : reject(error))));
  }

  /** As lookup, answering through a callback: the API's hot path spends no promise on it. */
  lookupThen(storeKey: number, pattern: FactPattern, page: { limit: number; cursor?: string | null }, done: PageCallback): void {
    const limit = Math.max(1, Math.min(MAX_PAGE_SIZE, Math.floor(page.limit) || 1));
    const order = orderFor(pattern);
    let after: [number, number, number] | null = null;
    try {
      after = page.cursor ? decodeCursor(page.cursor, order) : null; // InvalidCursorError fails this lookup only
    } catch (error) {
      return done(error, null);
    }
    const s = pattern.subject !== undefined, p = pattern.predicate !== undefined, o = pattern.object !== undefined;
    const key = `${storeKey}:${s ? 's' : ''}${p ? 'p' : ''}${o ? 'o' : ''}:${after ? 'c' : ''}`;
    let queue = this.queues.get(key);
    if (!queue) {
      let shape = this.shapes.get(key);
      if (!shape) {
        if (this.shapes.size > 10_000) this.shapes.clear();
        const bound = (['s', 'p', 'o'] as const).filter((pos) => pattern[NAMES[pos]] !== undefined);
        this.shapes.set(key, (shape = shapeOf(storeKey, bound, after !== null, order)));
      }
      this.queues.set(key, (queue = { shape, pending: [] }));
    }
    queue.pending.push({ pattern, after, limit, done });
    if (!this.scheduled) {
      this.scheduled = true;
      setImmediate(this.flushAll);
    }
  }

  private send(shape: Shape, pending: Pending[]): void {
    this.pool.query<FactRowOut & { i: number }>(batchStatement(shape, pending)).then(
      ({ rows }) => {
        // Rows come ordered by lookup: cut them into one run per lookup.
        let at = 0;
        for (let n = 0; n < pending.length; n++) {
          let end = at;
          while (end < rows.length && rows[end].i === n + 1) end++;
          const p = pending[n];
          p.done(null, toPage(rows.slice(at, end), p.pattern, shape.order, p.limit));
          at = end;
        }
      },
      (error: { code?: string }) => {
        // A version whose tables are gone (deleted, not ready) has no facts, as in lookupFacts.
        if (error.code === '42P01') for (const p of pending) p.done(null, { facts: [], nextCursor: null });
        else for (const p of pending) p.done(error, null);
      },
    );
  }
}

const batchers = new WeakMap<object, FactLookupBatcher>();

/** The batcher of a pool (one per pool, so every request of the process shares the coalescing). */
export function factLookupBatcher(pool: pg.Pool | pg.PoolClient): FactLookupBatcher {
  let b = batchers.get(pool);
  if (!b) batchers.set(pool, (b = new FactLookupBatcher(pool)));
  return b;
}
