// Writes a synthetic movement log for the Tidewater demo ontology (server/seed/data/tidewater): N vessels docking at
// berths and carrying lots, as N-Triples (RDF 1.1 N-Triples §2). Invented data, only for load and benchmark runs.
import fs from 'node:fs';

const T = 'https://demo.thence.test/tidewater#';
const RDF_TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';
const KINDS = ['ContainerShip', 'Tanker', 'Tug'];

/** Writes the file and returns the number of triples written. */
export async function writeHarbourDataset(path: string, vessels: number): Promise<number> {
  const out = fs.createWriteStream(path);
  let triples = 0;
  let chunk = '';
  const berths = Math.max(10, Math.floor(vessels / 20));
  for (let i = 0; i < vessels; i++) {
    const v = `<${T}vessel-${i}>`;
    chunk += `${v} <${RDF_TYPE}> <${T}${KINDS[i % 3]}> .\n`;
    chunk += `${v} <${T}dockedAt> <${T}berth-${i % berths}> .\n`;
    chunk += `${v} <${T}carries> <${T}lot-${i}> .\n`;
    triples += 3;
    if (i % 7 === 0) {
      chunk += `<${T}lot-${i}> <${RDF_TYPE}> <${T}HazardousCargo> .\n`;
      triples++;
    }
    if (chunk.length > 1 << 20) {
      if (!out.write(chunk)) await new Promise<void>((resolve) => out.once('drain', () => resolve()));
      chunk = '';
    }
  }
  out.write(chunk);
  await new Promise<void>((resolve, reject) => out.end((error?: Error | null) => (error ? reject(error) : resolve())));
  return triples;
}
