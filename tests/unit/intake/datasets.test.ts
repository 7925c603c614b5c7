// Dataset intake: N-Triples, Turtle and mapped CSV streamed into the columnar ABox through the term dictionary.

import { describe, expect, it, beforeAll, afterAll } from 'vitest';
import fc from 'fast-check';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { loadDatasets, InputError } from '../../../reasoner/intake.js';
import { TermDictionary } from '../../../reasoner/model/dictionary.js';
import { Abox } from '../../../reasoner/model/abox.js';
import type { DatasetSource } from '../../../reasoner/api.js';

let dir: string;
beforeAll(() => { dir = mkdtempSync(join(tmpdir(), 'thence-intake-')); });
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const file = (name: string, content: string | Buffer) => { const p = join(dir, name); writeFileSync(p, content); return p; };

async function load(sources: DatasetSource[]) {
  const dictionary = new TermDictionary(), abox = new Abox();
  const result = await loadDatasets(sources, dictionary, abox);
  const rows = {
    classes: [] as string[], properties: [] as string[], data: [] as string[], same: [] as string[], different: [] as string[],
  };
  const t = (id: number) => dictionary.term(id);
  abox.forEachClass((c, i) => rows.classes.push(`${t(c)}(${t(i)})`));
  abox.forEachProperty((p, s, o) => rows.properties.push(`${t(p)}(${t(s)}, ${t(o)})`));
  abox.forEachData((s, p, l) => rows.data.push(`${t(p)}(${t(s)}, ${t(l)})`));
  abox.forEachSame((a, b) => rows.same.push(`${t(a)} = ${t(b)}`));
  abox.forEachDifferent((a, b) => rows.different.push(`${t(a)} != ${t(b)}`));
  return { ...result, rows, dictionary, abox };
}

async function errorOf(sources: DatasetSource[]): Promise<{ position: string; message: string }> {
  const e = await load(sources).catch((x) => x);
  if (!(e instanceof InputError)) throw new Error(`expected an InputError, got ${e}`);
  return e.diagnostics[0]! as { position: string; message: string };
}

const RDF_TYPE = '<http://www.w3.org/1999/02/22-rdf-syntax-ns#type>';

