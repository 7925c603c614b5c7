// The intake facade end to end: load → profile → normalise → ontology assertions into the ABox.

import { describe, expect, it } from 'vitest';
import { addAssertionsToAbox, loadOntology, normalise, profile } from '../../../reasoner/intake.js';
import { TermDictionary } from '../../../reasoner/model/dictionary.js';
import { Abox } from '../../../reasoner/model/abox.js';
import { isFreshName } from '../../../reasoner/model/normal.js';

const fixture = (name: string) => new URL(`../../fixtures/ontologies/${name}`, import.meta.url).pathname;
const F = 'http://example.com/owl/families/';

describe('intake facade on the Primer family fixture (from memory of the W3C OWL 2 Primer)', () => {
  it('turns the ontology assertions into ABox rows, complex ones through fresh classes', async () => {
    const { ontology } = await loadOntology({ path: fixture('family-core.ofn') });
    const report = profile(ontology);
    expect(report.verdict).toBe('alchiq');
    const normal = normalise(ontology, report.kept);
    const dictionary = new TermDictionary(), abox = new Abox();
    addAssertionsToAbox(normal, dictionary, abox);
    const t = (id: number) => dictionary.term(id);
    const classes: [string, string][] = [];
    abox.forEachClass((c, i) => classes.push([t(c), t(i)]));
    expect(classes).toContainEqual([F + 'Woman', F + 'Mary']);
    // ClassAssertion(ObjectComplementOf(:Parent) :Jack): a fresh X with X(Jack) and X ⊓ Parent ⊑ ⊥.
    const jack = classes.find(([c, i]) => i === F + 'Jack' && isFreshName(c))!;
    expect(normal.axioms).toContainEqual(expect.objectContaining({ kind: 'subsumption', body: expect.arrayContaining([jack[0], F + 'Parent']), head: [] }));
    const properties: string[] = [];
    abox.forEachProperty((p, s, o) => properties.push(`${t(p)} ${t(s)} ${t(o)}`));
    expect(properties).toEqual([`${F}hasWife ${F}John ${F}Mary`]);
    const same: string[] = [], different: string[] = [], data: string[] = [];
    abox.forEachSame((a, b) => same.push(`${t(a)} ${t(b)}`));
    abox.forEachDifferent((a, b) => different.push(`${t(a)} ${t(b)}`));
    abox.forEachData((s, p, l) => data.push(`${t(s)} ${t(p)} ${t(l)}`));
    expect(same).toEqual([`${F}John ${F}Jack`]);
    expect(different).toHaveLength(3);   // DifferentIndividuals of three: pairwise
    expect(data).toEqual([`${F}John ${F}hasAge "51"^^<http://www.w3.org/2001/XMLSchema#integer>`]);
    expect(normal.classes).not.toContainEqual(expect.stringMatching(/^\u0001/));
  });

  it('gives the same normal form whether or not the profile check ran first', async () => {
    const { ontology } = await loadOntology({ path: fixture('family-core.ofn') });
    const kept = ontology.axioms.filter((a) => a.kind !== 'Declaration' && a.kind !== 'AnnotationAssertion');
    const direct = normalise(ontology, kept);
    const viaProfile = normalise(ontology, profile(ontology).kept);
    expect(viaProfile.axioms.length).toBe(direct.axioms.length);
    expect(viaProfile.assertions.length).toBe(direct.assertions.length);
  });
});
