/*
 * Reduction of a read table to molar heat capacity: columns picked by the mapping, units converted,
 * a per-point addenda column subtracted (total units), rows split into one run per field value, each
 * run sorted by T with repeated temperatures averaged, an addenda run subtracted after monotone
 * interpolation, then converted to J/(mol·K) per mole of formula units, with plausibility warnings.
 * Nothing is dropped: every input row ends up in exactly one point, which keeps its first file line.
 */
import type { ImportMapping, IngestWarning, ReducedPoint, ReducedRun } from "@shared/schemas/ingest";
import { monotoneInterpolator } from "@shared/numerics/monotone-interpolation";
import { GAS_CONSTANT } from "@shared/physics/constants";
import { IngestError, type IngestIssue } from "./ingest-error";
import type { DelimitedTable } from "./read-delimited";
import {
  fieldToTesla,
  isTotalHeatCapacityUnit,
  molarHeatCapacityFactor,
  temperatureToKelvin,
  totalToJoulePerKelvin,
  type MolarBasis,
} from "./units";

// R = N_A·k_B (CODATA 2018, both exact), the physics core's constant, re-exported for callers of the reduction.
export { GAS_CONSTANT };

/** Rows within this many tesla of a run's first (lowest) field belong to that run. */
export const DEFAULT_FIELD_TOLERANCE_T = 0.05;
/**
 * Rows whose temperatures are within this fraction of the lowest one of a group are one measurement
 * repeated, and are averaged. 1e-4 (0.01 %): repeats at one set point agree that well, while the
 * densest scans (0.1 K steps at 300 K are 3e-4 apart) stay separate points.
 */
export const DEFAULT_TEMPERATURE_TOLERANCE_REL = 1e-4;

// Plausibility limits of the warnings (common practice, no source): beyond 3× Dulong–Petit a solid's
// Cp is almost surely a unit or mass mistake; 0.05–2,000 K spans dilution refrigerators to furnaces.
export const DULONG_PETIT_MULTIPLE = 3;
export const MIN_PLAUSIBLE_K = 0.05;
export const MAX_PLAUSIBLE_K = 2000;
export const MIN_POINTS = 10;

/** The sample a run belongs to. */
export interface SampleBasis extends MolarBasis {
  /** Atoms per formula unit n (for the Dulong–Petit limit 3nR and per-atom values). */
  atomsPerFormulaUnit: number;
}

/** A heat capacity of the whole piece: temperature in K, C and σ in J/K. */
export interface TotalPoint {
  temperatureK: number;
  heatCapacityJPerK: number;
  sigmaJPerK: number | null;
}

export interface ReduceOptions {
  /** A reduced addenda run (platform + grease), J/K against K, subtracted before the molar conversion. */
  addenda?: readonly TotalPoint[];
}

interface Row {
  line: number;
  t: number;
  c: number;
  sigma: number | null;
  field: number | null;
}

interface Averaged {
  t: number;
  c: number;
  sigma: number | null;
  sourceLine: number;
  rowsAveraged: number;
}

function columnIndex(table: DelimitedTable, name: string, role: string): number {
  const i = table.header.indexOf(name);
  if (i < 0) {
    throw new IngestError(
      "UNKNOWN_COLUMN",
      `the mapping names '${name}' as ${role}, but the file has no such column (columns: ${table.header.map((h) => `'${h}'`).join(", ")})`,
      table.headerLine,
      name,
    );
  }
  if (table.columnKinds[i] === "text") {
    const row = table.rows.find((r) => r.cells[i] !== "");
    throw new IngestError(
      "TEXT_COLUMN",
      `${role} must be numbers, but this column holds text${row ? ` (line ${row.line}: '${row.cells[i]}')` : ""}`,
      row?.line ?? table.headerLine,
      name,
    );
  }
  return i;
}

