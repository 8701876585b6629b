import { and, asc, eq, inArray, or, sql, type SQL } from "drizzle-orm";
import type {
  AvailableParameter,
  CompareCurve,
  CompareGroup,
  CompareGroupBy,
  CompareNote,
  CompareRow,
  ComparisonResult,
} from "@shared/schemas/compare";
import { combineInQuadrature, OUTLIER_THRESHOLD_SIGMA, unweightedMean, weightedMean } from "@shared/stats/weighted-mean";
import { thetaDFromBeta } from "@shared/physics/theta-d";
import type { Db } from "../db/client";
import { batches, fitParameters, fits, runPoints, runs, samples } from "../db/schema";
import { notFound } from "../http-error";

/*
 * Comparison of approved fits across batches or along a composition series. Only fits in state
 * "approved" count. Each row's weight in its group is 1/σ² with σ = σ_stat ⊕ σ_sys: the mass systematic
 * of one sample is independent of the next sample's, so across samples it scatters like a random error.
 */

/** What to compare. Empty id lists on both sides mean every approved fit of the lab. */
export interface CompareInput {
  parameter: string;
  groupBy: CompareGroupBy;
  batchIds: readonly string[];
  sampleIds: readonly string[];
}

interface FitRow {
  fitId: string;
  runId: string;
  runLabel: string;
  runFileName: string;
  runAtoms: number | null;
  sampleId: string;
  sampleLabel: string;
  sampleAtoms: number;
  batchId: string | null;
  batchCode: string | null;
  x: number | null;
  xName: string | null;
  /** The stored model definition as its JSON text (parsed once per distinct text, see modelWords). */
  modelText: string;
  windowMinK: number;
  windowMaxK: number;
  approvedAt: number | null;
}

interface ParamRow {
  fitId: string;
  name: string;
  value: number;
  stderr: number | null;
  stderrMass: number | null;
  unit: string;
}

const COMPONENT_WORDS: Record<string, string> = {
  electronic: "γT",
  t3: "βT³",
  t5: "δT⁵",
  debye: "Debye",
  einstein: "Einstein",
  schottky: "Schottky",
  nuclear: "A/T²",
};
const COMPONENT_ORDER = ["electronic", "t3", "t5", "debye", "einstein", "schottky", "nuclear"];

function components(model: Record<string, unknown>): { kind: string; dimension?: number }[] {
  const c = model.components;
  if (!Array.isArray(c)) return [];
  return c.filter((x): x is { kind: string; dimension?: number } => typeof x === "object" && x !== null && typeof x.kind === "string");
}

/**
 * A model definition in words, e.g. "γT + Debye (3D) + 2 × Einstein".
 * @param model the stored model definition (shared/physics/model-types ModelDefinition)
 * @returns the label; "unknown model" when it has no components
 */
export function modelLabel(model: Record<string, unknown>): string {
  const parts = components(model);
  if (parts.length === 0) return "unknown model";
  const counts = new Map<string, number>();
  for (const p of parts) {
    const word = p.kind === "debye" ? `Debye (${p.dimension ?? 3}D)` : (COMPONENT_WORDS[p.kind] ?? p.kind);
    counts.set(word, (counts.get(word) ?? 0) + 1);
  }
  const ordered = [...counts.entries()].sort(
    (a, b) => kindRank(parts, a[0]) - kindRank(parts, b[0]) || a[0].localeCompare(b[0]),
  );
  const label = ordered.map(([w, n]) => (n > 1 ? `${n} × ${w}` : w)).join(" + ");
  return model.constrainAtoms ? `${label}, atoms constrained` : label;
}

function kindRank(parts: { kind: string; dimension?: number }[], word: string): number {
  const p = parts.find((q) => (q.kind === "debye" ? `Debye (${q.dimension ?? 3}D)` : (COMPONENT_WORDS[q.kind] ?? q.kind)) === word);
  const i = p ? COMPONENT_ORDER.indexOf(p.kind) : -1;
  return i < 0 ? COMPONENT_ORDER.length : i;
}

/**
 * Canonical key of a model: equal keys mean the same components (order ignored) and constraint.
 * @param model the stored model definition
 */
