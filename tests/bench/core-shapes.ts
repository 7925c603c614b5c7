// Part 5 of the reasoner benchmarks: shapes that once stalled the disjunctive search, run through reason() on files
// (figures, not assertions). Invented data of our own: trail networks of the demo vocabulary where hundreds of trails
// end at each hut, and random TBoxes rich in ∃, ∀, ⊔, ≥2, ≤2, inverses and domains over a few individuals.

import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { reason, type FactSink } from '../../reasoner/index.js';
import { random } from './core-generators.js';

const GLACIER = path.resolve('server/seed/data/glacier/glacier.ofn');
const G = 'https://demo.thence.test/glacier#';
const R = 'http://example.org/rich#';
const TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';

/** N-Triples of `trails` trails ending at `trails / perHut` huts, some crossing avalanche zones: one component. */
export function hubTrailNetwork(trails: number, perHut: number, seed = 5): string {
  const next = random(seed), pick = (n: number) => Math.floor(next() * n);
  const huts = Math.max(1, Math.floor(trails / perHut)), zones = Math.max(1, Math.floor(trails / 100));
  const t = (s: string, p: string, o: string) => `<${G}${s}> <${p}> <${o}> .`;
  const lines: string[] = [];
  for (let h = 0; h < huts; h++) lines.push(t(`hut${h}`, TYPE, `${G}Hut`));
  for (let z = 0; z < zones; z++) lines.push(t(`zone${z}`, TYPE, `${G}AvalancheZone`));
  for (let i = 0; i < trails; i++) {
    const k = next();
    lines.push(t(`trail${i}`, TYPE, `${G}${k < 0.6 ? 'Trail' : k < 0.8 ? 'WinterTrail' : 'SummerTrail'}`));
    lines.push(t(`trail${i}`, `${G}endsAt`, `${G}hut${pick(huts)}`));
    if (next() < 0.3) lines.push(t(`trail${i}`, `${G}crosses`, `${G}zone${pick(zones)}`));
  }
  return lines.join('\n') + '\n';
}

/**
 * A random TBox (a class tree, property inclusions, inverses, functional properties, ∃, ∀, ⊔, ≥2, ≤2, inverse ∃,
 * domains). `atMost` false: no functional property and ∃ instead of ≤2 (the same random draws otherwise).
 */
export function richTbox(classes: number, properties: number, individuals: number, seed: number, atMost = true): { ofn: string; nt: string } {
  const next = random(seed), pick = (n: number) => Math.floor(next() * n);
  const C = (i: number) => `:C${i}`, P = (i: number) => `:p${i}`;
  const ax: string[] = [];
  for (let i = 1; i < classes; i++) ax.push(`SubClassOf(${C(i)} ${C(pick(i))})`);
  for (let i = 1; i < properties; i++) if (next() < 0.3) ax.push(`SubObjectPropertyOf(${P(i)} ${P(pick(i))})`);
  for (let i = 0; i < properties; i++) if (next() < 0.2) ax.push(`InverseObjectProperties(${P(i)} :inverse${i})`);
  const functional = new Set<number>();
  for (let i = 0; i < properties; i++) if (next() < 0.15 && atMost) { functional.add(i); ax.push(`FunctionalObjectProperty(${P(i)})`); }
  const free = [...Array(properties).keys()].filter((i) => !functional.has(i));
  for (let k = 0; k < classes; k++) {
    const a = C(pick(classes)), b = C(pick(classes)), c = C(pick(classes)), r = P(pick(properties)), t = next();
    if (t < 0.2) ax.push(`SubClassOf(${a} ObjectSomeValuesFrom(${r} ${b}))`);
    else if (t < 0.35) ax.push(`SubClassOf(ObjectSomeValuesFrom(${r} ${b}) ${a})`);
    else if (t < 0.5) ax.push(`SubClassOf(${a} ObjectAllValuesFrom(${r} ${b}))`);
    else if (t < 0.65) ax.push(`SubClassOf(${a} ObjectUnionOf(${b} ${c}))`);
    else if (t < 0.75) ax.push(`SubClassOf(ObjectIntersectionOf(${a} ${b}) ${c})`);
    else if (t < 0.8) ax.push(atMost ? `SubClassOf(${a} ObjectMaxCardinality(2 ${r} ${b}))` : `SubClassOf(${a} ObjectSomeValuesFrom(${r} ${b}))`);
    else if (t < 0.85) ax.push(`SubClassOf(${a} ObjectMinCardinality(2 ${P(free[pick(free.length)] ?? 0)} ${b}))`);
    else if (t < 0.9) ax.push(`SubClassOf(${a} ObjectSomeValuesFrom(ObjectInverseOf(${r}) ${b}))`);
    else ax.push(`ObjectPropertyDomain(${r} ${a})`);
  }
  const ofn = `Prefix(:=<${R}>)\nOntology(<http://example.org/rich>\n${ax.join('\n')}\n)\n`;
  const lines: string[] = [];
  for (let i = 0; i < individuals; i++) {
    lines.push(`<${R}i${i}> <${TYPE}> <${R}C${pick(classes)}> .`);
    if (next() < 0.7) lines.push(`<${R}i${i}> <${R}p${pick(properties)}> <${R}i${pick(individuals)}> .`);
  }
  return { ofn, nt: lines.join('\n') + '\n' };
}

/** Facts are counted by reason() itself (`counts`); the sink keeps none. */
const SINK: FactSink = { write: () => undefined };

async function timed(ontology: string, data: string, label: string): Promise<void> {
  const t0 = performance.now();
  const result = await reason({ ontology: { path: ontology }, datasets: [{ path: data }], threads: 1, limits: { timeoutMs: 60_000 } }, SINK);
  const ms = performance.now() - t0;
  const t = result.status === 'ok' ? result.timings : undefined;
  const detail = result.status === 'ok' ? `${result.counts.entailedFacts} facts, ${t?.branches} branches, ${t?.anonymousElements} anonymous elements`
    : result.status === 'resourceLimit' ? result.message : result.status;
  console.log(`${label}: ${ms.toFixed(0)} ms — ${detail}`);
}

/** (5) Hub-shaped trail networks and rich random TBoxes. */
export async function searchShapes(): Promise<void> {
  console.log('== (5) shapes that stressed the search: trails on shared huts; rich random TBoxes');
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'thence-shapes-'));
  try {
    for (const [trails, perHut] of [[2_000, 400], [10_000, 400], [20_000, 400]] as const) {
      const file = path.join(dir, `net-${trails}.nt`);
      fs.writeFileSync(file, hubTrailNetwork(trails, perHut));
      await timed(GLACIER, file, `trail network, ${trails} trails, ${perHut} per hut (one component)`);
    }
    for (const [classes, seed, atMost] of [[40, 5, true], [40, 6, true], [80, 2, true], [40, 4, false], [40, 5, false]] as const) {
      const { ofn, nt } = richTbox(classes, 6, 5, seed, atMost);
      const name = `rich-${classes}-${seed}${atMost ? '' : '-no-max'}`;
      const o = path.join(dir, `${name}.ofn`), d = path.join(dir, `${name}.nt`);
      fs.writeFileSync(o, ofn); fs.writeFileSync(d, nt);
      await timed(o, d, `rich random TBox${atMost ? '' : ' without ≤n'}, ${classes} classes (${ofn.split('\n').length - 3} axioms), 5 individuals, seed ${seed}`);
    }
  } finally { fs.rmSync(dir, { recursive: true, force: true }); }
}
