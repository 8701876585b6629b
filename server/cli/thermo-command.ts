/*
 * `thetafold thermo FILE ... --at T1,T2,...`: entropy S(T) and enthalpy H(T) − H(0) from the run,
 * with the low-temperature line γT + βT³ (fitted to the lowest points) below the first point.
 */
import { numberListOption, numberOption, parseArgs, UsageError, type CommandIo } from "./args";
import { loadRun, RUN_OPTIONS } from "./load-run";

export const THERMO_USAGE = `Usage: thetafold thermo FILE --formula F [--mass-mg M] (inputs as for fit) [--at T1,T2,...] [--tmax T]

Prints {"units", "lowT", "rows": [{"T", "S", "H"}]}: S = integral of C/T dT and H - H(0) = integral of C dT
from 0 K, per mole of formula units. Below the first point C = gamma*T + beta*T^3, fitted as C/T against T^2
to the points up to --tmax (default: the lowest ${8} points). Without --at: round temperatures and 298.15 K
inside the data. Exit status: 0 done, 2 bad input, 1 unexpected failure.
`;

/** Points of the low-temperature line when --tmax is not given (common practice, no source). */
export const LOW_T_POINTS = 8;

/**
 * @param argv arguments after "thermo"
 * @param io output sinks
 * @returns exit status 0 (bad input throws UsageError / IngestError / RangeError)
 */
export async function thermoCommand(argv: readonly string[], io: CommandIo): Promise<number> {
  const args = parseArgs(argv, [...RUN_OPTIONS, "at", "tmax"], ["help"]);
  if (args.flags.has("help")) {
    io.stdout(THERMO_USAGE);
    return 0;
  }
  const at = numberListOption(args, "at");
  const tmax = numberOption(args, "tmax", { positive: true });
  const run = await loadRun(args, io);
  const pts = run.points;
  if (pts.length < 3) throw new UsageError(`the run has ${pts.length} point(s); S and H need at least 3`);
  const { fitLowT } = await import("@shared/fitting/linear");
  const { thermoTable } = await import("@shared/physics/thermo");
  const low = tmax === undefined ? pts.slice(0, LOW_T_POINTS) : pts.filter((p) => p.temperatureK <= tmax);
  const sigma = low.every((p) => p.sigma !== null && p.sigma > 0) ? low.map((p) => p.sigma!) : null;
  const line = fitLowT(
    low.map((p) => p.temperatureK),
    low.map((p) => p.heatCapacity),
    sigma,
  );
  if (line.gamma < 0 || line.beta < 0) {
    io.stderr(`warning: the low-temperature line has gamma = ${line.gamma.toPrecision(4)}, beta = ${line.beta.toPrecision(4)}; a negative term gives unphysical S below the first point\n`);
  }
  const last = pts[pts.length - 1].temperatureK;
  const outside = at?.find((t) => !(t >= 0 && t <= last));
  if (outside !== undefined) throw new UsageError(`--at ${outside} K lies outside 0 … ${last} K (no extrapolation above the data)`);
  const rows = thermoTable(
    pts.map((p) => p.temperatureK),
    pts.map((p) => p.heatCapacity),
    { gamma: line.gamma, beta: line.beta },
    at,
  );
  io.stdout(
    JSON.stringify(
      {
        units: { T: "K", S: "J/(mol·K)", H: "J/mol" },
        lowT: { gamma: line.gamma, beta: line.beta, window: line.temperatureRangeK, points: line.pointCount },
        rows,
      },
      null,
      2,
    ) + "\n",
  );
  return 0;
}