export function modelKey(model: Record<string, unknown>): string {
  const keys = components(model)
    .map((p) => (p.kind === "debye" ? `debye${p.dimension ?? 3}` : p.kind))
    .sort();
  return keys.join("+") + (model.constrainAtoms ? ";constrained" : "");
}

/** Label and key of stored model texts, each distinct text parsed once (a lab has a handful of models). */
function modelWords(): (text: string) => { label: string; key: string } {
  const seen = new Map<string, { label: string; key: string }>();
  return (text) => {
    let w = seen.get(text);
    if (!w) {
      const model = JSON.parse(text) as Record<string, unknown>;
      w = { label: modelLabel(model), key: modelKey(model) };
      seen.set(text, w);
    }
    return w;
  };
}

/** Two windows count as the same when both ends agree within 0.05 K or 1 % (common practice, no source). */
function sameWindow(a: FitRow, b: FitRow): boolean {
  const close = (p: number, q: number) => Math.abs(p - q) <= Math.max(0.05, 0.01 * Math.max(Math.abs(p), Math.abs(q)));
  return close(a.windowMinK, b.windowMinK) && close(a.windowMaxK, b.windowMaxK);
}

function fmtK(t: number): string {
  return t >= 100 ? t.toFixed(0) : t >= 10 ? t.toFixed(1) : t.toFixed(2);
}

/**
 * Checks that every named batch and sample belongs to the lab.
 * @throws HttpError 404 naming the ids that are not this lab's (other labs' ids look the same as unknown ones)
 */
export function checkSelection(db: Db, labId: string, batchIds: readonly string[], sampleIds: readonly string[]): void {
  const uniqB = [...new Set(batchIds)];
  const uniqS = [...new Set(sampleIds)];
  if (uniqB.length > 0) {
    const found = new Set(
      db.select({ id: batches.id }).from(batches).where(and(eq(batches.labId, labId), inArray(batches.id, uniqB))).all().map((r) => r.id),
    );
    const missing = uniqB.filter((id) => !found.has(id));
    if (missing.length > 0) throw notFound(`No such batch in this lab: ${missing.join(", ")}`);
  }
  if (uniqS.length > 0) {
    const found = new Set(
      db.select({ id: samples.id }).from(samples).where(and(eq(samples.labId, labId), inArray(samples.id, uniqS))).all().map((r) => r.id),
    );
    const missing = uniqS.filter((id) => !found.has(id));
    if (missing.length > 0) throw notFound(`No such sample in this lab: ${missing.join(", ")}`);
  }
}

function approvedFitRows(db: Db, labId: string, batchIds: readonly string[], sampleIds: readonly string[]): FitRow[] {
  const conditions: SQL[] = [eq(fits.labId, labId), eq(fits.state, "approved")];
  const chosen: SQL[] = [];
  if (batchIds.length > 0) chosen.push(inArray(samples.batchId, [...new Set(batchIds)]));
  if (sampleIds.length > 0) chosen.push(inArray(samples.id, [...new Set(sampleIds)]));
  if (chosen.length > 0) conditions.push(or(...chosen)!);
  return db
    .select({
      fitId: fits.id,
      runId: runs.id,
      runLabel: runs.label,
      runFileName: runs.fileName,
      runAtoms: runs.atomsPerFormulaUnit,
      sampleId: samples.id,
      sampleLabel: samples.label,
      sampleAtoms: samples.atomsPerFormulaUnit,
      batchId: samples.batchId,
      batchCode: batches.code,
      x: samples.compositionX,
      xName: samples.compositionName,
      modelText: sql<string>`${fits.model}`,
      windowMinK: fits.windowMinK,
      windowMaxK: fits.windowMaxK,
      approvedAt: fits.approvedAt,
    })
    .from(fits)
    .innerJoin(runs, eq(runs.id, fits.runId))
    .innerJoin(samples, eq(samples.id, runs.sampleId))
    .leftJoin(batches, eq(batches.id, samples.batchId))
    .where(and(...conditions))
    .orderBy(asc(samples.label), asc(runs.createdAt), asc(fits.approvedAt), asc(fits.id))
    .all();
}

