/*
 * A small option parser for the thetafold command line: `--name value` or `--name=value`, bare
 * `--flag`s, and positional arguments. Anything unexpected is a UsageError (exit status 2).
 */

/** Bad command-line input: the message goes to stderr and the process exits with status 2. */
export class UsageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "UsageError";
  }
}

export interface ParsedArgs {
  positional: string[];
  values: Map<string, string>;
  flags: Set<string>;
}

/**
 * Splits argv into positional arguments, valued options and flags.
 * @param argv arguments after the command name
 * @param valued option names (without "--") that take a value
 * @param flags option names that take none
 * @throws UsageError for an unknown option, a missing value, or an option given twice
 */
export function parseArgs(argv: readonly string[], valued: readonly string[], flags: readonly string[] = []): ParsedArgs {
  const out: ParsedArgs = { positional: [], values: new Map(), flags: new Set() };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (!a.startsWith("--") || a === "--") {
      out.positional.push(a);
      continue;
    }
    const eq = a.indexOf("=");
    const name = a.slice(2, eq < 0 ? undefined : eq);
    if (flags.includes(name)) {
      if (eq >= 0) throw new UsageError(`--${name} takes no value`);
      out.flags.add(name);
      continue;
    }
    if (!valued.includes(name)) throw new UsageError(`unknown option --${name}`);
    let value: string | undefined;
    if (eq >= 0) value = a.slice(eq + 1);
    else {
      value = argv[i + 1];
      i++;
    }
    if (value === undefined || value === "") throw new UsageError(`--${name} needs a value`);
    if (out.values.has(name)) throw new UsageError(`--${name} is given twice`);
    out.values.set(name, value);
  }
  return out;
}

/** A finite number option, optionally > 0. */
export function numberOption(args: ParsedArgs, name: string, opts: { positive?: boolean } = {}): number | undefined {
  const raw = args.values.get(name);
  if (raw === undefined) return undefined;
  const v = Number(raw);
  if (raw.trim() === "" || !Number.isFinite(v)) throw new UsageError(`--${name}: '${raw}' is not a number`);
  if (opts.positive && !(v > 0)) throw new UsageError(`--${name} must be greater than 0, got ${raw}`);
  return v;
}

/** A comma-separated list of finite numbers. */
export function numberListOption(args: ParsedArgs, name: string): number[] | undefined {
  const raw = args.values.get(name);
  if (raw === undefined) return undefined;
  return raw.split(",").map((part) => {
    const v = Number(part);
    if (part.trim() === "" || !Number.isFinite(v)) throw new UsageError(`--${name}: '${part}' is not a number`);
    return v;
  });
}

/** Where a command writes: JSON to stdout, messages to stderr. */
export interface CommandIo {
  stdout: (text: string) => void;
  stderr: (text: string) => void;
}

export const processIo: CommandIo = {
  stdout: (t) => process.stdout.write(t),
  stderr: (t) => process.stderr.write(t),
};
