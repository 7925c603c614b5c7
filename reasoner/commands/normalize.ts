// `reason normalize`: prints the normal form of an ontology in logical notation, one axiom per line with its source position.

import { loadOntology, normalise, profile, profileDiagnostics } from '../intake.js';
import { LogicPrinter } from '../syntax/logic-printer.js';
import { diagnosticLine, readIntakeArgs, reportInputError } from './args.js';

/** Exit status: 0 on success, 2 on input errors or when strict mode refuses axioms outside ALCHIQ. */
export async function run(args: string[]): Promise<number> {
  const parsed = readIntakeArgs(args, 'normalize');
  if (typeof parsed === 'string') { process.stderr.write(parsed + '\n'); return 2; }
  try {
    const { ontology, diagnostics } = await loadOntology({ path: parsed.ontology, format: parsed.format });
    const report = profile(ontology, parsed.approximate ? 'approximate' : 'strict');
    for (const d of diagnostics) process.stderr.write(diagnosticLine(d) + '\n');
    if (report.verdict === 'outside') {
      for (const d of profileDiagnostics(report)) if (d.severity === 'error') process.stderr.write(diagnosticLine(d) + '\n');
      process.stderr.write('refused: axioms outside ALCHIQ (strict mode); use --approximate to drop them\n');
      return 2;
    }
    const normal = normalise(ontology, report.kept);
    if (parsed.json) {
      process.stdout.write(JSON.stringify({ status: 'ok', normal, warnings: report.warnings }, null, 2) + '\n');
      return 0;
    }
    const printer = new LogicPrinter(ontology.prefixes);
    const lines = normal.axioms.map((a) => [printer.normalAxiom(a), a.source.position] as const);
    const facts = normal.assertions.map((a) => [printer.normalAssertion(a), a.source.position] as const);
    const width = Math.min(72, Math.max(0, ...[...lines, ...facts].map(([t]) => [...t].length)));
    const row = ([text, at]: readonly [string, string]) => `${text}${' '.repeat(Math.max(1, width - [...text].length + 2))}# ${at}`;
    const out = [`# normal form of ${parsed.ontology}: ${normal.axioms.length} axioms, ${normal.assertions.length} assertions ($X… are internal names, not vocabulary)`];
    out.push(...lines.map(row));
    if (facts.length) out.push('# assertions', ...facts.map(row));
    for (const w of report.warnings) out.push(`# note: ${w}`);
    process.stdout.write(out.join('\n') + '\n');
    return 0;
  } catch (e) {
    return reportInputError(e, parsed.json);
  }
}
