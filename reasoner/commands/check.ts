// `reason check`: loads an ontology and prints its ALCHIQ profile report (human-readable, or --json).

import type { ProfileEntry } from '../api.js';
import { loadOntology, profile, profileDiagnostics } from '../intake.js';
import { diagnosticLine, readIntakeArgs, reportInputError } from './args.js';

const VERDICT = {
  horn: 'Horn-ALCHIQ (deterministic: no disjunction, at-most restrictions only with n ≤ 1)',
  alchiq: 'ALCHIQ (some axioms need disjunction or ≤n with n > 1)',
  outside: 'outside ALCHIQ: refused (strict mode). Fix or remove the axioms below, or use --approximate to drop them.',
} as const;

/** Exit status: 0 when the ontology is accepted, 2 on input errors or when strict mode refuses it. */
export async function run(args: string[]): Promise<number> {
  const parsed = readIntakeArgs(args, 'check');
  if (typeof parsed === 'string') { process.stderr.write(parsed + '\n'); return 2; }
  try {
    const { ontology, diagnostics } = await loadOntology({ path: parsed.ontology, format: parsed.format });
    const { kept: _kept, ...report } = profile(ontology, parsed.approximate ? 'approximate' : 'strict');
    void _kept;
    const all = [...diagnostics, ...profileDiagnostics(report)];
    if (parsed.json) {
      process.stdout.write(JSON.stringify({ status: report.verdict === 'outside' ? 'outsideProfile' : 'ok', profile: report, diagnostics: all }, null, 2) + '\n');
    } else {
      const out: string[] = [];
      out.push(`Ontology ${parsed.ontology}${ontology.iri ? ` <${ontology.iri}>` : ''} (${ontology.format}), ${report.mode} mode`);
      out.push(`Verdict: ${VERDICT[report.verdict]}`);
      const c = report.counts;
      out.push(`Axioms: ${c.horn} Horn-ALCHIQ, ${c.alchiq} ALCHIQ, ${c.outside} outside ALCHIQ; ${c.annotations} declarations and annotation axioms (kept, not reasoned with)`);
      const section = (title: string, entries: readonly ProfileEntry[]) => {
        if (!entries.length) return;
        out.push('', title);
        for (const e of entries) out.push(`  ${e.position}  ${e.text}${e.reasons.length ? `\n      ${e.reasons.join('; ')}` : ''}`);
      };
      if (parsed.all) section('Horn-ALCHIQ axioms:', report.entries.filter((e) => e.classification === 'horn'));
      section('Non-Horn (ALCHIQ) axioms:', report.entries.filter((e) => e.classification === 'alchiq'));
      section(report.mode === 'strict' ? 'Outside ALCHIQ (refused):' : 'Outside ALCHIQ (dropped):', report.entries.filter((e) => e.classification === 'outside'));
      const notes = [...diagnostics.map(diagnosticLine), ...report.warnings];
      if (notes.length) { out.push('', 'Notes:'); for (const n of notes) out.push('  ' + n); }
      process.stdout.write(out.join('\n') + '\n');
    }
    return report.verdict === 'outside' ? 2 : 0;
  } catch (e) {
    return reportInputError(e, parsed.json);
  }
}
