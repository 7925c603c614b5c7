// Shared option reading for the intake commands (check, normalize): --ontology FILE, --format, --approximate, --json.

import type { Diagnostic, OntologyFormat } from '../api.js';
import { InputError } from '../intake.js';

export interface IntakeArgs {
  readonly ontology: string;
  readonly format?: OntologyFormat;
  readonly approximate: boolean;
  readonly json: boolean;
  /** check: list every axiom with its classification, not only the non-Horn and outside ones. */
  readonly all: boolean;
}

const FORMATS = new Set(['ofn', 'turtle', 'ntriples', 'rdfxml']);

/** Reads the arguments or returns a usage message. */
export function readIntakeArgs(args: readonly string[], command: string): IntakeArgs | string {
  let ontology: string | undefined, format: string | undefined, approximate = false, json = false, all = false;
  for (let i = 0; i < args.length; i++) {
    const a = args[i]!;
    if (a === '--ontology') ontology = args[++i];
    else if (a.startsWith('--ontology=')) ontology = a.slice(11);
    else if (a === '--format') format = args[++i];
    else if (a === '--approximate') approximate = true;
    else if (a === '--strict') approximate = false;
    else if (a === '--json') json = true;
    else if (a === '--all') all = true;
    else return `unknown option "${a}"\nusage: npm run reason -- ${command} --ontology FILE [--format ofn|turtle|ntriples|rdfxml] [--approximate] [--json]`;
  }
  if (!ontology) return `missing --ontology FILE\nusage: npm run reason -- ${command} --ontology FILE [--format ofn|turtle|ntriples|rdfxml] [--approximate] [--json]`;
  if (format && !FORMATS.has(format)) return `unknown format "${format}": expected ofn, turtle, ntriples or rdfxml`;
  return { ontology, format: format as OntologyFormat | undefined, approximate, json, all };
}

/** One diagnostic as a line: `position: severity: message` (and the axiom text when there is one). */
export function diagnosticLine(d: Diagnostic): string {
  return `${d.position ? d.position + ': ' : ''}${d.severity}: ${d.message}${d.axiom ? `\n    ${d.axiom}` : ''}`;
}

/** Writes an input error's diagnostics to stderr and returns exit status 2; rethrows anything else. */
export function reportInputError(error: unknown, json: boolean): number {
  if (!(error instanceof InputError)) throw error;
  if (json) process.stdout.write(JSON.stringify({ status: 'inputError', diagnostics: error.diagnostics }, null, 2) + '\n');
  for (const d of error.diagnostics) process.stderr.write(diagnosticLine(d) + '\n');
  return 2;
}
