/*
 * `thetafold fit` and `thetafold rank`: fit a heat-capacity model to one run of a calorimeter export
 * and print the result as JSON; rank fits several candidate models and orders them by BIC.
 */
import type { ComponentDefinition, ModelDefinition, ParameterSetting } from "@shared/physics/model-types";
import { numberOption, parseArgs, UsageError, type CommandIo, type ParsedArgs } from "./args";
import { loadRun, RUN_OPTIONS, type LoadedRun } from "./load-run";

export const FIT_USAGE = `Usage: thetafold fit FILE --formula F [--molar-mass G --atoms N] [--mass-mg M]
                     [--t-col C --cp-col C --sigma-col C] [--t-unit K|C --cp-unit U]
                     [--model M] [--fix NAME=VALUE,...] [--tmin T --tmax T] [--field B]
       thetafold rank FILE (same inputs) [--models M1,M2,...]

Fits a model to the molar heat capacity of one run and prints JSON on stdout (SI units):
  {"model", "window": [tmin, tmax], "points", "parameters": {NAME: {"value", "stderr",
   "stderrAbsolute", "unit", "fixed"}}, "chiSquare", "reducedChiSquare", "aic", "bic", "converged", ...}
stderr gets notes and warnings. rank prints a list of such results ordered by BIC (lowest first).

  FILE          delimited export (comma, semicolon, tab or whitespace; any preamble)
  --formula     chemical formula: molar mass and atoms per formula unit (e.g. Ba8Ga16Ge30)
  --molar-mass  molar mass in g/mol, overrides the formula's;  --atoms  atoms per formula unit
  --mass-mg     sample mass in mg (needed for J/K, mJ/K, uJ/K; else read from the preamble)
  --t-col --cp-col --sigma-col   column names as in the header, or 1-based numbers (--sigma-col none)
  --t-unit      K or C;  --cp-unit  J/K mJ/K uJ/K J/(g*K) J/(kg*K) J/(mol*K) mJ/(mol*K) cal/(mol*K)
  --model       lowT (the C/T against T² line: gamma, beta, thetaD) or components joined by "+" from
                electronic, debye, einstein, schottky, nuclear, t3, t5; a component may repeat
                (electronic+debye+einstein+einstein). Default electronic+debye
  --fix         hold parameters: gamma, beta, delta, thetaD, nD, thetaE, nE, gap, nS, gRatio, nuclearA
                (a repeated component numbers them: thetaE2), e.g. --fix nD=1,gRatio=1
  --tmin --tmax fit window in K (lowT without --tmax uses T <= 10 K)
  --field       for a file with several fields: the run at this field, in T
  --models      rank only: candidates, comma-separated (default: electronic+debye,
                electronic+debye+einstein, electronic+debye+einstein+einstein, debye+einstein, debye)
Exit status: 0 done, 2 bad input (the message names the line and column at fault), 1 unexpected failure.
`;

const FIT_OPTIONS = [...RUN_OPTIONS, "model", "fix", "tmin", "tmax"];
const COMPONENTS = new Set(["electronic", "debye", "einstein", "schottky", "nuclear", "t3", "t5"]);
export const DEFAULT_MODEL = "electronic+debye";
export const DEFAULT_RANK_MODELS = [
  "electronic+debye",
  "electronic+debye+einstein",
  "electronic+debye+einstein+einstein",
  "debye+einstein",
  "debye",
];
/** Upper end of the low-temperature line when --tmax is not given, K (common practice, no source: T ≲ θ_D/50 for most solids). */
export const LOW_T_DEFAULT_TMAX_K = 10;

interface ParameterOut {
  value: number;
  stderr: number | null;
  stderrAbsolute: number | null;
  unit: string;
  fixed: boolean;
}

export interface FitOutput {
  model: string;
  window: [number, number];
  points: number;
  parameters: Record<string, ParameterOut>;
  chiSquare: number;
  reducedChiSquare: number;
  aic: number;
  bic: number;
  converged: boolean;
  warnings: string[];
  input: { file: string; fieldT: number | null; massMg: number | null; molarMassGPerMol: number | null; atomsPerFormulaUnit: number };
}

function parseModel(text: string): ComponentDefinition[] {
  const parts = text.split("+").map((p) => p.trim());
  for (const p of parts) {
    if (!COMPONENTS.has(p)) throw new UsageError(`--model: unknown component '${p}'; use ${[...COMPONENTS].join(", ")} joined by +, or lowT`);
  }
  return parts.map((kind) => ({ kind }) as ComponentDefinition);
}

