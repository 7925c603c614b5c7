// Command line: `reason check` and `reason normalize` — output, JSON, exit statuses 0 and 2 with file:line:column.

import { describe, expect, it, afterEach, vi } from 'vitest';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { run as check } from '../../../reasoner/commands/check.js';
import { run as normalize } from '../../../reasoner/commands/normalize.js';

const fixture = (name: string) => new URL(`../../fixtures/ontologies/${name}`, import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'thence-cli-'));

/** Runs a command capturing stdout and stderr. */
async function capture(command: (args: string[]) => Promise<number>, args: string[]) {
  let out = '', err = '';
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((chunk) => { out += String(chunk); return true; });
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((chunk) => { err += String(chunk); return true; });
  try {
    const code = await command(args);
    return { code, out, err };
  } finally {
    o.mockRestore(); e.mockRestore();
  }
}
afterEach(() => vi.restoreAllMocks());

describe('reason check', () => {
  it('prints the verdict and counts, exit 0, for an in-profile ontology', async () => {
    const r = await capture(check, ['--ontology', fixture('family-core.ofn')]);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Verdict: ALCHIQ/);
    expect(r.out).toMatch(/family-core\.ofn:3\d:3  SubClassOf\(:Person ObjectUnionOf\(:Man :Woman\)\)\n\s+disjunction/);
    expect(r.out).toMatch(/data-property assertion kept as facts without datatype reasoning/);
  });
  it('refuses in strict mode with exit 2, listing each offending axiom and its position', async () => {
    const r = await capture(check, ['--ontology', fixture('structural-spec-examples.ofn')]);
    expect(r.code).toBe(2);
    expect(r.out).toMatch(/Outside ALCHIQ \(refused\):\n\s+\S+structural-spec-examples\.ofn:17:1  SubObjectPropertyOf\(ObjectPropertyChain/);
  });
  it('accepts with --approximate and reports the dropped axioms (--json)', async () => {
    const r = await capture(check, ['--ontology', fixture('structural-spec-examples.ofn'), '--approximate', '--json']);
    expect(r.code).toBe(0);
    const report = JSON.parse(r.out);
    expect(report.status).toBe('ok');
    expect(report.profile.dropped.length).toBe(report.profile.counts.outside);
    expect(report.profile.kept).toBeUndefined();
  });
  it('exits 2 naming file:line:column on a syntax error', async () => {
    const path = join(dir, 'bad.ofn');
    writeFileSync(path, 'Prefix(:=<http://e/>)\nOntology(\n  SubClassOf(:A :B :C)\n)\n');
    const r = await capture(check, ['--ontology', path]);
    expect(r.code).toBe(2);
    expect(r.err).toBe(`${path}:3:20: error: expected ")" closing SubClassOf, found ":C"\n`);
  });
  it('exits 2 on a missing file and on bad options', async () => {
    expect((await capture(check, ['--ontology', join(dir, 'nope.ofn')])).err).toMatch(/nope\.ofn: error: cannot read the file: ENOENT/);
    expect((await capture(check, ['--bogus'])).code).toBe(2);
    expect((await capture(check, [])).err).toMatch(/missing --ontology FILE/);
  });
});

describe('reason normalize', () => {
  it('prints normal-form axioms in logical notation with their source positions', async () => {
    const r = await capture(normalize, ['--ontology', fixture('family-core.ttl')]);
    expect(r.code).toBe(0);
    const lines = r.out.split('\n');
    expect(lines).toContainEqual(expect.stringMatching(/^:Person ⊑ ∀:hasChild⁻\.:Parent\s+# \S+family-core\.ttl:33: <http:\/\/example\.com\/owl\/families\/Parent> .*/));
    expect(lines).toContainEqual(expect.stringMatching(/^:hasSpouse ⊑ :hasSpouse⁻\s+# /));
    expect(lines).toContainEqual(expect.stringMatching(/^\$Top ⊑ ≤1 :hasHusband\.⊤\s+# /));
    expect(lines).toContainEqual(expect.stringMatching(/^:Woman\(:Mary\)\s+# /));
    // Every axiom line carries a position.
    for (const l of lines.filter((x) => x && !x.startsWith('#'))) expect(l).toMatch(/ # \S/);
  });
  it('refuses in strict mode when axioms are outside ALCHIQ', async () => {
    const r = await capture(normalize, ['--ontology', fixture('structural-spec-examples.ofn')]);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/structural-spec-examples\.ofn:29:1: error: outside ALCHIQ: transitivity/);
  });
});

describe('reason --help', () => {
  it('prints the usage with every command and option after a command name too, exit 0', async () => {
    const { spawnSync } = await import('node:child_process');
    for (const args of [['--help'], ['entail', '--help'], ['rewrite', '-h']]) {
      const r = spawnSync(process.execPath, ['--import', 'tsx', 'reasoner/cli.ts', ...args], { encoding: 'utf8' });
      expect(r.status, args.join(' ')).toBe(0);
      expect(r.stdout).toBe(''); // the usage goes to stderr: stdout carries only facts and programs
      for (const word of ['check', 'normalize', 'rewrite', 'entail', '--data', '--stats', '--path', '--threads', '--mapping', '--approximate']) expect(r.stderr).toContain(word);
    }
  }, 30_000);
});