/**
 * The parameters of the given approved fits of a lab, by fit and name. Read with one join on the lab's
 * approved fits (not a list of thousands of ids), then kept to `fitIds`.
 */
function paramsOf(db: Db, labId: string, fitIds: readonly string[]): Map<string, Map<string, ParamRow>> {
  const out = new Map<string, Map<string, ParamRow>>();
  if (fitIds.length === 0) return out;
  const wanted = new Set(fitIds);
  const rows = db
    .select({
      fitId: fitParameters.fitId,
      name: fitParameters.name,
      value: fitParameters.value,
      stderr: fitParameters.stderr,
      stderrMass: fitParameters.stderrMass,
      unit: fitParameters.unit,
    })
    .from(fitParameters)
    .innerJoin(fits, eq(fits.id, fitParameters.fitId))
    .where(and(eq(fits.labId, labId), eq(fits.state, "approved")))
    .all();
  for (const r of rows) {
    if (!wanted.has(r.fitId)) continue;
    let m = out.get(r.fitId);
    if (!m) out.set(r.fitId, (m = new Map()));
    m.set(r.name, r);
  }
  return out;
}

/** θ_D from β of C = γT + βT³: θ_D = (12π⁴ n R / 5β)^(1/3), and σ_θ/θ = σ_β/(3β). */
function thetaFromBeta(beta: ParamRow, atoms: number): { value: number; stat: number | null; sys: number | null } | null {
  if (!(beta.value > 0) || !(atoms > 0)) return null;
  const value = thetaDFromBeta(beta.value, atoms);
  const scale = value / (3 * beta.value);
  return {
    value,
    stat: beta.stderr == null ? null : scale * beta.stderr,
    sys: beta.stderrMass == null ? null : scale * beta.stderrMass,
  };
}

function thetaDOf(p: Map<string, ParamRow> | undefined, atoms: number): number | null {
  if (!p) return null;
  const t = p.get("thetaD");
  if (t) return t.value;
  const b = p.get("beta");
  return b ? (thetaFromBeta(b, atoms)?.value ?? null) : null;
}

function groupOf(r: FitRow, groupBy: CompareGroupBy): { key: string; label: string } {
  if (groupBy === "batch") return r.batchId ? { key: `batch:${r.batchId}`, label: r.batchCode ?? r.batchId } : { key: "batch:none", label: "No batch" };
  return r.x == null ? { key: "x:none", label: "x not set" } : { key: `x:${r.x}`, label: `${r.xName || "x"} = ${r.x}` };
}

const collator = new Intl.Collator("en", { numeric: true, sensitivity: "base" });

/**
 * The comparison table: one row per approved fit that has the parameter (θ_D also from β of γT + βT³),
 * per-group weighted and unweighted statistics, 3σ flags and notes on rows that are not comparable as such.
 * @param db the database
 * @param labId the lab (the caller's membership is checked by the route)
 * @param input parameter name, grouping and the chosen batches and samples (union of the two lists)
 * @returns the result with rows ordered by group, then sample label
 * @throws HttpError 404 when a chosen batch or sample is not this lab's
 * @see J. R. Taylor, An Introduction to Error Analysis, 2nd ed., §7.2 (weighted mean)
 */
export function compareFits(db: Db, labId: string, input: CompareInput): ComparisonResult {
  return compareWithInputs(db, labId, input).result;
}

