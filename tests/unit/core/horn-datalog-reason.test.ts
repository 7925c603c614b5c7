// reason() on the Horn path: a Horn ontology is evaluated through its Datalog rewriting by default (no anonymous
// element), and gives the same facts as the chase path (path: 'chase'), which stays selectable for comparison.
// The ontology is the OWL 2 Primer's family vocabulary (hasParent inverse of hasChild, a functional hasMother;
// W3C OWL 2 Primer §§4–9, from memory), with an implied mother for every person.

import { describe, expect, it } from 'vitest';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { reason } from '../../../reasoner/index.js';
import type { FactSink } from '../../../reasoner/api.js';

const fixture = (name: string) => join(dirname(fileURLToPath(import.meta.url)), 'fixtures', name);
const EX = 'http://example.org/family#';
const TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';
const SAME = 'http://www.w3.org/2002/07/owl#sameAs';

class Collect implements FactSink {
  readonly facts = new Set<string>();
  write(s: string, p: string, o: string): void { this.facts.add(`${s} ${p} ${o}`); }
}

describe('reason() on the Horn path', () => {
  it('the Datalog path creates no anonymous element and gives the facts of the chase path', async () => {
    const viaDatalog = new Collect(), viaChase = new Collect();
    const d = await reason({ ontology: { path: fixture('horn-family.ofn') }, datasets: [] }, viaDatalog);
    const c = await reason({ ontology: { path: fixture('horn-family.ofn') }, datasets: [], path: 'chase' }, viaChase);
    expect(d.status).toBe('ok');
    expect(c.status).toBe('ok');
    if (d.status !== 'ok' || c.status !== 'ok') return;
    expect(d.timings.anonymousElements).toBe(0);
    expect(c.timings.anonymousElements).toBeGreaterThan(0);
    expect(d.rewriting.byShape.existential).toBe(0);
    expect([...viaDatalog.facts].sort()).toEqual([...viaChase.facts].sort());
    // Lois and LoisGriffin are Stewie's only mother (functional hasMother), a Woman, a Mother (Woman ⊓ Parent).
    expect(viaDatalog.facts.has(`${EX}Lois ${SAME} ${EX}LoisGriffin`)).toBe(true);
    expect(viaDatalog.facts.has(`${EX}Lois ${TYPE} ${EX}Mother`)).toBe(true);
    expect(viaDatalog.facts.has(`${EX}Lois ${EX}hasChild ${EX}Stewie`)).toBe(true);
    // Meg's mother is implied but unnamed: Meg is a Person and nothing about the mother is output.
    expect(viaDatalog.facts.has(`${EX}Meg ${TYPE} ${EX}Parent`)).toBe(false);
  });

  it('a named mother that is a Man makes both paths report inconsistency (DisjointClasses, OWL 2 Primer §5, from memory)', async () => {
    const data = join(mkdtempSync(join(tmpdir(), 'horn-')), 'lois.nt');
    writeFileSync(data, `<${EX}LoisGriffin> <${TYPE}> <${EX}Man> .\n`);
    for (const path of ['datalog', 'chase'] as const) {
      const r = await reason({ ontology: { path: fixture('horn-family.ofn') }, datasets: [{ path: data }], path }, new Collect());
      expect(r.status, path).toBe('inconsistent');
    }
  });
});
