// Bulk loading of one version's facts into the fact store (layout and visibility rules: server/services/factStore.ts).
import type pg from 'pg';
import copyStreams from 'pg-copy-streams';
import { dropFactTables, factsTable, staging, termsTable } from './factStore.js';

const RDF_TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';

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
