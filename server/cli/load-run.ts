/*
 * The input side of `fit`, `rank` and `thermo`: read a calorimeter export, map its columns (the
 * proposal from the header, overridden by --t-col/--cp-col/--sigma-col/--t-unit/--cp-unit), take the
 * sample (formula, or --molar-mass and --atoms; --mass-mg for total units) and reduce it to one run of
 * molar heat capacity (--field picks one of several).
 */
import { readFileSync } from "node:fs";
import type { HeatCapacityUnit, ImportMapping, IngestWarning, ReducedPoint } from "@shared/schemas/ingest";
import { proposeMapping } from "@shared/ingest/column-map";
import { IngestError } from "@shared/ingest/ingest-error";
import { decodeBytes, findSampleMassMg, readDelimited, type DelimitedTable } from "@shared/ingest/read-delimited";
import { reduceTable } from "@shared/ingest/reduce";
import { isTotalHeatCapacityUnit, parseUnit } from "@shared/ingest/units";
import { numberOption, UsageError, type CommandIo, type ParsedArgs } from "./args";

/** Options every command that reads a run accepts. */
export const RUN_OPTIONS = [
  "formula",
  "molar-mass",
  "atoms",
  "mass-mg",
  "t-col",
  "cp-col",
  "sigma-col",
  "t-unit",
  "cp-unit",
  "field",
] as const;

export interface LoadedRun {
  file: string;
  points: ReducedPoint[];
  fieldT: number | null;
  atomsPerFormulaUnit: number;
  molarMassGPerMol: number | null;
  massMg: number | null;
  mapping: ImportMapping;
  warnings: IngestWarning[];
}

function column(table: DelimitedTable, value: string, option: string): string {
  if (table.header.includes(value)) return value;
  if (/^[1-9][0-9]*$/.test(value) && Number(value) <= table.header.length) return table.header[Number(value) - 1];
  throw new UsageError(`--${option}: no column '${value}'; the columns are ${table.header.map((h) => `'${h}'`).join(", ")} (or give a 1-based number)`);
}

function heatCapacityUnit(text: string): HeatCapacityUnit {
  const u = parseUnit(text);
  if (u?.kind !== "heatCapacity") {
    throw new UsageError(`--cp-unit: '${text}' is not one of J/K, mJ/K, uJ/K, J/(g*K), J/(kg*K), J/(mol*K), mJ/(mol*K), cal/(mol*K)`);
  }
  return u.code;
}

/**
 * Reads and reduces the run named by the first positional argument.
 * @param args parsed command line
 * @param io stderr receives notes (mass taken from the preamble, warnings)
 * @throws UsageError, IngestError (bad input: exit 2)
 */
