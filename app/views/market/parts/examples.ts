// Builds the docs page's copyable examples for one knowledge base and one key (or a placeholder for it).
const RDF_TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';

/** Quotes a value for a POSIX shell: single quotes, with each embedded quote closed, escaped and reopened. */
export const shellQuote = (value: string) => `'${value.replace(/'/g, `'\\''`)}'`;

export interface Example { title: string; command: string; explain: string }

export function buildExamples(base: string, slug: string, key: string, classIri: string | null, propertyIri: string | null): Example[] {
  const kb = `${base}/api/v1/kbs/${slug}`;
  const auth = `-H ${shellQuote(`Authorization: Bearer ${key}`)}`;
  const cls = classIri ?? 'http://example.org/SomeClass';
  const prop = propertyIri ?? 'http://example.org/someProperty';
  const select = `SELECT ?member WHERE { ?member a <${cls}> } LIMIT 10`;
  const ask = `ASK { ?s <${prop}> ?o }`;
  return [
    { title: 'Members of a class (facts, first page)', explain: 'Any of subject, predicate and object may be bound; follow nextCursor for the next page.', command: `curl -sG ${auth} ${shellQuote(`${kb}/facts`)} --data-urlencode ${shellQuote(`predicate=${RDF_TYPE}`)} --data-urlencode ${shellQuote(`object=${cls}`)} --data-urlencode 'limit=20'` },
    { title: 'Is one fact entailed?', explain: 'With all three bound the answer is {"entailed": true|false, "asserted": …}.', command: `curl -sG ${auth} ${shellQuote(`${kb}/facts`)} --data-urlencode 'subject=http://example.org/thing' --data-urlencode ${shellQuote(`predicate=${RDF_TYPE}`)} --data-urlencode ${shellQuote(`object=${cls}`)}` },
    { title: 'SPARQL SELECT (GET)', explain: 'One triple pattern, optional LIMIT and OFFSET; answers in the SPARQL 1.1 Query Results JSON Format.', command: `curl -sG ${auth} ${shellQuote(`${kb}/sparql`)} --data-urlencode ${shellQuote(`query=${select}`)}` },
    { title: 'SPARQL ASK (POST)', explain: 'The body is the query itself, as application/sparql-query.', command: `curl -s ${auth} -H 'Content-Type: application/sparql-query' --data-binary ${shellQuote(ask)} ${shellQuote(`${kb}/sparql`)}` },
  ];
}
