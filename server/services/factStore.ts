// The fact store: per-version term dictionary (kb_terms_<key>) and fact table (kb_facts_<key>), bulk-loaded by COPY, read by pattern.
//
// Layout, per version (key = kb_versions.store_key, a small integer, so table names are never built from user input):
//   kb_terms_<key> (id int PRIMARY KEY, term text)          hash index on term — literals may exceed a B-tree entry's size
//   kb_facts_<key> (s int, p int, o int, asserted boolean)  B-tree indexes (s,p,o), (p,o,s), (o,s,p), each INCLUDE (asserted)
// The three orders answer all eight atomic patterns by an index range: every set of bound positions is a prefix of one of them
// (s, sp, spo → spo; p, po → pos; o, so → osp; none → spo).
//
// Atomic visibility: a load writes staging tables (kb_facts_<key>_load, kb_terms_<key>_load), each created and filled by
// COPY ... FREEZE inside its own transaction, so a worker killed during a COPY leaves nothing. The indexes are then built in
// parallel sessions (one per index), and one last transaction renames both tables to their served names and flips the
// version's status to 'ready'. Lookups only ever read the served names; staging leftovers of a dead worker are dropped on
// retry and by the worker's sweep (dropFactTables removes both names).
import type pg from 'pg';


export interface FactPattern { subject?: string; predicate?: string; object?: string }
export interface StoredFact { subject: string; predicate: string; object: string; asserted: boolean }
export interface FactPage { facts: StoredFact[]; nextCursor: string | null }
export interface PublishedVersion { listingId: string; versionId: string; storeKey: number; number: number; factCount: number }

/** Thrown for a cursor that this store did not hand out (or one from another pattern's order). */
export class InvalidCursorError extends Error {
  constructor() {
    super('The cursor is not valid for this query; start again without a cursor.');
  }
}

export const MAX_PAGE_SIZE = 10_000;

export type Position = 's' | 'p' | 'o';
export const ORDERS: Record<string, readonly [Position, Position, Position]> = {
  spo: ['s', 'p', 'o'],
  pos: ['p', 'o', 's'],
  osp: ['o', 's', 'p'],
};

/** Returns the index order whose leading columns are exactly the bound positions of the pattern. */
export function orderFor(pattern: FactPattern): 'spo' | 'pos' | 'osp' {
  const s = pattern.subject !== undefined, p = pattern.predicate !== undefined, o = pattern.object !== undefined;
  if (p && !s) return 'pos';
  if (o && !p) return 'osp';
  return 'spo';
}

export function factsTable(storeKey: number): string {
  return `kb_facts_${checkKey(storeKey)}`;
}
export function termsTable(storeKey: number): string {
  return `kb_terms_${checkKey(storeKey)}`;
}
function checkKey(storeKey: number): number {
  if (!Number.isSafeInteger(storeKey) || storeKey <= 0) throw new Error(`store key must be a positive integer, got ${storeKey}`);
  return storeKey;
}

/** Cursor: base64url of "<order>:<c1>.<c2>.<c3>" — the last row's ids in the index order. Opaque to callers. */
function encodeCursor(order: string, row: { s: number; p: number; o: number }): string {
  const cols = ORDERS[order]!;
  return Buffer.from(`${order}:${cols.map((c) => row[c]).join('.')}`).toString('base64url');
}
export function decodeCursor(cursor: string, order: string): [number, number, number] {
  const text = Buffer.from(cursor, 'base64url').toString('utf8');
  const match = /^(spo|pos|osp):(\d{1,10})\.(\d{1,10})\.(\d{1,10})$/.exec(text);
  if (!match || match[1] !== order) throw new InvalidCursorError();
  return [Number(match[2]), Number(match[3]), Number(match[4])];
}