export async function loadRun(args: ParsedArgs, io: CommandIo): Promise<LoadedRun> {
  if (args.positional.length !== 1) throw new UsageError(args.positional.length === 0 ? "give the export FILE to read" : `give one FILE, not ${args.positional.length}`);
  const file = args.positional[0];
  // mf-parser is the slowest module to load: start loading it now, while the file is read and reduced.
  const formula = args.values.get("formula");
  const formulaModule = formula === undefined ? null : import("@shared/ingest/formula");
  formulaModule?.catch(() => undefined);
  let bytes: Buffer;
  try {
    bytes = readFileSync(file);
  } catch (e) {
    throw new UsageError(`cannot read ${file}: ${(e as NodeJS.ErrnoException).code === "ENOENT" ? "no such file" : (e as Error).message}`);
  }
  const table = readDelimited(decodeBytes(bytes).text);
  const proposal = proposeMapping(table.header, table.units);

  const columns: Partial<ImportMapping["columns"]> = { ...proposal.columns };
  const units: Partial<ImportMapping["units"]> = { ...proposal.units };
  const tCol = args.values.get("t-col");
  const cpCol = args.values.get("cp-col");
  const sigmaCol = args.values.get("sigma-col");
  if (tCol !== undefined) columns.temperature = column(table, tCol, "t-col");
  if (cpCol !== undefined) {
    columns.heatCapacity = column(table, cpCol, "cp-col");
    const u = table.units[table.header.indexOf(columns.heatCapacity)];
    if (u?.kind === "heatCapacity") units.heatCapacity = u.code;
  }
  if (sigmaCol !== undefined) {
    if (sigmaCol === "none") delete columns.sigma;
    else columns.sigma = column(table, sigmaCol, "sigma-col");
  }
  const tUnit = args.values.get("t-unit");
  if (tUnit !== undefined) {
    if (tUnit !== "K" && tUnit !== "C") throw new UsageError(`--t-unit must be K or C, got '${tUnit}'`);
    units.temperature = tUnit;
  }
  const cpUnit = args.values.get("cp-unit");
  if (cpUnit !== undefined) units.heatCapacity = heatCapacityUnit(cpUnit);
  if (columns.temperature === undefined) throw new UsageError("no temperature column found in the header: give --t-col");
  if (columns.heatCapacity === undefined) throw new UsageError("no heat-capacity column found in the header: give --cp-col");
  if (units.heatCapacity === undefined) throw new UsageError(`the header does not give the unit of '${columns.heatCapacity}': give --cp-unit`);
  if (columns.field !== undefined && units.field === undefined) throw new UsageError(`the header does not give the unit of the field column '${columns.field}'`);
  if (columns.addenda !== undefined && !isTotalHeatCapacityUnit(units.heatCapacity)) delete columns.addenda;
  const mapping: ImportMapping = {
    columns: { temperature: columns.temperature, heatCapacity: columns.heatCapacity, ...pick(columns, ["sigma", "field", "addenda"]) },
    units: { temperature: units.temperature ?? "K", heatCapacity: units.heatCapacity, ...(units.field ? { field: units.field } : {}) },
    ...(proposal.sigmaScale && sigmaKept(columns, proposal.columns.sigma) ? { sigmaScale: proposal.sigmaScale } : {}),
  };

  let molarMass = numberOption(args, "molar-mass", { positive: true }) ?? null;
  let atoms = numberOption(args, "atoms", { positive: true }) ?? null;
  if (formula !== undefined && formulaModule !== null && (molarMass === null || atoms === null)) {
    const { parseFormula } = await formulaModule;
    const info = parseFormula(formula);
    molarMass ??= info.molarMassGPerMol;
    atoms ??= info.atomsPerFormulaUnit;
  }
  if (atoms === null) throw new UsageError("give --formula F, or --atoms N (atoms per formula unit)");
  const unit = mapping.units.heatCapacity;
  const molar = unit === "J/(mol*K)" || unit === "mJ/(mol*K)" || unit === "cal/(mol*K)";
  if (!molar && molarMass === null) throw new UsageError(`converting ${unit} to molar units needs --formula F or --molar-mass G`);
  let massMg = numberOption(args, "mass-mg", { positive: true }) ?? null;
  if (massMg === null && isTotalHeatCapacityUnit(unit)) {
    const found = findSampleMassMg(table.preamble);
    if (found === null) throw new UsageError(`the heat capacity is a total (${unit}): give the sample mass with --mass-mg`);
    massMg = found.massMg;
    io.stderr(`note: sample mass ${found.massMg} mg taken from line ${found.line} of ${file}; give --mass-mg to override\n`);
  }

  const runs = reduceTable(table, mapping, { massMg, molarMassGPerMol: molarMass ?? Number.NaN, atomsPerFormulaUnit: atoms });
  let run = runs[0];
  const field = numberOption(args, "field");
  if (runs.length > 1 || field !== undefined) {
    const fields = runs.map((r) => r.fieldT);
    if (field === undefined) {
      throw new UsageError(`${file} holds runs at ${fields.map((f) => `${round(f)} T`).join(", ")}: choose one with --field`);
    }
    const tolerance = mapping.fieldToleranceT ?? 0.05;
    const near = runs.filter((r) => r.fieldT !== null && Math.abs(r.fieldT - field) <= tolerance);
    if (near.length !== 1) {
      throw new UsageError(`no run at ${field} T in ${file}; its runs are at ${fields.map((f) => (f === null ? "no field" : `${round(f)} T`)).join(", ")}`);
    }
    run = near[0];
  }
  for (const w of run.warnings) io.stderr(`warning: ${w.message}${w.lines.length ? ` (lines ${w.lines.join(", ")})` : ""}\n`);
  return {
    file,
    points: run.points,
    fieldT: run.fieldT,
    atomsPerFormulaUnit: atoms,
    molarMassGPerMol: molarMass,
    massMg,
    mapping,
    warnings: run.warnings,
  };
}

function sigmaKept(columns: Partial<ImportMapping["columns"]>, proposed: string | undefined): boolean {
  return columns.sigma !== undefined && columns.sigma === proposed;
}

function pick<K extends keyof ImportMapping["columns"]>(columns: Partial<ImportMapping["columns"]>, keys: K[]): Partial<ImportMapping["columns"]> {
  const out: Partial<ImportMapping["columns"]> = {};
  for (const k of keys) if (columns[k] !== undefined) out[k] = columns[k];
  return out;
}

function round(v: number | null): string {
  return v === null ? "none" : String(Math.round(v * 1000) / 1000);
}

export { IngestError };