describe('N-Triples datasets (W3C RDF 1.1 N-Triples §7 grammar)', () => {
  it('reads class, property, sameAs, differentFrom and data triples into their columns', async () => {
    const path = file('a.nt', [
      '# a comment line',
      `<http://e/a> ${RDF_TYPE} <http://e/Person> .`,
      '<http://e/a> <http://e/knows> _:b1 .',
      '_:b1 <http://e/name> "Bob \\"B\\" \\u00e9"@EN .',
      '<http://e/a> <http://e/age> "42"^^<http://www.w3.org/2001/XMLSchema#integer> .',
      '<http://e/a> <http://e/name> "x"^^<http://www.w3.org/2001/XMLSchema#string> .',
      '<http://e/a> <http://www.w3.org/2002/07/owl#sameAs> <http://e/a2> .',
      '<http://e/a> <http://www.w3.org/2002/07/owl#differentFrom> <http://e/c> .',
      '',
      '<http://e/\\u00E9t\\u00E9> <http://e/p> <http://e/a> . # trailing comment',
    ].join('\n'));
    const { rows, counts } = await load([{ path }]);
    expect(rows.classes).toEqual(['http://e/Person(http://e/a)']);
    expect(rows.properties).toEqual(['http://e/knows(http://e/a, _:f1_b1)', 'http://e/p(http://e/été, http://e/a)']);
    // Canonical N-Triples: language tags lower-cased, "x"^^xsd:string written "x", escapes normalised (RDF 1.1 N-Triples §4).
    expect(rows.data).toEqual([
      'http://e/name(_:f1_b1, "Bob \\"B\\" é"@en)',
      'http://e/age(http://e/a, "42"^^<http://www.w3.org/2001/XMLSchema#integer>)',
      'http://e/name(http://e/a, "x")',
    ]);
    expect(rows.same).toEqual(['http://e/a = http://e/a2']);
    expect(rows.different).toEqual(['http://e/a != http://e/c']);
    expect(counts).toMatchObject({ triples: 8, dataFacts: 3, classAssertions: 1, propertyAssertions: 2 });
  });

  it('keeps one id per distinct term across files, and blank nodes local to their file', async () => {
    const one = file('b1.nt', '_:x <http://e/p> <http://e/a> .\n');
    const two = file('b2.nt', '_:x <http://e/p> <http://e/a> .\n');
    const { rows, dictionary } = await load([{ path: one }, { path: two }]);
    expect(rows.properties).toEqual(['http://e/p(_:f1_x, http://e/a)', 'http://e/p(_:f2_x, http://e/a)']);
    expect(dictionary.id('http://e/a')).toBeGreaterThanOrEqual(0);
  });

  it('ignores TBox triples in a dataset with a warning, and reports data facts kept without datatype reasoning', async () => {
    const path = file('c.nt', `<http://e/A> <http://www.w3.org/2000/01/rdf-schema#subClassOf> <http://e/B> .\n<http://e/A> ${RDF_TYPE} <http://www.w3.org/2002/07/owl#Class> .\n<http://e/a> <http://e/n> "1" .\n`);
    const { diagnostics, rows } = await load([{ path }]);
    expect(rows.classes).toEqual([]);
    expect(diagnostics.map((d) => d.message)).toEqual([
      '2 triples in the RDF/RDFS/OWL vocabulary ignored: put TBox statements in the ontology',
      '1 data-property facts kept as facts without datatype reasoning',
    ]);
  });

  it('names file:line:column and what was expected', async () => {
    expect(await errorOf([{ path: file('e1.nt', `<http://e/a> ${RDF_TYPE} <http://e/B> .\n<http://e/a> <http://e/p> "open .\n`) }]))
      .toEqual({ severity: 'error', position: expect.stringMatching(/e1\.nt:2:27$/), message: 'unterminated literal: expected a closing \'"\'' });
    expect((await errorOf([{ path: file('e2.nt', '<http://e/a> <http://e/p> <http://e/b>\n') }])).message).toBe('expected "." at the end of the triple');
    expect((await errorOf([{ path: file('e3.nt', '<a> <http://e/p> <http://e/b> .\n') }])).message).toMatch(/relative IRI/);
    expect((await errorOf([{ path: file('e4.nt', '<http://e/a b> <http://e/p> <http://e/b> .\n') }])).position).toMatch(/e4\.nt:1:12$/)   // the space inside the IRI;
  });

  it('refuses non-UTF-8 bytes naming line and column', async () => {
    const path = file('latin1.nt', Buffer.concat([Buffer.from('<http://e/a> <http://e/p> <http://e/b> .\n<http://e/a> <http://e/p> "caf'), Buffer.from([0xe9]), Buffer.from('" .\n')]));
    expect(await errorOf([{ path }])).toMatchObject({ position: expect.stringMatching(/latin1\.nt:2:31$/), message: expect.stringMatching(/invalid UTF-8 byte 0xe9/) });
  });

  it('refuses a line longer than the limit instead of buffering it', async () => {
    const path = file('long.nt', `<http://e/a> <http://e/p> "${'x'.repeat(3000)}" .\n`);
    const e = await loadDatasets([{ path }], new TermDictionary(), new Abox(), { maxLineBytes: 1024 }).catch((x) => x);
    expect(e.diagnostics[0].message).toBe('line longer than 1024 bytes');
  });

  it('stops when the signal aborts', async () => {
    const path = file('abort.nt', `<http://e/a> <http://e/p> <http://e/b> .\n`.repeat(1000));
    const controller = new AbortController();
    controller.abort();
    await expect(loadDatasets([{ path }], new TermDictionary(), new Abox(), { signal: controller.signal })).rejects.toMatchObject({ name: 'AbortError' });
  });
});