function collectRows(table: DelimitedTable, mapping: ImportMapping): Row[] {
  const { columns, units } = mapping;
  const ti = columnIndex(table, columns.temperature, "the temperature");
  const ci = columnIndex(table, columns.heatCapacity, "the heat capacity");
  const si = columns.sigma === undefined ? -1 : columnIndex(table, columns.sigma, "the uncertainty");
  const fi = columns.field === undefined ? -1 : columnIndex(table, columns.field, "the field");
  const ai = columns.addenda === undefined ? -1 : columnIndex(table, columns.addenda, "the addenda");
  if (ai >= 0 && !isTotalHeatCapacityUnit(units.heatCapacity)) {
    throw new IngestError(
      "UNIT_NOT_TOTAL",
      `a per-point addenda column can only be subtracted from a total heat capacity (J/K, mJ/K or µJ/K), not from ${units.heatCapacity}`,
      table.headerLine,
      columns.addenda ?? null,
    );
  }
  if (fi >= 0 && units.field === undefined) {
    throw new IngestError("UNKNOWN_COLUMN", "choose the unit of the field column", table.headerLine, columns.field ?? null);
  }
  const scale = mapping.sigmaScale ?? "absolute";
  const issues: IngestIssue[] = [];
  const codes: IngestError["code"][] = [];
  const note = (code: IngestError["code"], line: number, column: string, message: string): void => {
    if (issues.length < 20) {
      issues.push({ line, column, message: `line ${line}, column '${column}': ${message}` });
      codes.push(code);
    }
  };
  const out: Row[] = [];
  for (const r of table.rows) {
    const tRaw = r.values[ti];
    const cRaw = r.values[ci];
    let bad = false;
    if (tRaw === null) {
      note("MISSING_VALUE", r.line, columns.temperature, "the temperature is missing");
      bad = true;
    }
    if (cRaw === null) {
      note("MISSING_VALUE", r.line, columns.heatCapacity, "the heat capacity is missing");
      bad = true;
    }
    const t = tRaw === null ? Number.NaN : temperatureToKelvin(tRaw, units.temperature);
    if (tRaw !== null && !(t > 0)) {
      const shown = units.temperature === "C" ? `${tRaw} °C is ${t} K` : `${tRaw} K`;
      note("NONPOSITIVE_TEMPERATURE", r.line, columns.temperature, `${shown}: temperatures must be above 0 K`);
      bad = true;
    }
    let field: number | null = null;
    if (fi >= 0) {
      const f = r.values[fi];
      if (f === null) {
        note("MISSING_VALUE", r.line, columns.field!, "the field is missing");
        bad = true;
      } else field = fieldToTesla(f, units.field!);
    }
    let c = cRaw ?? Number.NaN;
    let sigma: number | null = null;
    if (si >= 0) {
      const s = r.values[si];
      if (s !== null) {
        if (s < 0) {
          note("NEGATIVE_SIGMA", r.line, columns.sigma!, `the uncertainty ${s} is negative`);
          bad = true;
        } else sigma = scale === "absolute" ? s : scale === "fraction" ? s * Math.abs(c) : (s / 100) * Math.abs(c);
      }
    }
    if (ai >= 0) {
      const a = r.values[ai];
      if (a === null) {
        note("MISSING_VALUE", r.line, columns.addenda!, "the addenda value is missing");
        bad = true;
      } else c -= a;
    }
    if (!bad) out.push({ line: r.line, t, c, sigma, field });
  }
  if (issues.length > 0) {
    const first = issues[0];
    throw new IngestError(codes[0], first.message.slice(first.message.indexOf(": ") + 2), first.line, first.column, issues.slice(1));
  }
  return out;
}

/** Groups rows by field: a group spans at most `toleranceT` from its lowest field. Ordered by field. */
function splitByField(rows: readonly Row[], toleranceT: number): { fieldT: number | null; rows: Row[] }[] {
  if (rows.length === 0) return [];
  if (rows[0].field === null) return [{ fieldT: null, rows: [...rows] }];
  // Groups are formed over the distinct field values in ascending order; rows then go to their
  // value's group in file order (the scan-direction check reads each group that way).
  const values = [...new Set(rows.map((r) => r.field!))].sort((a, b) => a - b);
  const groupOfValue = new Map<number, number>();
  const starts: number[] = [];
  for (const v of values) {
    if (starts.length === 0 || v - starts[starts.length - 1] > toleranceT) starts.push(v);
    groupOfValue.set(v, starts.length - 1);
  }
  const groups: Row[][] = starts.map(() => []);
  const ordered = [...rows].sort((a, b) => a.line - b.line);
  for (const r of ordered) groups[groupOfValue.get(r.field!)!].push(r);
  return groups.map((g) => {
    const fieldT = g.reduce((s, r) => s + r.field!, 0) / g.length;
    return { fieldT, rows: g };
  });
}