/** Builds the one SQL statement for a pattern: bound terms resolve by scalar sub-selects (unknown term → NULL → no rows). */
function patternQuery(storeKey: number, pattern: FactPattern, from: 'rows' | 'count') {
  const facts = factsTable(storeKey), terms = termsTable(storeKey);
  const params: unknown[] = [];
  const where: string[] = [];
  const bind = (col: Position, term: string | undefined) => {
    if (term === undefined) return;
    params.push(term);
    where.push(`f.${col} = (SELECT id FROM ${terms} WHERE term = $${params.length})`);
  };
  bind('s', pattern.subject);
  bind('p', pattern.predicate);
  bind('o', pattern.object);
  return { facts, terms, params, where, from };
}

/**
 * Facts matching an atomic pattern, in a stable order, one page at a time (keyset pagination on the index that serves the pattern).
 * One SQL statement per call. A version whose tables do not exist (not ready, deleted) gives no facts.
 *
 * Hot path of /api/v1: the statement is named, so each pooled connection parses and plans it once per (version, shape)
 * and then only binds and executes; and only the unbound positions read the term dictionary (by id, for the rows
 * returned) — a bound position's term is the one given (the match is by equality on the stored term), so a lookup with
 * all three bound reads no term rows beyond resolving its three terms.
 */
export async function lookupFacts(
  pool: pg.Pool | pg.PoolClient,
  storeKey: number,
  pattern: FactPattern,
  page: { limit: number; cursor?: string | null },
): Promise<FactPage> {
  const { statement, order, limit } = lookupStatement(storeKey, pattern, page);
  let rows: FactRowOut[];
  try {
    rows = (await pool.query(statement)).rows;
  } catch (error) {
    if ((error as { code?: string }).code === '42P01') return { facts: [], nextCursor: null };
    throw error;
  }
  return toPage(rows, pattern, order, limit);
}

export interface FactRowOut { subject?: string; predicate?: string; object?: string; asserted: boolean; s: number; p: number; o: number }

/** A page from the rows of a lookup statement (up to limit + 1 rows; one more than the limit means there is a next page). */
export function toPage(rows: FactRowOut[], pattern: FactPattern, order: 'spo' | 'pos' | 'osp', limit: number): FactPage {
  const more = rows.length > limit;
  const n = more ? limit : rows.length;
  const last = rows[n - 1];
  const facts: StoredFact[] = new Array(n);
  for (let i = 0; i < n; i++) {
    const r = rows[i];
    facts[i] = { subject: pattern.subject ?? r.subject!, predicate: pattern.predicate ?? r.predicate!, object: pattern.object ?? r.object!, asserted: r.asserted };
  }
  return { facts, nextCursor: more && last ? encodeCursor(order, last) : null };
}

/**
 * The one named statement lookupFacts sends for a pattern and page (exported so the load benchmark's reference sends
 * exactly the same SQL straight to PostgreSQL). Its name is per (version, pattern shape): each pooled connection parses
 * and plans it once, then only binds and executes.
 */
export function lookupStatement(storeKey: number, pattern: FactPattern, page: { limit: number; cursor?: string | null }) {
  const limit = Math.max(1, Math.min(MAX_PAGE_SIZE, Math.floor(page.limit) || 1));
  const order = orderFor(pattern);
  const cols = ORDERS[order]!;
  const q = patternQuery(storeKey, pattern, 'rows');
  if (page.cursor) {
    const after = decodeCursor(page.cursor, order);
    q.params.push(after[0], after[1], after[2]);
    const n = q.params.length;
    // Row comparison matches the index order, so PostgreSQL starts the index range right after the cursor.
    q.where.push(`(f.${cols[0]}, f.${cols[1]}, f.${cols[2]}) > ($${n - 2}::int, $${n - 1}::int, $${n}::int)`);
  }
  q.params.push(limit + 1);
  const shape = `${pattern.subject === undefined ? '-' : 's'}${pattern.predicate === undefined ? '-' : 'p'}${pattern.object === undefined ? '-' : 'o'}${page.cursor ? 'c' : ''}`;
  const text = lookupSql(storeKey, pattern, q.where, cols, q.params.length);
  return { statement: { name: `thence-facts-${storeKey}-${shape}`, text, values: q.params }, order, limit };
}

