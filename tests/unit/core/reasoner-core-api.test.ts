// reason() and the entail/rewrite commands on real files through the intake: streaming to a sink, progress by stage,
// cancellation, inconsistency with an explanation, input errors with positions, exit statuses.

import { describe, expect, it } from 'vitest';
import { execFile } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';
import { reason } from '../../../reasoner/index.js';
import type { FactSink, Progress } from '../../../reasoner/api.js';

const here = dirname(fileURLToPath(import.meta.url));
const fixture = (name: string) => join(here, 'fixtures', name);
const root = join(here, '..', '..', '..');
const EX = 'http://example.org/oedipus#';
const TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';
const SAME = 'http://www.w3.org/2002/07/owl#sameAs';

class Collect implements FactSink {
  readonly facts: { s: string; p: string; o: string; asserted: boolean }[] = [];
  async write(s: string, p: string, o: string, asserted: boolean): Promise<void> { this.facts.push({ s, p, o, asserted }); }
  has(s: string, p: string, o: string): boolean { return this.facts.some((f) => f.s === s && f.p === p && f.o === o); }
}

function cli(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    execFile('npx', ['tsx', 'reasoner/cli.ts', ...args], { cwd: root }, (error, stdout, stderr) => {
      resolve({ code: error ? (typeof error.code === 'number' ? error.code : 1) : 0, stdout, stderr });
    });
  });
}

describe('reason()', () => {
  // The DL Handbook's Oedipus example (ch. 2, from memory), with the ABox split between the ontology and an N-Triples file.
  it('streams Ent(O, D) to the sink with the asserted flag, progress by stage, and no internal names', async () => {
    const sink = new Collect(), stages: Progress[] = [];
    const result = await reason({ ontology: { path: fixture('oedipus.ofn') }, datasets: [{ path: fixture('oedipus.nt') }], onProgress: (p) => stages.push(p) }, sink);
    expect(result.status).toBe('ok');
    expect(sink.has(`${EX}IOKASTE`, TYPE, `${EX}Q`)).toBe(true);
    expect(sink.facts.find((f) => f.o === `${EX}Q`)?.asserted).toBe(false);
    expect(sink.facts.find((f) => f.s === `${EX}OEDIPUS` && f.o === `${EX}Patricide`)?.asserted).toBe(true);
    expect(sink.has(`${EX}POLYNEIKES`, TYPE, `${EX}Patricide`)).toBe(false);
    expect(sink.facts.every((f) => !f.o.includes('\u0001') && !f.o.endsWith('#Thing') && !f.s.startsWith('_:'))).toBe(true);
    expect(sink.facts).toHaveLength(6);
    expect(new Set(stages.map((s) => s.stage))).toEqual(new Set(['parse', 'profile', 'normalise', 'rewrite', 'materialise']));
    if (result.status === 'ok') {
      expect(result.counts.entailedFacts).toBe(6);
      expect(result.counts.assertedFacts).toBe(5);
      expect(result.counts.perPredicate[`${EX}hasChild`]).toEqual({ asserted: 4, entailed: 4 });
      expect(result.program).toContain('→');
    }
  });

  // OWL 2 Primer §9.2 (functional properties, from memory): the two wives are the same individual.
  it('outputs owl:sameAs both ways for named individuals entailed equal', async () => {
    const sink = new Collect();
    const result = await reason({ ontology: { path: fixture('functional.ofn') }, datasets: [] }, sink);
    expect(result.status).toBe('ok');
    expect(sink.has('http://example.org/primer#Mary', SAME, 'http://example.org/primer#Marie')).toBe(true);
    expect(sink.has('http://example.org/primer#Marie', SAME, 'http://example.org/primer#Mary')).toBe(true);
  });

  it('reports inconsistency with the clashing facts and the axiom with its position, and writes nothing', async () => {
    const sink = new Collect();
    const result = await reason({ ontology: { path: fixture('disjoint.ofn') }, datasets: [] }, sink);
    expect(result.status).toBe('inconsistent');
    expect(sink.facts).toHaveLength(0);
    if (result.status === 'inconsistent') {
      expect(result.explanation.facts.join('\n')).toMatch(/Mary.*Woman[\s\S]*Mary.*Man|Mary.*Man[\s\S]*Mary.*Woman/);
      expect(result.explanation.axioms[0]?.position).toMatch(/disjoint\.ofn:3:1/);
    }
  });

  it('returns cancelled when the signal has fired', async () => {
    const controller = new AbortController();
    controller.abort();
    const result = await reason({ ontology: { path: fixture('oedipus.ofn') }, datasets: [{ path: fixture('oedipus.nt') }], signal: controller.signal }, new Collect());
    expect(result.status).toBe('cancelled');
  });

  // A disjunctive ontology is always chased with anonymous elements (a Horn one may need none).
  it('returns resourceLimit with a message when the element guard is reached', async () => {
    const result = await reason({ ontology: { path: fixture('cases-guard.ofn') }, datasets: [], limits: { maxElements: 2 } }, new Collect());
    expect(result.status).toBe('resourceLimit');
    if (result.status === 'resourceLimit') expect(result.message).toMatch(/element limit/);
  });

  it('returns inputError with file:line:column', async () => {
    const result = await reason({ ontology: { path: fixture('broken.ofn') }, datasets: [] }, new Collect());
    expect(result.status).toBe('inputError');
    if (result.status === 'inputError') expect(result.diagnostics[0]?.position).toMatch(/broken\.ofn:4:1/);
  });
});