/** compareFits, with the parameters and atom counts it read (compareCurves needs them too). */
function compareWithInputs(
  db: Db,
  labId: string,
  input: CompareInput,
): { result: ComparisonResult; params: Map<string, Map<string, ParamRow>>; atomsByFit: Map<string, number> } {
  checkSelection(db, labId, input.batchIds, input.sampleIds);
  const fitRows = approvedFitRows(db, labId, input.batchIds, input.sampleIds);
  const params = paramsOf(
    db,
    labId,
    fitRows.map((f) => f.fitId),
  );
  const words = modelWords();

  const available = new Map<string, AvailableParameter>();
  for (const m of params.values()) {
    for (const p of m.values()) {
      const a = available.get(p.name) ?? { name: p.name, unit: p.unit, fits: 0 };
      a.fits += 1;
      available.set(p.name, a);
    }
  }

  const rows: CompareRow[] = [];
  const rowFits = new Map<string, FitRow>();
  let derivedCount = 0;
  for (const f of fitRows) {
    const p = params.get(f.fitId);
    const atoms = f.runAtoms ?? f.sampleAtoms;
    let value: number;
    let unit: string;
    let stat: number | null;
    let sys: number | null;
    let derivedFrom: string | null = null;
    const direct = p?.get(input.parameter);
    if (direct) {
      value = direct.value;
      unit = direct.unit;
      stat = direct.stderr;
      sys = direct.stderrMass;
    } else if (input.parameter === "thetaD" && p?.get("beta")) {
      const t = thetaFromBeta(p.get("beta")!, atoms);
      if (!t) continue;
      ({ value } = t);
      unit = "K";
      stat = t.stat;
      sys = t.sys;
      derivedFrom = "beta";
      derivedCount += 1;
    } else continue;
    const g = groupOf(f, input.groupBy);
    const total = stat == null && sys == null ? null : combineInQuadrature(stat, sys);
    rows.push({
      fitId: f.fitId,
      runId: f.runId,
      runLabel: f.runLabel || f.runFileName,
      sampleId: f.sampleId,
      sampleLabel: f.sampleLabel,
      batchId: f.batchId,
      batchCode: f.batchCode,
      x: f.x,
      xName: f.xName,
      model: words(f.modelText).label,
      modelKey: words(f.modelText).key,
      windowMinK: f.windowMinK,
      windowMaxK: f.windowMaxK,
      parameter: input.parameter,
      value,
      unit,
      sigmaStat: stat,
      sigmaSys: sys,
      sigmaTotal: total != null && total > 0 ? total : null,
      derivedFrom,
      groupKey: g.key,
      deviationSigma: null,
      flagged: false,
      approvedAt: f.approvedAt == null ? null : new Date(f.approvedAt).toISOString(),
    });
    rowFits.set(f.fitId, f);
  }

  const byGroup = new Map<string, { label: string; batchId: string | null; x: number | null; rows: CompareRow[] }>();
  for (const r of rows) {
    const f = rowFits.get(r.fitId)!;
    const g = groupOf(f, input.groupBy);
    const entry = byGroup.get(g.key) ?? { label: g.label, batchId: input.groupBy === "batch" ? f.batchId : null, x: input.groupBy === "x" ? f.x : null, rows: [] };
    entry.rows.push(r);
    byGroup.set(g.key, entry);
  }
  const orderedKeys = [...byGroup.keys()].sort((a, b) => {
    const ga = byGroup.get(a)!;
    const gb = byGroup.get(b)!;
    const noneA = a.endsWith(":none") ? 1 : 0;
    const noneB = b.endsWith(":none") ? 1 : 0;
    if (noneA !== noneB) return noneA - noneB;
    if (input.groupBy === "x") return (ga.x ?? 0) - (gb.x ?? 0);
    return collator.compare(ga.label, gb.label);
  });

  const groups: CompareGroup[] = [];
  const notes: CompareNote[] = [];
  const unitOf = rows[0]?.unit ?? available.get(input.parameter)?.unit ?? null;
  let noSigma = 0;
  for (const key of orderedKeys) {
    const g = byGroup.get(key)!;
    const weighted = g.rows.filter((r) => r.sigmaTotal != null);
    noSigma += g.rows.length - weighted.length;
    const wm = weighted.length > 0 ? weightedMean(weighted.map((r) => r.value), weighted.map((r) => r.sigmaTotal!)) : null;
    if (wm) {
      for (const r of weighted) {
        r.deviationSigma = Math.abs(r.value - wm.mean) / r.sigmaTotal!;
        r.flagged = weighted.length > 1 && r.deviationSigma > OUTLIER_THRESHOLD_SIGMA;
      }
    }
    if (weighted.length === 2 && weighted.every((r) => r.flagged)) {
      notes.push({
        groupKey: key,
        kind: "pair",
        message: `${g.label}: its two fits disagree by more than ${OUTLIER_THRESHOLD_SIGMA}σ; with two fits the rule flags both and cannot say which one is off.`,
      });
    }
    const um = unweightedMean(g.rows.map((r) => r.value));
    const fitsInGroup = g.rows.map((r) => rowFits.get(r.fitId)!);
    const modelSet = [...new Set(g.rows.map((r) => r.model))];
    const modelsDiffer = new Set(g.rows.map((r) => r.modelKey)).size > 1;
    const windowsDiffer = fitsInGroup.some((f) => !sameWindow(f, fitsInGroup[0]));
    if (modelsDiffer) {
      notes.push({
        groupKey: key,
        kind: "models",
        message: `${g.label}: the rows used different models (${modelSet.join("; ")}), so their values are not comparable as such.`,
      });
    }
    if (windowsDiffer) {
      const windows = [...new Set(fitsInGroup.map((f) => `${fmtK(f.windowMinK)}–${fmtK(f.windowMaxK)} K`))];
      notes.push({
        groupKey: key,
        kind: "windows",
        message: `${g.label}: the fit windows differ (${windows.join("; ")}), so their values are not comparable as such.`,
      });
    }
    groups.push({
      key,
      label: g.label,
      batchId: g.batchId,
      x: g.x,
      n: g.rows.length,
      nWeighted: weighted.length,
      weightedMean: wm?.mean ?? null,
      weightedSigma: wm?.sigma ?? null,
      reducedChiSquare: wm && Number.isFinite(wm.reducedChiSquare) ? wm.reducedChiSquare : null,
      unweightedMean: um.mean,
      spread: Number.isFinite(um.spread) ? um.spread : null,
      standardError: Number.isFinite(um.standardError) ? um.standardError : null,
      flaggedCount: g.rows.filter((r) => r.flagged).length,
      modelsDiffer,
      windowsDiffer,
    });
  }
  const allModels = [...new Set(rows.map((r) => r.modelKey))];
  if (allModels.length > 1 && groups.length > 1) {
    notes.unshift({
      groupKey: null,
      kind: "models",
      message: `The table mixes ${allModels.length} models (${[...new Set(rows.map((r) => r.model))].join("; ")}); compare rows fitted with the same model.`,
    });
  }
  if (rows.length > 1 && rows.some((r) => !sameWindow(rowFits.get(r.fitId)!, rowFits.get(rows[0].fitId)!)) && groups.length > 1) {
    notes.push({ groupKey: null, kind: "windows", message: "The fit windows are not the same across the table; compare rows fitted over the same window." });
  }
  if (derivedCount > 0) {
    notes.push({
      groupKey: null,
      kind: "derived",
      message: `${derivedCount} row${derivedCount > 1 ? "s" : ""} give θ_D from β of the low-temperature expansion γT + βT³, θ_D = (12π⁴nR/5β)^(1/3), not from a Debye-function fit.`,
    });
  }
  if (noSigma > 0) {
    notes.push({
      groupKey: null,
      kind: "no-sigma",
      message: `${noSigma} row${noSigma > 1 ? "s have" : " has"} no uncertainty (a fixed parameter or a singular fit) and ${noSigma > 1 ? "are" : "is"} left out of the weighted means.`,
    });
  }

  const ordered = orderedKeys.flatMap((k) => byGroup.get(k)!.rows);
  const atomsByFit = new Map(fitRows.map((f) => [f.fitId, f.runAtoms ?? f.sampleAtoms] as const));
  const result: ComparisonResult = {
    parameter: input.parameter,
    unit: unitOf,
    groupBy: input.groupBy,
    thresholdSigma: OUTLIER_THRESHOLD_SIGMA,
    rows: ordered,
    groups,
    notes,
    availableParameters: [...available.values()].sort((a, b) => collator.compare(a.name, b.name)),
  };
  return { result, params, atomsByFit };
}