/**
 * Sorts by temperature and averages rows within `relTol` of a group's lowest temperature.
 * Mean of T and of C; σ of the mean sqrt(Σσᵢ²)/N when every row has σ, else null.
 */
function averageSameTemperature(rows: readonly Row[], relTol: number): Averaged[] {
  // A sweep usually arrives in order already: check that in one pass before sorting.
  const inOrder = (a: Row, b: Row) => a.t - b.t || a.line - b.line;
  let ordered = true;
  for (let k = 1; k < rows.length && ordered; k++) ordered = inOrder(rows[k - 1], rows[k]) <= 0;
  const sorted = ordered ? [...rows] : [...rows].sort(inOrder);
  const out: Averaged[] = [];
  let i = 0;
  while (i < sorted.length) {
    const t0 = sorted[i].t;
    let j = i + 1;
    while (j < sorted.length && sorted[j].t - t0 <= relTol * t0) j++;
    const n = j - i;
    let st = 0;
    let sc = 0;
    let ss = 0;
    let allSigma = true;
    let line = Number.POSITIVE_INFINITY;
    for (let k = i; k < j; k++) {
      const g = sorted[k];
      st += g.t;
      sc += g.c;
      if (g.sigma === null) allSigma = false;
      else ss += g.sigma * g.sigma;
      line = Math.min(line, g.line);
    }
    out.push({
      t: n === 1 ? sorted[i].t : st / n,
      c: n === 1 ? sorted[i].c : sc / n,
      sigma: allSigma ? (n === 1 ? sorted[i].sigma : Math.sqrt(ss) / n) : null,
      sourceLine: line,
      rowsAveraged: n,
    });
    i = j;
  }
  return out;
}

function firstLines(lines: readonly number[]): number[] {
  return [...lines].sort((a, b) => a - b).slice(0, 10);
}

function warn(code: IngestWarning["code"], message: string, lines: readonly number[], count = lines.length): IngestWarning {
  return { code, message, count, lines: firstLines(lines) };
}

/** Reversals of the scan direction in file order, beyond the repeat tolerance. */
function scanReversals(rows: readonly Row[], relTol: number): number[] {
  if (rows.length < 3) return [];
  const direction = Math.sign(rows[rows.length - 1].t - rows[0].t) || 1;
  const lines: number[] = [];
  for (let k = 1; k < rows.length; k++) {
    const step = (rows[k].t - rows[k - 1].t) * direction;
    if (step < -relTol * rows[k - 1].t) lines.push(rows[k].line);
  }
  return lines;
}

function headerUnitWarnings(table: DelimitedTable, mapping: ImportMapping): IngestWarning[] {
  const out: IngestWarning[] = [];
  const check = (name: string | undefined, code: string | undefined, kind: string): void => {
    if (name === undefined || code === undefined) return;
    const i = table.header.indexOf(name);
    const u = i >= 0 ? table.units[i] : null;
    if (u !== null && u.code !== code) {
      out.push(
        warn(
          "UNIT_DIFFERS_FROM_HEADER",
          `the header gives column '${name}' in ${u.code}, but the ${kind} unit chosen is ${code}`,
          table.headerLine === null ? [] : [table.headerLine],
          1,
        ),
      );
    }
  };
  check(mapping.columns.temperature, mapping.units.temperature, "temperature");
  check(mapping.columns.heatCapacity, mapping.units.heatCapacity, "heat-capacity");
  check(mapping.columns.field, mapping.units.field, "field");
  return out;
}

function checkBasis(sample: SampleBasis): void {
  const n = sample.atomsPerFormulaUnit;
  if (!(Number.isFinite(n) && n > 0)) {
    throw new IngestError("INVALID_SAMPLE", `atoms per formula unit must be a positive number, got ${n}`);
  }
}