/**
 * The lookup SQL for one shape of pattern: the term of each position left unbound is read by a scalar sub-select on the
 * dictionary's primary key, so PostgreSQL walks the fact index in order, stops at the LIMIT and then probes the
 * dictionary once per row returned. (Written as JOINs, the planner picked merge joins that read the dictionary's key
 * index from its first id up to the largest id on the page — thousands of rows for a page of ten — and a sort.)
 */
function lookupSql(storeKey: number, pattern: FactPattern, where: string[], cols: readonly Position[], limitParam: number): string {
  return `SELECT ${selectList(storeKey, pattern).join(', ')}
    FROM ${factsTable(storeKey)} f
    ${where.length ? 'WHERE ' + where.join(' AND ') : ''}
    ORDER BY f.${cols[0]}, f.${cols[1]}, f.${cols[2]}
    LIMIT $${limitParam}`;
}

const POSITION_NAMES = [['s', 'subject'], ['p', 'predicate'], ['o', 'object']] as const;

/** The columns a lookup returns for fact table alias f: ids and asserted, plus the term of each unbound position. */
export function selectList(storeKey: number, pattern: FactPattern): string[] {
  const terms = termsTable(storeKey);
  const select = ['f.asserted', 'f.s', 'f.p', 'f.o'];
  for (const [col, name] of POSITION_NAMES) {
    if (pattern[name] === undefined) select.push(`(SELECT t.term FROM ${terms} t WHERE t.id = f.${col}) AS ${name}`);
  }
  return select;
}

/** Number of facts matching a pattern (an index-only count; cheap for bound patterns, a full index scan when nothing is bound). */
export async function countFacts(pool: pg.Pool | pg.PoolClient, storeKey: number, pattern: FactPattern): Promise<number> {
  const q = patternQuery(storeKey, pattern, 'count');
  const sql = `SELECT count(*)::bigint AS n FROM ${q.facts} f ${q.where.length ? 'WHERE ' + q.where.join(' AND ') : ''}`;
  try {
    return Number((await pool.query(sql, q.params)).rows[0].n);
  } catch (error) {
    if ((error as { code?: string }).code === '42P01') return 0;
    throw error;
  }
}

/** The version a listing currently serves (status 'ready' and published), or null. */
export async function publishedVersionBySlug(pool: pg.Pool | pg.PoolClient, slug: string): Promise<PublishedVersion | null> {
  const { rows } = await pool.query(
    `SELECT l.id AS listing_id, v.id AS version_id, v.store_key, v.number, v.fact_count
       FROM listings l JOIN kb_versions v ON v.id = l.published_version_id
      WHERE l.slug = $1 AND v.status = 'ready'`,
    [slug],
  );
  const row = rows[0];
  if (!row) return null;
  return { listingId: row.listing_id, versionId: row.version_id, storeKey: row.store_key, number: row.number, factCount: Number(row.fact_count ?? 0) };
}

/** The staging name a table is loaded under before it is served (see server/services/factLoader.ts). */
export const staging = (table: string) => `${table}_load`;

/** Drops a version's fact tables, served and staging, if present. Used on delete, before a retry and by the sweep. */
export async function dropFactTables(pool: pg.Pool | pg.PoolClient, storeKey: number): Promise<void> {
  const facts = factsTable(storeKey), terms = termsTable(storeKey);
  await pool.query(`DROP TABLE IF EXISTS ${facts}, ${terms}, ${staging(facts)}, ${staging(terms)}`);
}

/** Whether a version's fact tables are visible (committed). */
export async function factTablesExist(pool: pg.Pool | pg.PoolClient, storeKey: number): Promise<boolean> {
  const { rows } = await pool.query(`SELECT to_regclass($1) IS NOT NULL AND to_regclass($2) IS NOT NULL AS ok`, [factsTable(storeKey), termsTable(storeKey)]);
  return rows[0].ok === true;
}

// The loader lives in its own module; re-exported so callers import the whole store from one place.
export { FactLoader, type LoadStats, type PredicateCount } from './factLoader.js';