function parseFix(text: string | undefined): Record<string, ParameterSetting> {
  const out: Record<string, ParameterSetting> = {};
  if (text === undefined) return out;
  for (const item of text.split(",")) {
    const m = /^\s*([A-Za-z][A-Za-z0-9]*)\s*=\s*(\S+)\s*$/.exec(item);
    const value = m ? Number(m[2]) : Number.NaN;
    if (!m || !Number.isFinite(value)) throw new UsageError(`--fix: '${item}' is not NAME=VALUE`);
    out[m[1]] = { value, fixed: true };
  }
  return out;
}

function window(args: ParsedArgs): [number, number] | undefined {
  const tmin = numberOption(args, "tmin");
  const tmax = numberOption(args, "tmax");
  if (tmin === undefined && tmax === undefined) return undefined;
  const w: [number, number] = [tmin ?? 0, tmax ?? Number.POSITIVE_INFINITY];
  if (!(w[0] < w[1])) throw new UsageError(`--tmin ${w[0]} must be below --tmax ${w[1]}`);
  return w;
}

function inputOf(run: LoadedRun): FitOutput["input"] {
  return {
    file: run.file,
    fieldT: run.fieldT,
    massMg: run.massMg,
    molarMassGPerMol: run.molarMassGPerMol,
    atomsPerFormulaUnit: run.atomsPerFormulaUnit,
  };
}

/** AIC and BIC in the forms shared/fitting/least-squares.ts documents (Burnham & Anderson 2002, §2.2, §6.4). */
function criteria(chiSquare: number, n: number, k: number, knownSigma: boolean): { aic: number; bic: number } {
  if (knownSigma) return { aic: chiSquare + 2 * k, bic: chiSquare + k * Math.log(n) };
  const base = n * Math.log(chiSquare / n);
  return { aic: base + 2 * (k + 1), bic: base + (k + 1) * Math.log(n) };
}

async function fitLowT(run: LoadedRun, args: ParsedArgs): Promise<FitOutput> {
  if (args.values.has("fix")) throw new UsageError("--fix does not apply to the lowT line");
  const { fitLowT: lowT, thetaDFromBeta } = await import("@shared/fitting/linear");
  const tmin = numberOption(args, "tmin") ?? 0;
  const tmax = numberOption(args, "tmax") ?? LOW_T_DEFAULT_TMAX_K;
  const pts = run.points.filter((p) => p.temperatureK >= tmin && p.temperatureK <= tmax);
  const sigma = pts.every((p) => p.sigma !== null && p.sigma > 0) ? pts.map((p) => p.sigma!) : null;
  const fit = lowT(
    pts.map((p) => p.temperatureK),
    pts.map((p) => p.heatCapacity),
    sigma,
  );
  const warnings: string[] = [];
  const parameters: Record<string, ParameterOut> = {
    gamma: { value: fit.gamma, stderr: fit.stdErrors[0], stderrAbsolute: fit.stdErrorsUnscaled[0], unit: fit.units[0], fixed: false },
    beta: { value: fit.beta, stderr: fit.stdErrors[1], stderrAbsolute: fit.stdErrorsUnscaled[1], unit: fit.units[1], fixed: false },
  };
  if (fit.beta > 0) {
    const scaled = thetaDFromBeta(fit.beta, run.atomsPerFormulaUnit, fit.stdErrors[1]);
    const absolute = thetaDFromBeta(fit.beta, run.atomsPerFormulaUnit, fit.stdErrorsUnscaled[1]);
    parameters.thetaD = { value: scaled.thetaD, stderr: scaled.sigmaThetaD, stderrAbsolute: absolute.sigmaThetaD, unit: "K", fixed: false };
  } else warnings.push("beta ≤ 0: the line gives no Debye temperature; lower --tmax or check the data");
  if (sigma === null) warnings.push("No uncertainties were given, so every point has equal weight in C/T.");
  const { aic, bic } = criteria(fit.chiSquare, fit.pointCount, 2, sigma !== null);
  return {
    model: "lowT",
    window: fit.temperatureRangeK,
    points: fit.pointCount,
    parameters,
    chiSquare: fit.chiSquare,
    reducedChiSquare: fit.reducedChiSquare,
    aic,
    bic,
    converged: true,
    warnings,
    input: inputOf(run),
  };
}