/**
 * Subtracts an addenda run (platform + grease) from total heat-capacity points.
 * The addenda is interpolated onto each sample temperature with the monotone cubic (PCHIP), so the
 * correction never overshoots between addenda points; its σ, when every addenda point has one, is
 * interpolated the same way and combined in quadrature (σ² = σ_sample² + σ_addenda²). A sample point
 * without σ stays without σ. Points outside the addenda's temperature range are returned unchanged
 * with `outsideAddendaRange: true` (the caller masks them; no extrapolation).
 * @param points sample points, T in K, C and σ in J/K
 * @param addenda addenda run, T in K, C and σ in J/K, at least 2 points at distinct temperatures
 * @returns the points, corrected, each with `outsideAddendaRange`
 * @throws IngestError (INVALID_ADDENDA) for fewer than 2 addenda points, repeated temperatures or non-finite values
 * @see shared/numerics/monotone-interpolation.ts (Fritsch & Carlson 1980)
 */
export function subtractAddenda<P extends TotalPoint>(
  points: readonly P[],
  addenda: readonly TotalPoint[],
): Array<P & { outsideAddendaRange: boolean }> {
  if (addenda.length < 2) {
    throw new IngestError("INVALID_ADDENDA", `an addenda run needs at least 2 points, it has ${addenda.length}`);
  }
  const sorted = [...addenda].sort((a, b) => a.temperatureK - b.temperatureK);
  for (let k = 0; k < sorted.length; k++) {
    const a = sorted[k];
    if (!(Number.isFinite(a.temperatureK) && Number.isFinite(a.heatCapacityJPerK))) {
      throw new IngestError("INVALID_ADDENDA", `addenda point ${k + 1} is not finite`);
    }
    if (k > 0 && !(a.temperatureK > sorted[k - 1].temperatureK)) {
      throw new IngestError(
        "INVALID_ADDENDA",
        `the addenda run has two points at ${a.temperatureK} K: average repeated temperatures first (reduceAddendaTable does)`,
      );
    }
  }
  const ts = sorted.map((a) => a.temperatureK);
  const value = monotoneInterpolator(ts, sorted.map((a) => a.heatCapacityJPerK));
  const withSigma = sorted.every((a) => a.sigmaJPerK !== null);
  const sigma = withSigma ? monotoneInterpolator(ts, sorted.map((a) => a.sigmaJPerK!)) : null;
  return points.map((p) => {
    const inside = p.temperatureK >= ts[0] && p.temperatureK <= ts[ts.length - 1];
    if (!inside) return { ...p, outsideAddendaRange: true };
    const sa = sigma === null ? 0 : sigma(p.temperatureK);
    return {
      ...p,
      heatCapacityJPerK: p.heatCapacityJPerK - value(p.temperatureK),
      sigmaJPerK: p.sigmaJPerK === null ? null : Math.hypot(p.sigmaJPerK, sa),
      outsideAddendaRange: false,
    };
  });
}

/**
 * Reduces a read table to runs of molar heat capacity, one per field value.
 * Order of operations: map columns and convert T to K and field to T; subtract the per-point addenda
 * column (file units); split by field (`fieldToleranceT`, default 0.05 T); per run sort by T and
 * average repeated temperatures (`temperatureToleranceRelative`, default 1e-4); subtract the addenda
 * run (J/K, after monotone interpolation); convert to J/(mol·K) per mole of formula units.
 * @param table from `readDelimited`
 * @param mapping columns and units (ImportMappingSchema-parsed)
 * @param sample mass in mg (total units), molar mass in g/mol, atoms per formula unit
 * @param options an addenda run to subtract (total units only)
 * @returns runs ordered by field; each point keeps its first file line and how many rows it averages
 * @throws IngestError UNKNOWN_COLUMN, TEXT_COLUMN, MISSING_VALUE, NONPOSITIVE_TEMPERATURE, NEGATIVE_SIGMA,
 *   UNIT_NOT_TOTAL, INVALID_SAMPLE, INVALID_ADDENDA, each with the line and column at fault where there is one
 */
