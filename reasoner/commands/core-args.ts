// Argument reading for the core's commands (rewrite, entail): `--name value` options (repeatable) and `--flag` switches.

/** Parsed options: values per option name (repeatable), and switches seen. */
export interface ParsedArgs {
  readonly values: ReadonlyMap<string, readonly string[]>;
  readonly flags: ReadonlySet<string>;
}

/** Reads args; `valued` lists options that take a value. Throws an Error naming the offending argument. */
export function parseArgs(args: readonly string[], valued: readonly string[], switches: readonly string[]): ParsedArgs {
  const values = new Map<string, string[]>(), flags = new Set<string>();
  for (let i = 0; i < args.length; i++) {
    const a = args[i]!;
    const name = a.replace(/^--/, '');
    if (valued.includes(name)) {
      const v = args[++i];
      if (v === undefined || v.startsWith('--')) throw new Error(`option ${a} needs a value`);
      values.set(name, [...(values.get(name) ?? []), v]);
    } else if (switches.includes(name)) flags.add(name);
    else throw new Error(`unknown argument "${a}"`);
  }
  return { values, flags };
}
