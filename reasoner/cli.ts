// Command line for the reasoner: a thin dispatcher over the library; each command lives in reasoner/commands/.

const commands: Record<string, () => Promise<{ run(args: string[]): Promise<number> }>> = {
  check: () => import('./commands/check.js'),
  normalize: () => import('./commands/normalize.js'),
  rewrite: () => import('./commands/rewrite.js'),
  entail: () => import('./commands/entail.js'),
};

const usage = `usage: npm run reason -- <command> [options]
commands:
  check     --ontology FILE [--json] [--approximate]   profile report (Horn-ALCHIQ / ALCHIQ / outside)
  normalize --ontology FILE [--approximate]            normal form in logical notation, with source positions
  rewrite   --ontology FILE [--asp FILE] [--path P]    rule program and statistics
  entail    --ontology FILE [--data FILE ...] [--stats] entailed facts as N-Triples on stdout
            [--mapping FILE] [--threads N] [--path P] [--approximate]
options:
  --approximate  drop axioms outside ALCHIQ (listed on stderr) instead of refusing the ontology
  --path P       datalog (Horn default), chase, or rewriting (the published rewriting, a slower reference)
  --mapping FILE column mapping for .csv datasets; --threads N worker threads for independent components
exit status: 0 success, 2 input error, 3 inconsistent knowledge base`;

async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  if (!name || name === '--help' || name === '-h') {
    process.stderr.write(usage + '\n');
    return name ? 0 : 2;
  }
  const load = commands[name];
  if (!load) {
    process.stderr.write(`unknown command "${name}"\n${usage}\n`);
    return 2;
  }
  if (rest.includes('--help') || rest.includes('-h')) {
    process.stderr.write(usage + '\n');
    return 0;
  }
  const command = await load();
  return command.run(rest);
}

main(process.argv.slice(2)).then(
  (code) => { process.exitCode = code; },
  (error: unknown) => {
    process.stderr.write(`internal error: ${error instanceof Error ? error.message : String(error)}\n`);
    process.exitCode = 1;
  },
);