export function reduceTable(
  table: DelimitedTable,
  mapping: ImportMapping,
  sample: SampleBasis,
  options: ReduceOptions = {},
): ReducedRun[] {
  checkBasis(sample);
  const unit = mapping.units.heatCapacity;
  if (options.addenda !== undefined && !isTotalHeatCapacityUnit(unit)) {
    throw new IngestError(
      "UNIT_NOT_TOTAL",
      `an addenda run can only be subtracted from a total heat capacity (J/K, mJ/K or µJ/K), not from ${unit}`,
      table.headerLine,
      mapping.columns.heatCapacity,
    );
  }
  const factor = molarHeatCapacityFactor(unit, sample);
  const rows = collectRows(table, mapping);
  const relTol = mapping.temperatureToleranceRelative ?? DEFAULT_TEMPERATURE_TOLERANCE_REL;
  const groups = splitByField(rows, mapping.fieldToleranceT ?? DEFAULT_FIELD_TOLERANCE_T);
  const unitWarnings = headerUnitWarnings(table, mapping);
  const dulongPetit = 3 * sample.atomsPerFormulaUnit * GAS_CONSTANT;

  return groups.map((g) => {
    const averaged = averageSameTemperature(g.rows, relTol);
    let points: ReducedPoint[];
    if (options.addenda !== undefined) {
      const toJ = totalToJoulePerKelvin(unit);
      const perJ = factor / toJ;
      const total = averaged.map((a) => ({
        temperatureK: a.t,
        heatCapacityJPerK: a.c * toJ,
        sigmaJPerK: a.sigma === null ? null : a.sigma * toJ,
        sourceLine: a.sourceLine,
        rowsAveraged: a.rowsAveraged,
      }));
      points = subtractAddenda(total, options.addenda).map((p) => ({
        temperatureK: p.temperatureK,
        heatCapacity: p.heatCapacityJPerK * perJ,
        sigma: p.sigmaJPerK === null ? null : p.sigmaJPerK * perJ,
        sourceLine: p.sourceLine,
        rowsAveraged: p.rowsAveraged,
        outsideAddendaRange: p.outsideAddendaRange,
      }));
    } else {
      points = averaged.map((a) => ({
        temperatureK: a.t,
        heatCapacity: a.c * factor,
        sigma: a.sigma === null ? null : a.sigma * factor,
        sourceLine: a.sourceLine,
        rowsAveraged: a.rowsAveraged,
        outsideAddendaRange: false,
      }));
    }
    const subtracted = options.addenda !== undefined || mapping.columns.addenda !== undefined;
    return { fieldT: g.fieldT, points, warnings: [...unitWarnings, ...plausibility(points, g.rows, relTol, dulongPetit, subtracted)] };
  });
}

function plausibility(
  points: readonly ReducedPoint[],
  fileOrder: readonly Row[],
  relTol: number,
  dulongPetit: number,
  subtracted: boolean,
): IngestWarning[] {
  const out: IngestWarning[] = [];
  const limit = DULONG_PETIT_MULTIPLE * dulongPetit;
  const high = points.filter((p) => p.heatCapacity > limit).map((p) => p.sourceLine);
  if (high.length > 0) {
    out.push(
      warn(
        "ABOVE_DULONG_PETIT",
        `${high.length} point(s) exceed ${DULONG_PETIT_MULTIPLE}× the Dulong–Petit limit 3nR = ${dulongPetit.toPrecision(5)} J/(mol·K): check the unit, the sample mass and the molar mass`,
        high,
      ),
    );
  }
  const negative = points.filter((p) => p.heatCapacity < 0).map((p) => p.sourceLine);
  if (negative.length > 0) {
    out.push(
      warn(
        "NEGATIVE_HEAT_CAPACITY",
        `${negative.length} point(s) have a negative heat capacity${subtracted ? " after the addenda subtraction" : ""}`,
        negative,
      ),
    );
  }
  const range = points.filter((p) => p.temperatureK < MIN_PLAUSIBLE_K || p.temperatureK > MAX_PLAUSIBLE_K).map((p) => p.sourceLine);
  if (range.length > 0) {
    out.push(
      warn(
        "TEMPERATURE_OUT_OF_RANGE",
        `${range.length} point(s) lie outside ${MIN_PLAUSIBLE_K}–${MAX_PLAUSIBLE_K} K: check the temperature column and its unit`,
        range,
      ),
    );
  }
  const reversals = scanReversals(fileOrder, relTol);
  if (reversals.length > 0) {
    out.push(
      warn(
        "NON_MONOTONIC_SCAN",
        `the temperature reverses ${reversals.length} time(s) in file order (first at line ${reversals[0]}): the points are sorted by T`,
        reversals,
      ),
    );
  }
  if (points.length < MIN_POINTS) {
    out.push(warn("FEW_POINTS", `only ${points.length} point(s): at least ${MIN_POINTS} are needed for a useful fit`, [], points.length));
  }
  const outside = points.filter((p) => p.outsideAddendaRange).map((p) => p.sourceLine);
  if (outside.length > 0) {
    out.push(
      warn(
        "OUTSIDE_ADDENDA_RANGE",
        `${outside.length} point(s) lie outside the addenda run's temperature range and are not corrected: mask them`,
        outside,
      ),
    );
  }
  const zero = points.filter((p) => p.sigma === 0).map((p) => p.sourceLine);
  if (zero.length > 0) {
    out.push(warn("ZERO_SIGMA", `${zero.length} point(s) have an uncertainty of 0, which a weighted fit cannot use`, zero));
  }
  return out;
}