describe('command line', () => {
  it('entail prints N-Triples only on stdout and exits 0', async () => {
    const r = await cli(['entail', '--ontology', fixture('oedipus.ofn'), '--data', fixture('oedipus.nt'), '--stats']);
    expect(r.code).toBe(0);
    const lines = r.stdout.trim().split('\n');
    expect(lines).toHaveLength(6);
    for (const l of lines) expect(l).toMatch(/^<[^>]+> <[^>]+> <[^>]+> \.$/);
    expect(r.stdout).toContain(`<${EX}IOKASTE> <${TYPE}> <${EX}Q> .`);
    expect(r.stderr).toMatch(/materialise/);
  }, 30_000);

  it('entail exits 3 on inconsistency and 2 on an input error, naming what and where on stderr', async () => {
    const inconsistent = await cli(['entail', '--ontology', fixture('disjoint.ofn')]);
    expect(inconsistent.code).toBe(3);
    expect(inconsistent.stdout).toBe('');
    expect(inconsistent.stderr).toMatch(/disjoint\.ofn:3:1/);
    const broken = await cli(['entail', '--ontology', fixture('broken.ofn')]);
    expect(broken.code).toBe(2);
    expect(broken.stderr).toMatch(/broken\.ofn:4:1/);
  }, 30_000);

  it('rewrite prints rules in logical notation and statistics', async () => {
    const r = await cli(['rewrite', '--ontology', fixture('functional.ofn'), '--path', 'chase']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/→ ∃y\. \(livesWith\(x, y\) ∧ Person\(y\)\)/);
    expect(r.stdout).toMatch(/→ y1 ≈ y2/);
    expect(r.stdout).toMatch(/rules from \d+ normal-form axioms/);
  }, 30_000);

  it('rewrite prints the Datalog program of a Horn ontology by default: no ∃, with its statistics', async () => {
    const r = await cli(['rewrite', '--ontology', fixture('functional.ofn')]);
    expect(r.code).toBe(0);
    expect(r.stdout).not.toMatch(/∃/);
    expect(r.stdout).toMatch(/→ y1 ≈ y2/);
    expect(r.stdout).toMatch(/existential: 0/);
    expect(r.stdout).toMatch(/Horn path: Datalog over named individuals/);
  }, 30_000);
});
