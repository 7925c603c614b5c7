// /api/v1/kbs/:slug/sparql — the SPARQL 1.1 Protocol (§2.1 query operation: GET ?query=, POST form-encoded query=,
// POST application/sparql-query) for ASK and SELECT over exactly one triple pattern with optional LIMIT/OFFSET, parsed
// with sparqljs and answered in the SPARQL 1.1 Query Results JSON Format (§3). Anything else: 400 naming what is supported.
import type { RequestHandler } from 'express';
import sparqljs from 'sparqljs';
import type { AppContext } from '../context.js';
import { HttpError } from '../http/errors.js';
import { lookupFacts, MAX_PAGE_SIZE, type FactPattern, type PublishedVersion, type StoredFact } from '../services/factStore.js';
import { jsonTerm, sendJson, storedFromQueryTerm, type JsonTerm, type SparqlTermLike } from './terms.js';

export const SUPPORTED = 'Supported: ASK or SELECT (variables or *) over exactly one triple pattern, with optional LIMIT and OFFSET; PREFIX and BASE may be used.';
/** Results without LIMIT stop here (the facts endpoint pages without bound); OFFSET + LIMIT may reach MAX_WINDOW. */
export const MAX_UNLIMITED = 10_000;
export const MAX_WINDOW = 100_000;
/** SPARQL 1.1 Query Results JSON Format §5 (Internet media type). */
const RESULTS_TYPE = 'application/sparql-results+json; charset=utf-8';

const unsupported = (what: string) => new HttpError(400, `${what} is not supported here. ${SUPPORTED}`, 'unsupported_query');

type Position = 'subject' | 'predicate' | 'object';
export interface SinglePatternQuery {
  form: 'ASK' | 'SELECT';
  pattern: FactPattern;
  /** Variable name per position (blank nodes in the query act as variables that are not projected). */
  variables: Partial<Record<Position, string>>;
  projection: string[];
  limit: number | null;
  offset: number;
}

/** Parses and checks a query text; throws a 400 that says what is wrong and what is supported. */
export function parseSinglePatternQuery(text: string): SinglePatternQuery {
  let parsed: sparqljs.SparqlQuery;
  try {
    parsed = new sparqljs.Parser().parse(text);
  } catch (error) {
    throw new HttpError(400, `The query is not valid SPARQL 1.1: ${(error as Error).message.split('\n').slice(0, 3).join(' ')}`, 'malformed_query');
  }
  if (parsed.type !== 'query') throw unsupported('SPARQL Update');
  if (parsed.queryType !== 'ASK' && parsed.queryType !== 'SELECT') throw unsupported(`A ${parsed.queryType} query`);
  const q = parsed as sparqljs.Query & { from?: { default: unknown[]; named: unknown[] }; values?: unknown };
  if (q.from && (q.from.default.length || q.from.named.length)) throw unsupported('FROM / FROM NAMED');
  if ('group' in q && q.group) throw unsupported('GROUP BY');
  if ('having' in q && q.having) throw unsupported('HAVING');
  if ('order' in q && q.order) throw unsupported('ORDER BY');
  if (q.values) throw unsupported('VALUES');
  const where = q.where ?? [];
  if (where.length !== 1 || where[0].type !== 'bgp') throw unsupported(where.length === 0 ? 'An empty WHERE clause' : `A "${where.find((p) => p.type !== 'bgp')?.type ?? 'group'}" pattern (or more than one group)`);
  const triples = (where[0] as sparqljs.BgpPattern).triples;
  if (triples.length !== 1) throw unsupported(`A basic graph pattern of ${triples.length} triple patterns`);
  const triple = triples[0];
  const pattern: FactPattern = {};
  const variables: SinglePatternQuery['variables'] = {};
  const positions: [Position, unknown][] = [['subject', triple.subject], ['predicate', triple.predicate], ['object', triple.object]];
  for (const [position, raw] of positions) {
    const term = raw as SparqlTermLike & { type?: string };
    if (term.type === 'path') throw unsupported('A property path');
    if (term.termType === 'Variable') variables[position] = term.value;
    else if (term.termType === 'BlankNode') variables[position] = `_:${term.value}`;
    else if (term.termType === 'NamedNode' || (term.termType === 'Literal' && position === 'object')) pattern[position] = storedFromQueryTerm(term);
    else if (term.termType === 'Literal') throw new HttpError(400, `A literal cannot stand in the ${position} position of a triple pattern.`, 'malformed_query');
    else throw unsupported(`A ${term.termType} term`);
  }
  const patternVars = [...new Set(Object.values(variables).filter((v) => !v.startsWith('_:')))];
  let projection: string[] = [];
  if (q.queryType === 'SELECT') {
    const select = q as sparqljs.SelectQuery;
    for (const v of select.variables) {
      if ((v as { termType?: string }).termType === 'Wildcard') projection = patternVars;
      else if ((v as { termType?: string }).termType === 'Variable') projection.push((v as { value: string }).value);
      else throw unsupported('A SELECT expression (AS)');
    }
    // DISTINCT is a no-op when every pattern variable is projected (facts form a set); otherwise it would need deduplication.
    if (select.distinct && !patternVars.every((v) => projection.includes(v))) throw unsupported('SELECT DISTINCT over a subset of the pattern’s variables');
  }
  const limit = (q as { limit?: number }).limit ?? null;
  const offset = (q as { offset?: number }).offset ?? 0;
  if (limit !== null && offset + limit > MAX_WINDOW) throw new HttpError(400, `OFFSET + LIMIT may be at most ${MAX_WINDOW}; page deeper with the facts endpoint's cursor.`, 'unsupported_query');
  return { form: q.queryType as 'ASK' | 'SELECT', pattern, variables, projection, limit, offset };
}

