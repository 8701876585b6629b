/*
 * `thetafold tabulate debye|einstein --x X1,X2,... [--dimension d]`: C/(3nR) of the Debye function
 * D_d(x) or the Einstein function E(x) at x = θ/T, as JSON [{"x", "value"}].
 */
import { numberListOption, numberOption, parseArgs, UsageError, type CommandIo } from "./args";

export const TABULATE_USAGE = `Usage: thetafold tabulate debye|einstein --x X1,X2,... [--dimension 1|2|3]

Prints [{"x", "value"}] with value = C/(3nR) at x = theta/T: the Debye function D_d(x)
(dimension d = 3 unless given) or the Einstein function E(x) = x^2 e^x/(e^x - 1)^2.
Exit status: 0 done, 2 bad input.
`;

/**
 * @param argv arguments after "tabulate"
 * @param io output sinks
 * @returns exit status 0 (bad input throws UsageError)
 */
export async function tabulateCommand(argv: readonly string[], io: CommandIo): Promise<number> {
  const args = parseArgs(argv, ["x", "dimension"], ["help"]);
  if (args.flags.has("help")) {
    io.stdout(TABULATE_USAGE);
    return 0;
  }
  const [which, ...rest] = args.positional;
  if (rest.length > 0) throw new UsageError(`unexpected argument '${rest[0]}'`);
  if (which !== "debye" && which !== "einstein") throw new UsageError("say which function: thetafold tabulate debye|einstein --x ...");
  const xs = numberListOption(args, "x");
  if (xs === undefined) throw new UsageError("give --x X1,X2,... (x = theta/T)");
  const negative = xs.find((x) => x < 0);
  if (negative !== undefined) throw new UsageError(`--x: x = theta/T must be ≥ 0, got ${negative}`);
  const dimension = numberOption(args, "dimension") ?? 3;
  if (dimension !== 1 && dimension !== 2 && dimension !== 3) throw new UsageError(`--dimension must be 1, 2 or 3, got ${dimension}`);
  let f: (x: number) => number;
  if (which === "debye") {
    const { debyeFunction } = await import("@shared/physics/debye");
    f = (x) => debyeFunction(x, dimension);
  } else {
    if (args.values.has("dimension")) throw new UsageError("--dimension applies to debye only");
    const { einsteinFunction } = await import("@shared/physics/einstein");
    f = einsteinFunction;
  }
  io.stdout(JSON.stringify(xs.map((x) => ({ x, value: f(x) })), null, 2) + "\n");
  return 0;
}