describe('Turtle datasets (W3C RDF 1.1 Turtle)', () => {
  it('reads prefixed names, lists of objects, blank node property lists and numbers', async () => {
    // Shapes of the Turtle specification §2 examples (from memory): predicate lists, object lists, [ ] and literals.
    const path = file('d.ttl', '@prefix : <http://e/> .\n:a a :Person ; :knows [ :name "Bob" ] , :c .\n:c :age 42 .\n');
    const { rows } = await load([{ path }]);
    expect(rows.classes).toEqual(['http://e/Person(http://e/a)']);
    expect(rows.properties).toEqual([expect.stringMatching(/^http:\/\/e\/knows\(http:\/\/e\/a, _:f1_/), 'http://e/knows(http://e/a, http://e/c)']);
    expect(rows.data).toEqual([expect.stringMatching(/^http:\/\/e\/name\(_:f1_.*, "Bob"\)$/), 'http://e/age(http://e/c, "42"^^<http://www.w3.org/2001/XMLSchema#integer>)']);
  });
  it('names the line of a syntax error', async () => {
    expect((await errorOf([{ path: file('e.ttl', '@prefix : <http://e/> .\n:a :b :c ;\n  :d "x .\n') }])).position).toMatch(/e\.ttl:3$/);
  });
  it('reads a Turtle file fed in many chunks the same as in one', async () => {
    // ≈ 1.3 MB: more than one 1 MiB read chunk, so statements straddle chunk ends.
    const lines = Array.from({ length: 10_000 }, (_, i) => `:i${i} a :C${i % 7} ; :p :i${(i * 31) % 10_000} ; :n "${'x'.repeat(80)}" .`);
    const path = file('big.ttl', '@prefix : <http://e/> .\n' + lines.join('\n') + '\n');
    const { abox } = await load([{ path }]);
    expect(abox.classAssertionCount).toBe(10_000);
    expect(abox.propertyAssertionCount).toBe(10_000);
    expect(abox.dataFactCount).toBe(10_000);
  });
});

describe('CSV datasets with a column mapping (api.ts CsvMapping)', () => {
  const mapping = {
    subjectColumn: 'id', base: 'http://e/',
    columns: { person: { kind: 'class', iri: 'http://e/Person' }, knows: { kind: 'property', iri: 'http://e/knows' }, kind: { kind: 'type' } },
  } as const;
  it('maps truthy class cells, |-separated property cells and type cells', async () => {
    const path = file('p.csv', 'id,person,knows,kind,ignored\na,yes,b|http://other/c,Agent,zzz\n"b",no,,,\n');
    const { rows } = await load([{ path, csv: mapping }]);
    expect(rows.classes).toEqual(['http://e/Person(http://e/a)', 'http://e/Agent(http://e/a)']);
    expect(rows.properties).toEqual(['http://e/knows(http://e/a, http://e/b)', 'http://e/knows(http://e/a, http://other/c)']);
  });
  it('checks the header against the mapping', async () => {
    expect((await errorOf([{ path: file('h.csv', 'name,person\na,1\n'), csv: mapping }])).message).toBe('subject column "id" not in the header (found: name, person)');
  });
  it('names the line of an empty subject and of a ragged row', async () => {
    expect(await errorOf([{ path: file('s.csv', 'id,person,knows,kind\na,1,,\n,1,,\n'), csv: mapping }])).toMatchObject({ position: expect.stringMatching(/s\.csv:3$/), message: 'empty subject in column "id"' });
    expect((await errorOf([{ path: file('r.csv', 'id,person,knows,kind\na,1\n'), csv: mapping }])).message).toMatch(/Invalid Record Length|column/i);
  });
  it('needs a mapping for a CSV file', async () => {
    expect((await errorOf([{ path: file('m.csv', 'id\na\n') }])).message).toBe('a CSV dataset needs a column mapping');
  });
});

describe('Turtle hostile input', () => {
  it('refuses a huge literal instead of buffering it without bound', async () => {
    const path = file('huge.ttl', `@prefix : <http://e/> .\n:a :p "${'x'.repeat(4 << 20)}" .\n`);
    const e = await loadDatasets([{ path }], new TermDictionary(), new Abox(), { maxLineBytes: 1 << 20 }).catch((x) => x);
    expect(e).toBeInstanceOf(InputError);
    expect(e.diagnostics[0].message).toMatch(/longer than 1048576 bytes/);
  });
});

describe('N-Triples reader agrees with n3 (outside reference parser) on random documents', () => {
  // Random terms with the escapes of RDF 1.1 N-Triples §7 (UCHAR in IRIs and literals, ECHAR in literals).
  const iriChar = fc.constantFrom('a', 'b', 'Z', '0', '-', '.', '~', '/', '#', 'é', '中', '\\u00E9', '\\U0001F600', '%20');
  const iri = fc.array(iriChar, { maxLength: 8 }).map((cs) => `<http://e.org/${cs.join('')}>`);
  const blank = fc.stringMatching(/^[a-z][a-z0-9]{0,5}$/).map((l) => `_:${l}`);
  const litChar = fc.constantFrom('a', ' ', 'ü', '😀', '\\t', '\\n', '\\"', '\\\\', '\\u0041', "\\'", '\\r', '\\b', '\\f');
  const literal = fc.tuple(fc.array(litChar, { maxLength: 8 }), fc.constantFrom('', '@en', '@EN-gb', '^^<http://www.w3.org/2001/XMLSchema#string>', '^^<http://www.w3.org/2001/XMLSchema#integer>'))
    .map(([cs, suffix]) => `"${cs.join('')}"${suffix}`);
  const triple = fc.tuple(fc.oneof(iri, blank), iri, fc.oneof(iri, blank, literal)).map(([s, p, o]) => `${s} ${p} ${o} .`);

  it('reads the same canonical terms as n3 for every triple (fast-check)', async () => {
    const { Parser } = await import('n3');
    const { fromRdfJs } = await import('../../../reasoner/syntax/rdf-graph.js');
    let n = 0;
    await fc.assert(fc.asyncProperty(fc.array(triple, { minLength: 1, maxLength: 20 }), async (lines) => {
      const text = lines.join('\n') + '\n';
      const path = file(`diff${n++}.nt`, text);
      const dictionary = new TermDictionary(), abox = new Abox();
      await loadDatasets([{ path }], dictionary, abox);
      const ours: string[] = [];
      const t = (id: number) => dictionary.term(id).replace(/^_:f1_/, '_:');
      abox.forEachClass((c, i) => ours.push(`${t(i)} type ${t(c)}`));
      abox.forEachProperty((p, s, o) => ours.push(`${t(s)} ${t(p)} ${t(o)}`));
      abox.forEachData((s, p, l) => ours.push(`${t(s)} ${t(p)} ${t(l)}`));
      const theirs = new Parser({ format: 'N-Triples', blankNodePrefix: '' }).parse(text).map((q) => {
        const key = (x: Parameters<typeof fromRdfJs>[0]) => fromRdfJs(x).key;
        const p = q.predicate.value === 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type' ? 'type' : key(q.predicate);
        return p === 'type' ? `${key(q.subject)} type ${key(q.object)}` : `${key(q.subject)} ${p} ${key(q.object)}`;
      });
      expect(ours.sort()).toEqual(theirs.sort());
    }), { numRuns: 150 });
  });
});

describe('CSV errors in large files', () => {
  it('reports the first bad row even when more chunks follow', async () => {
    // ≈ 2.6 MB, three read chunks; the bad row is in the first.
    const pad = 'x'.repeat(30);
    const rows = Array.from({ length: 60_000 }, (_, i) => (i === 5 ? `,1,,,${pad}` : `i${i},1,,,${pad}`));
    const path = file('many.csv', 'id,person,knows,kind,pad\n' + rows.join('\n') + '\n');
    const mapping = { subjectColumn: 'id', base: 'http://e/', columns: { person: { kind: 'class', iri: 'http://e/Person' } } } as const;
    expect(await errorOf([{ path, csv: mapping }])).toMatchObject({ position: expect.stringMatching(/many\.csv:7$/), message: 'empty subject in column "id"' });
  });
});

describe('W3C examples as datasets', () => {
  it('RDF 1.1 N-Triples §2 examples (from memory): comments, blank nodes, typed and language literals', async () => {
    const path = file('w3c.nt', [
      '<http://one.example/subject1> <http://one.example/predicate1> <http://one.example/object1> . # comments here',
      '# or on a line by themselves',
      '_:subject1 <http://an.example/predicate1> "object1" .',
      '_:subject2 <http://an.example/predicate2> "object2" .',
      '<http://example.org/show/218> <http://www.w3.org/2000/01/rdf-schema#label> "That Seventies Show"^^<http://www.w3.org/2001/XMLSchema#string> .',
      '<http://example.org/show/218> <http://www.w3.org/2000/01/rdf-schema#label> "That Seventies Show" .',
      '<http://example.org/show/218> <http://example.org/show/localName> "That Seventies Show"@en .',
      '<http://example.org/show/218> <http://example.org/show/localName> "Cette Série des Années Septante"@fr-be .',
      '<http://example.org/#spiderman> <http://example.org/text> "This is a multi-line\\nliteral with many quotes (\\"\\"\\"\\"\\")\\nand two apostrophes (\'\')." .',
      '<http://en.wikipedia.org/wiki/Helium> <http://example.org/elements/atomicNumber> "2"^^<http://www.w3.org/2001/XMLSchema#integer> .',
      '<http://en.wikipedia.org/wiki/Helium> <http://example.org/elements/specificGravity> "1.663E-4"^^<http://www.w3.org/2001/XMLSchema#double> .',
    ].join('\n') + '\n');
    const { rows, dictionary } = await load([{ path }]);
    expect(rows.properties).toEqual(['http://one.example/predicate1(http://one.example/subject1, http://one.example/object1)']);
    expect(rows.data).toHaveLength(9);
    // RDF 1.1: "x"^^xsd:string and "x" are the same literal, hence one term.
    expect(rows.data[2]).toBe(rows.data[3]);
    expect(rows.data).toContain('http://example.org/show/localName(http://example.org/show/218, "Cette Série des Années Septante"@fr-be)');
    expect(rows.data).toContain('http://example.org/text(http://example.org/#spiderman, "This is a multi-line\\nliteral with many quotes (\\"\\"\\"\\"\\")\\nand two apostrophes (\'\').")');
    expect(dictionary.has('_:f1_subject1')).toBe(true);
  });

  it('RDF 1.1 Turtle §2 example (from memory): @base, predicate and object lists, a language literal', async () => {
    const path = file('w3c.ttl', [
      '@base <http://example.org/> .',
      '@prefix rdf: <http://www.w3.org/1999/02/22-rdf-syntax-ns#> .',
      '@prefix foaf: <http://xmlns.com/foaf/0.1/> .',
      '@prefix rel: <http://www.perceive.net/schemas/relationship/> .',
      '<#green-goblin> rel:enemyOf <#spiderman> ; a foaf:Person ; foaf:name "Green Goblin" .',
      '<#spiderman> rel:enemyOf <#green-goblin> ; a foaf:Person ; foaf:name "Spiderman", "Человек-паук"@ru .',
    ].join('\n') + '\n');
    const { rows } = await load([{ path }]);
    expect(rows.classes).toEqual(['http://xmlns.com/foaf/0.1/Person(http://example.org/#green-goblin)', 'http://xmlns.com/foaf/0.1/Person(http://example.org/#spiderman)']);
    expect(rows.properties).toEqual([
      'http://www.perceive.net/schemas/relationship/enemyOf(http://example.org/#green-goblin, http://example.org/#spiderman)',
      'http://www.perceive.net/schemas/relationship/enemyOf(http://example.org/#spiderman, http://example.org/#green-goblin)',
    ]);
    expect(rows.data).toEqual([
      'http://xmlns.com/foaf/0.1/name(http://example.org/#green-goblin, "Green Goblin")',
      'http://xmlns.com/foaf/0.1/name(http://example.org/#spiderman, "Spiderman")',
      'http://xmlns.com/foaf/0.1/name(http://example.org/#spiderman, "Человек-паук"@ru)',
    ]);
  });
});
