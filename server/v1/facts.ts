// GET /api/v1/kbs/:slug/facts — entailed facts matching an atomic pattern (any of subject, predicate, object bound),
// a page at a time with an opaque cursor; with all three bound it answers whether that one fact is entailed.
import type { RequestHandler } from 'express';
import type { AppContext } from '../context.js';
import { badRequest } from '../http/errors.js';
import { InvalidCursorError, type FactPattern, type PublishedVersion } from '../services/factStore.js';
import { factLookupBatcher } from '../services/factBatch.js';
import { canonicalLiteral, isIri, isNTriplesLiteral, sendJson } from './terms.js';

export const DEFAULT_LIMIT = 100;
export const MAX_LIMIT = 1000;

function param(query: Record<string, unknown>, name: string): string | undefined {
  const value = query[name];
  if (value === undefined || value === '') return undefined;
  if (typeof value !== 'string') throw badRequest(`Give "${name}" once, as a single value.`, { [name]: ['Repeated or nested parameter.'] });
  return value;
}

/** Reads and checks the pattern: subject and predicate are absolute IRIs; the object an IRI or an N-Triples literal. */
export function readPattern(query: Record<string, unknown>): FactPattern {
  const fields: Record<string, string[]> = {};
  const pattern: FactPattern = {};
  const subject = param(query, 'subject'), predicate = param(query, 'predicate'), object = param(query, 'object');
  if (subject !== undefined) {
    if (isIri(subject) || /^_:[A-Za-z0-9_.-]+$/.test(subject)) pattern.subject = subject;
    else fields.subject = ['Expected an absolute IRI such as http://example.org/thing (no angle brackets).'];
  }
  if (predicate !== undefined) {
    if (isIri(predicate)) pattern.predicate = predicate;
    else fields.predicate = ['Expected an absolute IRI such as http://www.w3.org/1999/02/22-rdf-syntax-ns#type.'];
  }
  if (object !== undefined) {
    if (object.startsWith('"')) {
      if (isNTriplesLiteral(object)) pattern.object = canonicalLiteral(object);
      else fields.object = ['A literal object is written in N-Triples form, e.g. "42"^^<http://www.w3.org/2001/XMLSchema#integer> or "Lyon"@fr.'];
    } else if (isIri(object) || /^_:[A-Za-z0-9_.-]+$/.test(object)) pattern.object = object;
    else fields.object = ['Expected an absolute IRI, or a literal in N-Triples form starting with ".'];
  }
  for (const name of Object.keys(query)) {
    if (!['subject', 'predicate', 'object', 'limit', 'cursor'].includes(name)) fields[name] = ['Unknown parameter; use subject, predicate, object, limit and cursor.'];
  }
  if (Object.keys(fields).length) throw badRequest(`The query parameters are not valid: ${Object.entries(fields).map(([k, v]) => `${k}: ${v[0]}`).join(' ')}`, fields);
  return pattern;
}

export function factsHandler(ctx: AppContext): RequestHandler {
  const batcher = factLookupBatcher(ctx.pool);
  // Callbacks, not async/await: this runs on every lookup, and each promise and microtask turn shows in its CPU cost.
  return (req, res, next) => {
    const version = res.locals.version as PublishedVersion;
    let pattern: FactPattern, limit: number, cursor: string | null;
    try {
      // Express 5 parses the query string again on every read of req.query: read it once.
      const query = req.query as Record<string, unknown>;
      pattern = readPattern(query);
      const limitText = param(query, 'limit');
      limit = limitText === undefined ? DEFAULT_LIMIT : Number(limitText);
      if (!Number.isInteger(limit) || limit < 1 || limit > MAX_LIMIT) throw badRequest(`"limit" must be a whole number from 1 to ${MAX_LIMIT}.`, { limit: [`1 to ${MAX_LIMIT}`] });
      cursor = param(query, 'cursor') ?? null;
    } catch (error) {
      return next(error);
    }
    const all = pattern.subject !== undefined && pattern.predicate !== undefined && pattern.object !== undefined;
    // Coalesced with the other lookups of this event-loop turn into one statement (server/services/factBatch.ts).
    batcher.lookupThen(version.storeKey, pattern, { limit: all ? 1 : limit, cursor: all ? null : cursor }, (error, page) => {
      try {
        if (error) {
          if (error instanceof InvalidCursorError) throw badRequest(error.message, { cursor: ['Not a cursor this query handed out.'] });
          throw error;
        }
        const kb = { slug: req.params.slug, version: version.number };
        if (all) {
          const fact = page!.facts[0];
          sendJson(res, { kb, fact: { subject: pattern.subject, predicate: pattern.predicate, object: pattern.object }, entailed: !!fact, asserted: fact ? fact.asserted : false });
          return;
        }
        sendJson(res, { kb, pattern, facts: page!.facts, nextCursor: page!.nextCursor });
      } catch (thrown) {
        next(thrown);
      }
    });
  };
}