/** Most points per curve sent for plotting; display only, never used to compute anything. */
export const CURVE_DISPLAY_POINTS = 600;

/**
 * The reduced, unmasked points of every run in a comparison, for the collapse plot C/(3nR) against
 * T/θ_D and the C/T³ overlay. Decimated by even stride above CURVE_DISPLAY_POINTS (first and last kept).
 * @param db the database
 * @param labId the lab
 * @param input as for compareFits
 * @returns one curve per row of the comparison, with θ_D (fitted or from β) and γ of that fit
 * @throws HttpError 404 as compareFits
 */
export function compareCurves(db: Db, labId: string, input: CompareInput): CompareCurve[] {
  const { result, params, atomsByFit } = compareWithInputs(db, labId, input);
  return result.rows.map((r) => {
    const pts = db
      .select({ t: runPoints.temperatureK, cp: runPoints.cp })
      .from(runPoints)
      .where(and(eq(runPoints.runId, r.runId), eq(runPoints.masked, false)))
      .orderBy(asc(runPoints.idx))
      .all();
    const decimated = pts.length > CURVE_DISPLAY_POINTS;
    const shown = decimated
      ? Array.from({ length: CURVE_DISPLAY_POINTS }, (_, i) => pts[Math.round((i * (pts.length - 1)) / (CURVE_DISPLAY_POINTS - 1))])
      : pts;
    const atoms = atomsByFit.get(r.fitId) ?? 1;
    const p = params.get(r.fitId);
    return {
      fitId: r.fitId,
      runId: r.runId,
      label: `${r.sampleLabel} · ${r.runLabel}`,
      groupKey: r.groupKey,
      atomsPerFormulaUnit: atoms,
      thetaD: thetaDOf(p, atoms),
      gamma: p?.get("gamma")?.value ?? null,
      decimated,
      points: shown,
    };
  });
}