/** Evaluates the pattern page by page; a variable that occurs twice (e.g. ?x :p ?x) keeps only facts where they agree. */
async function solutions(ctx: AppContext, version: PublishedVersion, query: SinglePatternQuery, wanted: number): Promise<{ facts: StoredFact[]; more: boolean }> {
  const names = Object.values(query.variables);
  const repeated = names.length !== new Set(names).size;
  const keep = (f: StoredFact) => {
    const seen = new Map<string, string>();
    for (const position of ['subject', 'predicate', 'object'] as Position[]) {
      const v = query.variables[position];
      if (!v) continue;
      const value = f[position];
      if (seen.has(v) && seen.get(v) !== value) return false;
      seen.set(v, value);
    }
    return true;
  };
  const out: StoredFact[] = [];
  let cursor: string | null = null;
  let scanned = 0;
  do {
    const page = await lookupFacts(ctx.pool, version.storeKey, query.pattern, { limit: repeated ? MAX_PAGE_SIZE : Math.min(MAX_PAGE_SIZE, wanted + 1 - out.length), cursor });
    for (const f of page.facts) if (!repeated || keep(f)) out.push(f);
    scanned += page.facts.length;
    cursor = page.nextCursor;
    if (repeated && scanned > MAX_WINDOW * 10 && out.length <= wanted) throw new HttpError(400, `The pattern repeats a variable and matches too many facts to filter here (over ${MAX_WINDOW * 10}); bind one more position.`, 'unsupported_query');
  } while (cursor && out.length <= wanted);
  return { facts: out.slice(0, wanted), more: out.length > wanted || cursor !== null };
}

function binding(fact: StoredFact, query: SinglePatternQuery): Record<string, JsonTerm> {
  const row: Record<string, JsonTerm> = {};
  for (const position of ['subject', 'predicate', 'object'] as Position[]) {
    const v = query.variables[position];
    if (v && !v.startsWith('_:') && query.projection.includes(v)) row[v] = jsonTerm(fact[position]);
  }
  return row;
}

/** Reads the query text per SPARQL 1.1 Protocol §2.1.1–2.1.3; exactly one query string. */
function queryText(req: Parameters<RequestHandler>[0]): string {
  let values: unknown;
  if (req.method === 'GET') values = req.query.query;
  else {
    const type = (req.headers['content-type'] ?? '').split(';')[0].trim().toLowerCase();
    if (type === 'application/sparql-query') values = typeof req.body === 'string' ? req.body : undefined;
    else if (type === 'application/x-www-form-urlencoded') values = (req.body as Record<string, unknown> | undefined)?.query;
    else throw new HttpError(415, 'POST the query as application/sparql-query, or as application/x-www-form-urlencoded with a "query" field (SPARQL 1.1 Protocol §2.1.2–2.1.3).', 'unsupported_media_type');
  }
  for (const name of ['default-graph-uri', 'named-graph-uri']) {
    if (req.query[name] !== undefined || (req.body && typeof req.body === 'object' && name in (req.body as object))) throw unsupported(`The protocol parameter ${name}`);
  }
  if (Array.isArray(values)) throw new HttpError(400, 'Send exactly one "query" parameter (SPARQL 1.1 Protocol §2.1).', 'malformed_query');
  if (typeof values !== 'string' || !values.trim()) throw new HttpError(400, 'The "query" parameter is missing or empty (SPARQL 1.1 Protocol §2.1).', 'malformed_query');
  return values;
}

export function sparqlHandler(ctx: AppContext): RequestHandler {
  return async (req, res, next) => {
    try {
      const version = res.locals.version as PublishedVersion;
      const query = parseSinglePatternQuery(queryText(req));
      if (query.form === 'ASK') {
        const { facts } = await solutions(ctx, version, query, 1);
        sendJson(res, { head: {}, boolean: facts.length > 0 }, RESULTS_TYPE);
        return;
      }
      const wanted = query.limit === null ? MAX_UNLIMITED : query.offset + query.limit;
      const { facts, more } = await solutions(ctx, version, query, wanted);
      if (query.limit === null && more) {
        throw new HttpError(400, `The query has more than ${MAX_UNLIMITED} solutions; add LIMIT (and OFFSET to page), or use the facts endpoint's cursor.`, 'too_many_solutions');
      }
      const bindings = facts.slice(query.offset).map((f) => binding(f, query));
      sendJson(res, { head: { vars: query.projection }, results: { bindings } }, RESULTS_TYPE);
    } catch (error) {
      next(error);
    }
  };
}