async function fitComposite(run: LoadedRun, modelText: string, fix: Record<string, ParameterSetting>, w: [number, number] | undefined): Promise<FitOutput> {
  const { fitHeatCapacity } = await import("@shared/fitting/fit-model");
  const def: ModelDefinition = { components: parseModel(modelText), parameters: fix };
  const pts = run.points;
  const sigma = pts.every((p) => p.sigma !== null && p.sigma > 0) ? pts.map((p) => p.sigma!) : null;
  const fit = fitHeatCapacity(
    { temperatureK: pts.map((p) => p.temperatureK), cp: pts.map((p) => p.heatCapacity), sigma, masked: pts.map((p) => p.outsideAddendaRange) },
    def,
    { atomsPerFormulaUnit: run.atomsPerFormulaUnit, ...(w ? { windowK: w } : {}) },
  );
  const parameters: Record<string, ParameterOut> = {};
  for (const p of fit.parameters) {
    parameters[p.name] = { value: p.value, stderr: p.stdError, stderrAbsolute: p.stdErrorUnscaled, unit: p.unit, fixed: p.fixed };
  }
  return {
    model: modelText,
    window: fit.windowK,
    points: fit.pointCount,
    parameters,
    chiSquare: fit.chiSquare,
    reducedChiSquare: fit.reducedChiSquare,
    aic: fit.aic,
    bic: fit.bic,
    converged: fit.converged,
    warnings: fit.warnings,
    input: inputOf(run),
  };
}

/**
 * `thetafold fit FILE ...`.
 * @param argv arguments after "fit"
 * @param io output sinks
 * @returns exit status (0; bad input throws UsageError / IngestError / RangeError, mapped to 2 by main)
 */
export async function fitCommand(argv: readonly string[], io: CommandIo): Promise<number> {
  const args = parseArgs(argv, FIT_OPTIONS, ["help"]);
  if (args.flags.has("help")) {
    io.stdout(FIT_USAGE);
    return 0;
  }
  const modelText = args.values.get("model") ?? DEFAULT_MODEL;
  const fix = parseFix(args.values.get("fix"));
  const w = window(args);
  if (modelText !== "lowT") parseModel(modelText);
  // Load the fitter while the file is read (module loading overlaps with the reading).
  const engine = modelText === "lowT" ? import("@shared/fitting/linear") : import("@shared/fitting/fit-model");
  engine.catch(() => undefined);
  const run = await loadRun(args, io);
  await engine;
  const out = modelText === "lowT" ? await fitLowT(run, args) : await fitComposite(run, modelText, fix, w);
  for (const warning of out.warnings) io.stderr(`warning: ${warning}\n`);
  io.stdout(JSON.stringify(out, null, 2) + "\n");
  return 0;
}

/**
 * `thetafold rank FILE ...`: the candidates fitted on the same window, ordered by BIC; a candidate
 * that cannot be fitted is listed last with its reason.
 * @param argv arguments after "rank"
 * @param io output sinks; stderr shows progress
 * @returns exit status 0
 */
export async function rankCommand(argv: readonly string[], io: CommandIo): Promise<number> {
  const args = parseArgs(argv, [...FIT_OPTIONS.filter((o) => o !== "model"), "models"], ["help"]);
  if (args.flags.has("help")) {
    io.stdout(FIT_USAGE);
    return 0;
  }
  const models = args.values.get("models")?.split(",").map((m) => m.trim()) ?? DEFAULT_RANK_MODELS;
  for (const m of models) {
    if (m === "lowT") throw new UsageError("rank compares models on one window of C(T); lowT fits C/T against T² and is not comparable");
    parseModel(m);
  }
  const fix = parseFix(args.values.get("fix"));
  const w = window(args);
  const run = await loadRun(args, io);
  const results: (FitOutput & { deltaBic: number | null })[] = [];
  const failed: { model: string; error: string }[] = [];
  for (const [i, m] of models.entries()) {
    io.stderr(`fitting ${i + 1}/${models.length}: ${m}\n`);
    // A --fix naming a parameter this candidate lacks applies only to the candidates that have it.
    try {
      const own = await applicableFix(m, fix, run.atomsPerFormulaUnit);
      results.push({ ...(await fitComposite(run, m, own, w)), deltaBic: null });
    } catch (e) {
      if (!(e instanceof RangeError)) throw e;
      failed.push({ model: m, error: e.message });
    }
  }
  results.sort((a, b) => a.bic - b.bic);
  for (const r of results) r.deltaBic = r.bic - results[0].bic;
  io.stdout(JSON.stringify([...results, ...failed], null, 2) + "\n");
  return 0;
}

async function applicableFix(model: string, fix: Record<string, ParameterSetting>, atoms: number): Promise<Record<string, ParameterSetting>> {
  if (Object.keys(fix).length === 0) return fix;
  const { buildComposite } = await import("@shared/physics/composite");
  const names = new Set(buildComposite({ components: parseModel(model) }, atoms).params.map((p) => p.name));
  return Object.fromEntries(Object.entries(fix).filter(([name]) => names.has(name)));
}
