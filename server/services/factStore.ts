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
import copyStreams from 'pg-copy-streams';

const RDF_TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';

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

type Position = 's' | 'p' | 'o';
const ORDERS: Record<string, readonly [Position, Position, Position]> = {
  spo: ['s', 'p', 'o'],
  pos: ['p', 'o', 's'],
  osp: ['o', 's', 'p'],
};

/** Returns the index order whose leading columns are exactly the bound positions of the pattern. */
function orderFor(pattern: FactPattern): 'spo' | 'pos' | 'osp' {
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
function decodeCursor(cursor: string, order: string): [number, number, number] {
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
 */
export async function lookupFacts(
  pool: pg.Pool | pg.PoolClient,
  storeKey: number,
  pattern: FactPattern,
  page: { limit: number; cursor?: string | null },
): Promise<FactPage> {
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
  const sql = `SELECT ts.term AS subject, tp.term AS predicate, tob.term AS object, f.asserted, f.s, f.p, f.o
    FROM ${q.facts} f
    JOIN ${q.terms} ts ON ts.id = f.s
    JOIN ${q.terms} tp ON tp.id = f.p
    JOIN ${q.terms} tob ON tob.id = f.o
    ${q.where.length ? 'WHERE ' + q.where.join(' AND ') : ''}
    ORDER BY f.${cols[0]}, f.${cols[1]}, f.${cols[2]}
    LIMIT $${q.params.length}`;
  let rows: { subject: string; predicate: string; object: string; asserted: boolean; s: number; p: number; o: number }[];
  try {
    rows = (await pool.query(sql, q.params)).rows;
  } catch (error) {
    if ((error as { code?: string }).code === '42P01') return { facts: [], nextCursor: null };
    throw error;
  }
  const more = rows.length > limit;
  if (more) rows.length = limit;
  const last = rows[rows.length - 1];
  return {
    facts: rows.map((r) => ({ subject: r.subject, predicate: r.predicate, object: r.object, asserted: r.asserted })),
    nextCursor: more && last ? encodeCursor(order, last) : null,
  };
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

const staging = (table: string) => `${table}_load`;

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

export interface PredicateCount { asserted: number; entailed: number }
export interface LoadStats {
  facts: number;
  asserted: number;
  terms: number;
  /** Per class IRI (objects of rdf:type facts): asserted, and entailed (asserted included). */
  perClass: Record<string, PredicateCount>;
  /** Per property IRI (every other predicate). */
  perProperty: Record<string, PredicateCount>;
  /** copyFactsMs: first fact to end of COPY (includes the producer's own time between facts); writeMs: time inside write(); endCopyMs: flushing the last rows. */
  timings: { copyFactsMs: number; writeMs: number; endCopyMs: number; copyTermsMs: number; indexMs: number };
}

/** Escapes a value for COPY's text format (PostgreSQL docs, COPY, "Text Format": backslash, newline, CR, tab). */
function copyText(value: string): string {
  return /[\\\n\r\t]/.test(value) ? value.replace(/[\\\n\r\t]/g, (c) => (c === '\\' ? '\\\\' : c === '\n' ? '\\n' : c === '\r' ? '\\r' : '\\t')) : value;
}

const FLUSH_CHARS = 1 << 18;
/** Per index-building session; four run at once (three fact orders, the dictionary), so this stays modest. */
const INDEX_MEMORY = '128MB';

/**
 * A FactSink that streams facts into a new version's staging tables.
 * open() → write()… → finish(pool) (dictionary, parallel indexes) → commit(final) (renames the tables and runs `final`,
 * e.g. the status flip, in one transaction); or abort(), which leaves nothing behind.
 */
export class FactLoader {
  private readonly ids = new Map<string, number>();
  private buffer = '';
  private stream: NodeJS.WritableStream | null = null;
  private streamDone: Promise<void> | null = null;
  private streamError: Error | null = null;
  private inTransaction = false;
  private facts = 0;
  private asserted = 0;
  private readonly perClass: Record<string, PredicateCount> = {};
  private readonly perProperty: Record<string, PredicateCount> = {};
  /** Set at the first fact: the COPY time is counted from there, not from open() (reasoning runs in between). */
  private firstWriteAt = 0;
  /** Time spent inside write() (dictionary, encoding, handing chunks to the socket): the store's own share of the streaming. */
  private writeMs = 0;
  private closed = false;
  private last: { predicate: string; p: number; object: string; o: number; bucketKey: string; bucket: PredicateCount | null } = { predicate: '', p: 0, object: '', o: 0, bucketKey: '', bucket: null };

  private constructor(private readonly pool: pg.Pool, private readonly client: pg.PoolClient, readonly storeKey: number) {}

  /** Takes a connection, drops leftovers of an earlier attempt, creates the staging fact table and opens its COPY. */
  static async open(pool: pg.Pool, storeKey: number): Promise<FactLoader> {
    const client = await pool.connect();
    const loader = new FactLoader(pool, client, storeKey);
    try {
      await dropFactTables(client, storeKey);
      await client.query('BEGIN');
      loader.inTransaction = true;
      // Created in the COPY's own transaction, so COPY may FREEZE the rows (PostgreSQL docs, COPY, FREEZE) and a crash before COMMIT leaves no table.
      await client.query(`CREATE TABLE ${staging(factsTable(storeKey))} (s integer NOT NULL, p integer NOT NULL, o integer NOT NULL, asserted boolean NOT NULL)`);
      loader.startCopy(`COPY ${staging(factsTable(storeKey))} (s, p, o, asserted) FROM STDIN WITH (FORMAT text, FREEZE true)`);
      return loader;
    } catch (error) {
      await loader.abort();
      throw error;
    }
  }

  private startCopy(sql: string): void {
    const stream = this.client.query(copyStreams.from(sql));
    this.stream = stream;
    this.streamError = null;
    this.streamDone = new Promise<void>((resolve, reject) => {
      stream.on('finish', () => resolve());
      stream.on('error', (error: Error) => {
        this.streamError = error;
        reject(error);
      });
    });
    this.streamDone.catch(() => undefined);
  }

  private id(term: string): number {
    let id = this.ids.get(term);
    if (id === undefined) {
      id = this.ids.size + 1;
      this.ids.set(term, id);
    }
    return id;
  }

  /** FactSink.write: returns a promise only when PostgreSQL is behind (stream back-pressure). */
  write(subject: string, predicate: string, object: string, asserted: boolean): void | Promise<void> {
    if (this.streamError) throw this.streamError;
    const started = performance.now();
    if (this.firstWriteAt === 0) this.firstWriteAt = Date.now();
    try {
      return this.append(subject, predicate, object, asserted);
    } finally {
      this.writeMs += performance.now() - started;
    }
  }

  private append(subject: string, predicate: string, object: string, asserted: boolean): void | Promise<void> {
    // Producers emit facts in runs (all members of one class, all pairs of one property): remembering the last predicate,
    // object and count bucket skips most hash lookups.
    if (predicate !== this.last.predicate) this.last = { predicate, p: this.id(predicate), object: '', o: 0, bucketKey: '', bucket: null };
    if (object !== this.last.object) {
      this.last.object = object;
      this.last.o = this.id(object);
    }
    const s = this.id(subject), p = this.last.p, o = this.last.o;
    this.buffer += `${s}\t${p}\t${o}\t${asserted ? 't' : 'f'}\n`;
    this.facts++;
    if (asserted) this.asserted++;
    const key = predicate === RDF_TYPE ? object : predicate;
    if (key !== this.last.bucketKey || !this.last.bucket) {
      this.last.bucketKey = key;
      this.last.bucket = predicate === RDF_TYPE ? (this.perClass[object] ??= { asserted: 0, entailed: 0 }) : (this.perProperty[predicate] ??= { asserted: 0, entailed: 0 });
    }
    const bucket = this.last.bucket;
    bucket.entailed++;
    if (asserted) bucket.asserted++;
    if (this.buffer.length >= FLUSH_CHARS) return this.flush();
  }

  private flush(): void | Promise<void> {
    const chunk = this.buffer;
    this.buffer = '';
    if (!chunk) return;
    if (!this.stream!.write(chunk)) {
      return new Promise<void>((resolve, reject) => {
        this.stream!.once('drain', resolve);
        this.streamDone!.catch(reject);
      });
    }
  }

  /** Ends the open COPY and commits its transaction. */
  private async endCopy(): Promise<void> {
    await this.flush();
    this.stream!.end();
    await this.streamDone;
    this.stream = null;
    await this.client.query('COMMIT');
    this.inTransaction = false;
  }

  /** Ends the facts COPY, writes the dictionary, builds the indexes (in parallel sessions) and statistics. Nothing is served yet. */
  async finish(onStep?: (step: 'terms' | 'indexes', fraction: number) => void): Promise<LoadStats> {
    let t = Date.now();
    await this.endCopy();
    const endCopyMs = Date.now() - t;
    const copyFactsMs = this.firstWriteAt ? Date.now() - this.firstWriteAt : 0;
    const k = this.storeKey, facts = factsTable(k), terms = termsTable(k);
    t = Date.now();
    onStep?.('terms', 0);
    await this.client.query('BEGIN');
    this.inTransaction = true;
    await this.client.query(`CREATE TABLE ${staging(terms)} (id integer NOT NULL, term text NOT NULL)`);
    this.startCopy(`COPY ${staging(terms)} (id, term) FROM STDIN WITH (FORMAT text, FREEZE true)`);
    for (const [term, id] of this.ids) {
      this.buffer += `${id}\t${copyText(term)}\n`;
      if (this.buffer.length >= FLUSH_CHARS) await this.flush();
    }
    await this.endCopy();
    const copyTermsMs = Date.now() - t;
    t = Date.now();
    // Index names carry the served table names: they survive the rename and stay unique per store key.
    const builds = [
      [`ALTER TABLE ${staging(terms)} ADD CONSTRAINT ${terms}_pkey PRIMARY KEY (id)`, `CREATE INDEX ${terms}_term ON ${staging(terms)} USING hash (term)`, `ANALYZE ${staging(terms)}`],
      [`CREATE INDEX ${facts}_spo ON ${staging(facts)} (s, p, o) INCLUDE (asserted)`, `ANALYZE ${staging(facts)}`],
      [`CREATE INDEX ${facts}_pos ON ${staging(facts)} (p, o, s) INCLUDE (asserted)`],
      [`CREATE INDEX ${facts}_osp ON ${staging(facts)} (o, s, p) INCLUDE (asserted)`],
    ];
    let done = 0;
    onStep?.('indexes', 0);
    // CREATE INDEX takes a SHARE lock, which does not conflict with itself: the three orders build side by side.
    await Promise.all(
      builds.map(async (statements) => {
        const session = await this.pool.connect();
        try {
          await session.query(`SET maintenance_work_mem = '${INDEX_MEMORY}'`);
          for (const sql of statements) await session.query(sql);
          await session.query('RESET maintenance_work_mem');
        } finally {
          session.release();
        }
        onStep?.('indexes', ++done / builds.length);
      }),
    );
    return {
      facts: this.facts,
      asserted: this.asserted,
      terms: this.ids.size,
      perClass: this.perClass,
      perProperty: this.perProperty,
      timings: { copyFactsMs, writeMs: Math.round(this.writeMs), endCopyMs, copyTermsMs, indexMs: Date.now() - t },
    };
  }

  /** Renames the staging tables to their served names and runs `final` (e.g. the status flip) in the same transaction. */
  async commit(final: (client: pg.PoolClient) => Promise<void>): Promise<void> {
    const facts = factsTable(this.storeKey), terms = termsTable(this.storeKey);
    try {
      await this.client.query('BEGIN');
      this.inTransaction = true;
      await this.client.query(`ALTER TABLE ${staging(facts)} RENAME TO ${facts}`);
      await this.client.query(`ALTER TABLE ${staging(terms)} RENAME TO ${terms}`);
      await final(this.client);
      await this.client.query('COMMIT');
      this.inTransaction = false;
    } catch (error) {
      await this.abort();
      throw error;
    }
    this.release();
  }

  /** Rolls back what is open, drops the staging tables and returns the connection. Safe to call twice. */
  async abort(): Promise<void> {
    if (this.closed) return;
    if (this.stream || this.inTransaction) {
      // An open COPY must end before ROLLBACK is accepted; destroying the connection makes PostgreSQL roll back at once.
      this.release(new Error('load aborted'));
    } else this.release();
    const facts = factsTable(this.storeKey), terms = termsTable(this.storeKey);
    await this.pool.query(`DROP TABLE IF EXISTS ${staging(facts)}, ${staging(terms)}`).catch(() => undefined);
  }

  private release(error?: Error): void {
    if (this.closed) return;
    this.closed = true;
    this.ids.clear();
    // Releasing with an error destroys the connection, which makes PostgreSQL roll the transaction back.
    this.client.release(error);
  }
}