/**
 * Reduces an addenda run (platform + grease) to total heat capacity against temperature, for
 * `subtractAddenda` or `reduceTable`'s `addenda` option: sorted, repeats averaged, in J/K.
 * @param table from `readDelimited`
 * @param mapping columns and units; the heat-capacity unit must be total (J/K, mJ/K, µJ/K)
 * @returns points in K and J/K
 * @throws IngestError as `reduceTable`, UNIT_NOT_TOTAL for a non-total unit, INVALID_ADDENDA for several fields
 */
export function reduceAddendaTable(table: DelimitedTable, mapping: ImportMapping): TotalPoint[] {
  const unit = mapping.units.heatCapacity;
  if (!isTotalHeatCapacityUnit(unit)) {
    throw new IngestError(
      "UNIT_NOT_TOTAL",
      `an addenda run is the heat capacity of the platform and grease, in J/K, mJ/K or µJ/K, not ${unit}`,
      table.headerLine,
      mapping.columns.heatCapacity,
    );
  }
  const rows = collectRows(table, mapping);
  const groups = splitByField(rows, mapping.fieldToleranceT ?? DEFAULT_FIELD_TOLERANCE_T);
  if (groups.length > 1) {
    throw new IngestError(
      "INVALID_ADDENDA",
      `the addenda file holds runs at ${groups.length} fields; upload one field per addenda run`,
      table.headerLine,
      mapping.columns.field ?? null,
    );
  }
  const toJ = totalToJoulePerKelvin(unit);
  const relTol = mapping.temperatureToleranceRelative ?? DEFAULT_TEMPERATURE_TOLERANCE_REL;
  return averageSameTemperature(groups[0]?.rows ?? [], relTol).map((a) => ({
    temperatureK: a.t,
    heatCapacityJPerK: a.c * toJ,
    sigmaJPerK: a.sigma === null ? null : a.sigma * toJ,
  }));
}

/**
 * Per mole of atoms: divides heat capacity and σ by the atoms per formula unit.
 * @param points reduced points, J/(mol·K) per mole of formula units
 * @param atomsPerFormulaUnit n (> 0)
 * @returns new points in J/(mol·K) per mole of atoms
 * @throws IngestError (INVALID_SAMPLE) when n is not a positive number
 */
export function toPerMoleOfAtoms(points: readonly ReducedPoint[], atomsPerFormulaUnit: number): ReducedPoint[] {
  checkBasis({ atomsPerFormulaUnit, molarMassGPerMol: 1 });
  return points.map((p) => ({
    ...p,
    heatCapacity: p.heatCapacity / atomsPerFormulaUnit,
    sigma: p.sigma === null ? null : p.sigma / atomsPerFormulaUnit,
  }));
}
