/*
 * The thetafold command line: dispatches to one command, each loaded only when asked for (start-up
 * stays short: `fit` never loads the server, zod or the database).
 * Exit status: 0 done; 2 bad input (usage, unreadable file, IngestError with line and column, values the
 * fitter refuses); 1 unexpected failure.
 */
import { processIo, UsageError, type CommandIo } from "./args";

export const USAGE = `Usage: thetafold COMMAND ...

  fit FILE ...            fit a heat-capacity model to a calorimeter export (JSON on stdout)
  rank FILE ...           fit candidate models and order them by BIC
  tabulate debye|einstein --x X1,X2,...   C/(3nR) of the Debye or Einstein function
  thermo FILE ... --at T1,T2,...          S(T) and H(T) - H(0) from the data
  verify-bundle FILE.zip  check a dataset bundle (BagIt, RFC 8493)

thetafold COMMAND --help shows each command's options. Results are research data, not certified
property data for engineering design.
`;

type Command = (argv: readonly string[], io: CommandIo) => Promise<number>;

const COMMANDS: Record<string, () => Promise<Command>> = {
  fit: async () => (await import("./fit-command")).fitCommand,
  rank: async () => (await import("./fit-command")).rankCommand,
  tabulate: async () => (await import("./tabulate-command")).tabulateCommand,
  thermo: async () => (await import("./thermo-command")).thermoCommand,
  "verify-bundle": async () => (await import("./verify-bundle")).verifyBundleCommand,
};

/**
 * Runs one command.
 * @param argv process arguments after the script name
 * @param io output sinks (tests capture them)
 * @returns the exit status
 */
export async function main(argv: readonly string[], io: CommandIo = processIo): Promise<number> {
  const [name, ...rest] = argv;
  if (name === undefined || name === "--help" || name === "-h" || name === "help") {
    (name === undefined ? io.stderr : io.stdout)(USAGE);
    return name === undefined ? 2 : 0;
  }
  const load = COMMANDS[name];
  if (load === undefined) {
    io.stderr(`thetafold: unknown command '${name}'\n\n${USAGE}`);
    return 2;
  }
  try {
    return await (await load())(rest, io);
  } catch (e) {
    if (e instanceof UsageError) {
      io.stderr(`thetafold ${name}: ${e.message}\n(thetafold ${name} --help lists the options)\n`);
      return 2;
    }
    if (e instanceof Error && e.name === "IngestError") {
      io.stderr(`thetafold ${name}: ${e.message}\n`);
      return 2;
    }
    // The fitter and the physics refuse values they cannot use (too few points in the window, a
    // parameter fixed outside its bounds, …) with a RangeError that says what is wrong.
    if (e instanceof RangeError) {
      io.stderr(`thetafold ${name}: ${e.message}\n`);
      return 2;
    }
    io.stderr(`thetafold ${name}: unexpected failure: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}\n`);
    return 1;
  }
}