/** Cells a spreadsheet would read as a formula (OWASP "CSV Injection"): =, +, -, @, tab, carriage return. */
const FORMULA_LEAD = /^[=+\-@\t\r]/;

/**
 * One CSV cell (RFC 4180 quoting). Numbers are written as they are (a minus sign stays a number); text
 * that a spreadsheet would run as a formula gets a leading apostrophe.
 * @param v the value; null and undefined give an empty cell
 */
export function csvCell(v: string | number | boolean | null | undefined): string {
  if (v == null) return "";
  if (typeof v === "number") return Number.isFinite(v) ? String(v) : "";
  if (typeof v === "boolean") return v ? "true" : "false";
  const s = FORMULA_LEAD.test(v) ? `'${v}` : v;
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** Column names of the comparison CSV, in order (datapackage.json describes each). */
export const COMPARISON_CSV_COLUMNS = [
  "group",
  "batch",
  "sample",
  "x_name",
  "x",
  "run",
  "fit_id",
  "model",
  "window_min_K",
  "window_max_K",
  "parameter",
  "value",
  "unit",
  "sigma_stat",
  "sigma_sys",
  "sigma_total",
  "derived_from",
  "deviation_sigma",
  "flagged",
  "group_n",
  "group_weighted_mean",
  "group_weighted_sigma",
  "group_unweighted_mean",
  "group_spread",
] as const;

/**
 * The comparison table as CSV (UTF-8, "\n" line ends, header first), one line per row with its group's
 * statistics repeated so each line stands alone.
 * @param result a comparison from compareFits
 * @returns the CSV text
 */
export function comparisonCsv(result: ComparisonResult): string {
  const groups = new Map(result.groups.map((g) => [g.key, g]));
  const lines = [COMPARISON_CSV_COLUMNS.join(",")];
  for (const r of result.rows) {
    const g = groups.get(r.groupKey)!;
    lines.push(
      [
        g.label,
        r.batchCode,
        r.sampleLabel,
        r.xName,
        r.x,
        r.runLabel,
        r.fitId,
        r.model,
        r.windowMinK,
        r.windowMaxK,
        r.parameter,
        r.value,
        r.unit,
        r.sigmaStat,
        r.sigmaSys,
        r.sigmaTotal,
        r.derivedFrom,
        r.deviationSigma,
        r.flagged,
        g.n,
        g.weightedMean,
        g.weightedSigma,
        g.unweightedMean,
        g.spread,
      ]
        .map(csvCell)
        .join(","),
    );
  }
  return lines.join("\n") + "\n";
}
