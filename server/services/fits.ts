import { createHash, randomUUID } from "node:crypto";
import { readFileSync } from "node:fs";
import { and, asc, desc, eq, sql } from "drizzle-orm";
import {
  DEFAULT_RANK_CANDIDATES,
  type CreateFitBody,
  type PreviewFitBody,
  type RankBody,
  type RankEntry,
  type RankResult,
  type CurvePoint,
  type Fit,
  type FitOutcome,
  type ResidualPoint,
  type FitParameter,
  type FitParams,
  type FitSummary,
  type FitWarning,
  type ModelDefinitionInput,
  type PersonRef,
  type RunParams,
  type ThermoTable,
  type ThetaDCurve,
} from "@shared/schemas/fits";
import type { Db } from "../db/client";
import { fitParameters, fits, runPoints, runs, samples, users } from "../db/schema";
import { HttpError, notFound, unprocessable } from "../http-error";
import { audit } from "./audit";
import { buildComposite } from "@shared/physics/composite";
import type { CompositeModel } from "@shared/physics/model-types";
import { fitHeatCapacity, type HeatCapacityFit } from "@shared/fitting/fit-model";
import { massSystematic } from "@shared/fitting/mass-systematic";
import { thermoTable } from "@shared/physics/thermo";
import { thetaDFromBeta, thetaDFromPoint } from "@shared/physics/theta-d";
import { monotoneInterpolator } from "@shared/numerics/monotone-interpolation";

/** The version stored with every fit: package.json "version" of this build. */
export const SOFTWARE_VERSION: string = (
  JSON.parse(readFileSync(new URL("../../package.json", import.meta.url), "utf8")) as { version: string }
).version;

/** One reduced point as the fit uses it (SI: K and J/(mol·K) per mole of formula units). */
export interface FitInputPoint {
  temperatureK: number;
  cp: number;
  sigma: number;
}

/** The header line of the canonical fit input; part of the hashed text, and versioned so the rule can change visibly. */
export const CANONICAL_INPUT_HEADER = "thetafold-fit-input v1\nT_K,Cp_J_per_mol_K,sigma_J_per_mol_K\n";

/** 17 significant digits (enough to round-trip any float64), exponent with sign and without leading zeros. */
function canonicalNumber(x: number): string {
  return x.toExponential(16);
}

/**
 * The exact text whose SHA-256 a fit stores as `inputSha256`, so anyone holding the reduced table can
 * check which points a fit used. UTF-8, lines ending in "\n":
 *
 *     thetafold-fit-input v1
 *     T_K,Cp_J_per_mol_K,sigma_J_per_mol_K
 *     <T>,<Cp>,<sigma>          one line per point used, in the run's point order (ascending T)
 *
 * Points used are those with window[0] ≤ T ≤ window[1] that were not masked when the fit ran. σ is the
 * σ the fit weighted with; the field is empty when the fit used equal weights (a run without σ). Each number is written with 17 significant digits in exponent form, as
 * JavaScript's `x.toExponential(16)`: `2.9814999999999998e+2`, `1.0000000000000000e-3`. In Python:
 * `m, e = f"{x:.16e}".split("e"); f"{m}e{int(e):+d}"`.
 * @param points the points used, in order (sigma NaN for equal weights)
 * @returns the canonical text
 */
export function canonicalFitInput(points: readonly FitInputPoint[]): string {
  let out = CANONICAL_INPUT_HEADER;
  for (const p of points) {
    const sigma = Number.isFinite(p.sigma) ? canonicalNumber(p.sigma) : "";
    out += `${canonicalNumber(p.temperatureK)},${canonicalNumber(p.cp)},${sigma}\n`;
  }
  return out;
}

/**
 * SHA-256 (lowercase hex) of canonicalFitInput(points).
 * @param points the points used, in order
 * @returns 64 hex digits
 */
export function fitInputSha256(points: readonly FitInputPoint[]): string {
  return createHash("sha256").update(canonicalFitInput(points), "utf8").digest("hex");
}

/* ------------------------------------------------------------------------------------------------
 * Loading a run and choosing the points of a window
 * ---------------------------------------------------------------------------------------------- */

/** What the fit service needs to know about a run. */
export interface RunForFit {
  id: string;
  labId: string;
  label: string;
  kind: "sample" | "addenda";
  rawFileSha256: string;
  atomsPerFormulaUnit: number;
  /** Sample mass used in the reduction (mg), null when the data were already specific or molar. */
  massMg: number | null;
  massSigmaMg: number;
  /** Column map and units the run was read with (decides whether the sample mass entered the molar Cp). */
  mapping: unknown;
  points: { idx: number; temperatureK: number; cp: number; sigma: number | null; masked: boolean }[];
}

/**
 * Loads a run of the lab with its reduced points, in point order.
 * @param db the database
 * @param labId the lab (a run of another lab is 404)
 * @param runId the run
 * @throws HttpError 404 when the run is not in this lab
 */
export function loadRunForFit(db: Db, labId: string, runId: string): RunForFit {
  const run = db
    .select({
      id: runs.id,
      labId: runs.labId,
      label: runs.label,
      kind: runs.kind,
      fileSha256: runs.fileSha256,
      runAtoms: runs.atomsPerFormulaUnit,
      runMassMg: runs.massMg,
      sampleAtoms: samples.atomsPerFormulaUnit,
      massSigmaMg: samples.massSigmaMg,
      mapping: runs.mapping,
    })
    .from(runs)
    .leftJoin(samples, eq(samples.id, runs.sampleId))
    .where(and(eq(runs.id, runId), eq(runs.labId, labId)))
    .get();
  if (!run) throw notFound("No such run in this lab");
  const points = db
    .select({ idx: runPoints.idx, temperatureK: runPoints.temperatureK, cp: runPoints.cp, sigma: runPoints.cpSigma, masked: runPoints.masked })
    .from(runPoints)
    .where(eq(runPoints.runId, runId))
    .orderBy(asc(runPoints.idx))
    .all();
  return {
    id: run.id,
    labId: run.labId,
    label: run.label,
    kind: run.kind,
    rawFileSha256: run.fileSha256,
    atomsPerFormulaUnit: run.runAtoms ?? run.sampleAtoms ?? Number.NaN,
    massMg: run.runMassMg ?? null,
    massSigmaMg: run.massSigmaMg ?? 0,
    mapping: run.mapping,
    points,
  };
}

/* ------------------------------------------------------------------------------------------------
 * Stored fits: mapping rows, history, approval
 * ---------------------------------------------------------------------------------------------- */

type FitRow = typeof fits.$inferSelect;
type FitParameterRow = typeof fitParameters.$inferSelect;

/** What a stored fit keeps in its `result` column besides the columns of its own. */
interface StoredResult {
  parameterOrder: string[];
  freeParameters: string[];
  warnings: FitWarning[];
  weighting: string;
  atomsPerFormulaUnit: number;
  rawFileSha256: string;
  iterations: number | null;
  elapsedMs: number;
  /** Run point indices in the window that were masked when the fit ran (left out). */
  maskedIdx: number[];
  /** First and last run point index inside the window. */
  windowIdx: [number, number] | null;
  /** Start values the engine used, by parameter name. */
  startValues: Record<string, number>;
  /** Mass and σ_m the systematic refit used (mg), null when none. */
  massMg: number | null;
  massSigmaMg: number | null;
}

function people(db: Db, ids: (string | null)[]): Map<string, PersonRef> {
  const wanted = [...new Set(ids.filter((x): x is string => x !== null))];
  const out = new Map<string, PersonRef>();
  for (const id of wanted) {
    const u = db.select({ id: users.id, displayName: users.displayName }).from(users).where(eq(users.id, id)).get();
    if (u) out.set(u.id, u);
  }
  return out;
}

const iso = (ms: number | null) => (ms === null ? null : new Date(ms).toISOString());

function mapParameters(rows: FitParameterRow[], order: string[]): FitParameter[] {
  const byName = new Map(rows.map((r) => [r.name, r]));
  const names = order.length ? order.filter((n) => byName.has(n)) : rows.map((r) => r.name);
  return names.map((n) => {
    const r = byName.get(n)!;
    return {
      name: r.name,
      value: r.value,
      stderr: r.stderr,
      stderrUnscaled: r.stderrUnscaled,
      stderrMass: r.stderrMass,
      unit: r.unit,
      fixed: r.fixed,
    };
  });
}

function mapSummary(row: FitRow, params: FitParameterRow[], who: Map<string, PersonRef>): FitSummary {
  const result = row.result as unknown as StoredResult;
  return {
    id: row.id,
    labId: row.labId,
    runId: row.runId,
    state: row.state,
    model: row.model as unknown as ModelDefinitionInput,
    window: [row.windowMinK, row.windowMaxK],
    pointsUsed: row.pointsUsed,
    maskedExcluded: row.maskedExcluded,
    converged: row.converged,
    stopReason: row.stopReason,
    iterations: result.iterations,
    chiSquare: row.chiSquare,
    reducedChiSquare: row.reducedChiSquare,
    dof: row.dof,
    aic: row.aic,
    bic: row.bic,
    parameters: mapParameters(params, result.parameterOrder),
    freeParameters: result.freeParameters,
    correlation: row.correlation.length ? row.correlation : null,
    warnings: result.warnings,
    weighting: result.weighting,
    atomsPerFormulaUnit: result.atomsPerFormulaUnit,
    inputSha256: row.inputSha256,
    rawFileSha256: result.rawFileSha256,
    softwareVersion: row.softwareVersion,
    elapsedMs: result.elapsedMs,
    notes: row.notes,
    createdBy: row.createdBy ? (who.get(row.createdBy) ?? null) : null,
    createdAt: new Date(row.createdAt).toISOString(),
    approvedBy: row.approvedBy ? (who.get(row.approvedBy) ?? null) : null,
    approvedAt: iso(row.approvedAt),
    supersededBy: row.supersededBy,
    supersededAt: iso(row.supersededAt),
    maskedPointIndices: result.maskedIdx,
  };
}

function fitRow(db: Db, labId: string, fitId: string): FitRow {
  const row = db.select().from(fits).where(and(eq(fits.id, fitId), eq(fits.labId, labId))).get();
  if (!row) throw notFound("No such fit in this lab");
  return row;
}

function parameterRows(db: Db, fitId: string): FitParameterRow[] {
  return db.select().from(fitParameters).where(eq(fitParameters.fitId, fitId)).all();
}

/**
 * A run's fits, newest first, in every state (the history stays readable: nothing is overwritten).
 * @param db the database
 * @param params lab and run
 * @returns summaries without residuals, curve and covariance
 * @throws HttpError 404 when the run is not in the lab
 */
export function listRunFits(db: Db, params: RunParams): FitSummary[] {
  const run = db.select({ id: runs.id }).from(runs).where(and(eq(runs.id, params.runId), eq(runs.labId, params.labId))).get();
  if (!run) throw notFound("No such run in this lab");
  const rows = db
    .select()
    .from(fits)
    .where(eq(fits.runId, params.runId))
    .orderBy(desc(fits.createdAt), desc(sql`rowid`))
    .all();
  const who = people(db, rows.flatMap((r) => [r.createdBy, r.approvedBy]));
  return rows.map((r) => mapSummary(r, parameterRows(db, r.id), who));
}

/**
 * Approves a draft fit. In one transaction the run's previously approved fit (if any) becomes
 * superseded by this one, and an audit row is written.
 * @param db the database
 * @param params lab and fit
 * @param userId the approving lead
 * @returns the approved fit
 * @throws HttpError 404 unknown fit; 409 when the fit is already approved or superseded; 422 when it did not converge
 */
export function approveFit(db: Db, params: FitParams, userId: string): Fit {
  db.transaction((tx) => {
    const row = fitRow(tx as unknown as Db, params.labId, params.fitId);
    if (row.state === "approved") throw new HttpError(409, "CONFLICT", "This fit is already approved");
    if (row.state === "superseded") {
      throw new HttpError(409, "CONFLICT", "This fit was superseded by a later approval; save a new fit to approve it again");
    }
    if (!row.converged) throw unprocessable("A fit that did not converge cannot be approved; refit it first");
    const now = Date.now();
    const previous = tx
      .select({ id: fits.id })
      .from(fits)
      .where(and(eq(fits.runId, row.runId), eq(fits.state, "approved")))
      .all();
    for (const p of previous) {
      tx.update(fits).set({ state: "superseded", supersededBy: row.id, supersededAt: now }).where(eq(fits.id, p.id)).run();
    }
    tx.update(fits).set({ state: "approved", approvedBy: userId, approvedAt: now }).where(eq(fits.id, row.id)).run();
    audit(tx as unknown as Db, {
      labId: params.labId,
      userId,
      action: "fit.approved",
      target: `fit ${row.id} of run ${row.runId}`,
      details: { fitId: row.id, runId: row.runId, superseded: previous.map((p) => p.id) },
    });
  });
  return getFit(db, params);
}

/* ------------------------------------------------------------------------------------------------
 * Running the engine on a run's window
 * ---------------------------------------------------------------------------------------------- */

const TOTAL_HEAT_CAPACITY_UNITS = new Set(["J/K", "mJ/K", "uJ/K"]);

/** σ_m/m enters the molar Cp only when the file gave total heat capacity (J/K, mJ/K, µJ/K). */
function massForSystematic(run: RunForFit, mapping: unknown): { massMg: number; massSigmaMg: number } | null {
  const unit = (mapping as { units?: { heatCapacity?: string } } | null)?.units?.heatCapacity;
  if (!unit || !TOTAL_HEAT_CAPACITY_UNITS.has(unit)) return null;
  // σ_m ≥ m leaves no mass to refit at m − σ_m: no systematic then.
  if (run.massMg === null || !(run.massMg > 0) || !(run.massSigmaMg > 0) || !(run.massSigmaMg < run.massMg)) return null;
  return { massMg: run.massMg, massSigmaMg: run.massSigmaMg };
}

interface EngineInput {
  /** Every point of the run, in point order, with the mask as the fit sees it. */
  temperatureK: number[];
  cp: number[];
  /** σ used for every point, or null for equal weights. */
  sigma: number[] | null;
  masked: boolean[];
  idx: number[];
  weighting: string;
  extraWarnings: string[];
}

/**
 * σ per point: the stated σ when every unmasked point of the window has one; equal weights when none
 * has; when only some have, the rest get the median relative σ of those that have one (and a warning).
 */
function engineInput(run: RunForFit, window: readonly [number, number], maskedIdx?: ReadonlySet<number>): EngineInput {
  const pts = run.points;
  const masked = pts.map((p) => (maskedIdx ? maskedIdx.has(p.idx) : p.masked));
  const inWindow = pts.filter((p, i) => !masked[i] && p.temperatureK >= window[0] && p.temperatureK <= window[1]);
  const withSigma = inWindow.filter((p) => p.sigma !== null && p.sigma > 0);
  const extraWarnings: string[] = [];
  let sigma: number[] | null;
  let weighting: string;
  if (withSigma.length === inWindow.length && inWindow.length > 0) {
    sigma = pts.map((p) => (p.sigma !== null && p.sigma > 0 ? p.sigma : Math.abs(p.cp) * 0.01 || 1e-12));
    weighting = "stated σ of each point";
  } else if (withSigma.length === 0) {
    sigma = null;
    weighting = "equal weights (the run has no σ); uncertainties from the scatter";
  } else {
    const rel = withSigma.map((p) => (p.sigma as number) / Math.abs(p.cp)).filter(Number.isFinite).sort((a, b) => a - b);
    const median = rel.length ? rel[Math.floor(rel.length / 2)] : 0.01;
    sigma = pts.map((p) => (p.sigma !== null && p.sigma > 0 ? p.sigma : Math.max(median * Math.abs(p.cp), 1e-12)));
    weighting = `stated σ; ${inWindow.length - withSigma.length} points without one given the median relative σ ${median.toPrecision(3)}`;
    extraWarnings.push(
      `${inWindow.length - withSigma.length} of ${inWindow.length} points in the window have no σ; they were weighted with the median relative σ of the others (${(median * 100).toPrecision(3)} %).`,
    );
  }
  return {
    temperatureK: pts.map((p) => p.temperatureK),
    cp: pts.map((p) => p.cp),
    sigma,
    masked,
    idx: pts.map((p) => p.idx),
    weighting,
    extraWarnings,
  };
}

/** The smooth curve of the model across the window: 200 points, log-spaced when the window spans a decade or more. */
function modelCurve(model: CompositeModel, params: readonly number[], window: readonly [number, number]): CurvePoint[] {
  const [a, b] = window;
  const count = 200;
  const logSpaced = b / a >= 10;
  const out: CurvePoint[] = [];
  for (let i = 0; i < count; i++) {
    const f = i / (count - 1);
    const T = logSpaced ? a * (b / a) ** f : a + (b - a) * f;
    const parts: Record<string, number> = {};
    for (const part of model.parts(params, T)) parts[part.label] = part.value;
    out.push({ temperatureK: T, total: model.evaluate(params, T), parts });
  }
  return out;
}

function subMatrix(m: readonly (readonly (number | null)[])[] | null, keep: readonly number[]): (number | null)[][] | null {
  if (m === null) return null;
  return keep.map((i) => keep.map((j) => m[i][j]));
}

/** An engine run: the outcome plus what a stored fit needs to remember. */
interface EngineRun {
  outcome: FitOutcome;
  stored: StoredResult;
  covarianceUnscaled: number[][] | null;
}

/**
 * Fits `def` to the run's points in the window through the shared engine (fitHeatCapacity), then the
 * mass-systematic refits, residuals and curve.
 * @throws HttpError 422 when the engine refuses (too few points for the free parameters, no usable start…)
 */
function runEngine(
  run: RunForFit,
  def: ModelDefinitionInput,
  window: readonly [number, number],
  opts: { maskedIdx?: ReadonlySet<number>; withMass?: boolean } = {},
): EngineRun {
  const { maskedIdx, withMass = true } = opts;
  if (run.kind !== "sample") throw unprocessable("This is an addenda run (total heat capacity of the platform); fit the sample runs it was subtracted from");
  const n = run.atomsPerFormulaUnit;
  if (!(n > 0)) throw unprocessable("The run has no atom count per formula unit; set the sample's formula or atom count first");
  const input = engineInput(run, window, maskedIdx);
  const started = performance.now();
  let model: CompositeModel;
  let fit: HeatCapacityFit;
  try {
    model = buildComposite(def, n);
    fit = fitHeatCapacity(
      { temperatureK: input.temperatureK, cp: input.cp, sigma: input.sigma, masked: input.masked },
      def,
      { atomsPerFormulaUnit: n, windowK: [window[0], window[1]] },
    );
  } catch (err) {
    if (err instanceof RangeError || err instanceof TypeError) throw unprocessable(capitalise(err.message));
    throw err;
  }
  const mass = withMass ? massForSystematic(run, run.mapping) : null;
  const massErrors = mass ? massErrorsOf(input, def, n, window, mass, fit) : fit.parameters.map(() => null);
  const elapsedMs = performance.now() - started;

  const usedPoints: FitInputPoint[] = [];
  const residuals: ResidualPoint[] = [];
  // Equal weights: residuals are normalised by the scatter s = √(χ²/dof), the σ the fit implies.
  const scatter = input.sigma === null ? Math.sqrt(fit.chiSquare / Math.max(1, fit.dof)) : 1;
  fit.pointsUsed.forEach((i, k) => {
    const s = input.sigma === null ? scatter : input.sigma[i];
    usedPoints.push({ temperatureK: input.temperatureK[i], cp: input.cp[i], sigma: input.sigma === null ? Number.NaN : input.sigma[i] });
    const r = fit.residuals[k];
    residuals.push({ temperatureK: input.temperatureK[i], normalized: s > 0 ? r / s : 0 });
  });
  const inWindowIdx = input.idx.filter((_, i) => input.temperatureK[i] >= window[0] && input.temperatureK[i] <= window[1]);
  const maskedInWindow = input.idx.filter((_, i) => input.masked[i] && input.temperatureK[i] >= window[0] && input.temperatureK[i] <= window[1]);

  const free = fit.parameters.map((p, j) => (p.fixed ? -1 : j)).filter((j) => j >= 0);
  const parameters: FitParameter[] = fit.parameters.map((p, j) => ({
    name: p.name,
    value: p.value,
    stderr: p.stdError,
    stderrUnscaled: p.stdErrorUnscaled,
    stderrMass: massErrors[j],
    unit: p.unit,
    fixed: p.fixed,
  }));
  const warnings = [...input.extraWarnings, ...fit.warnings];
  if (withMass && mass === null && massForSystematic({ ...run, massSigmaMg: 1 }, run.mapping) !== null) {
    warnings.push("The sample's mass uncertainty is zero, so no mass systematic is given; enter σ_m on the sample to get one.");
  }
  const startValues: Record<string, number> = {};
  fit.parameterNames.forEach((name, j) => (startValues[name] = fit.startValues[j]));
  const stored: StoredResult = {
    parameterOrder: fit.parameterNames,
    freeParameters: free.map((j) => fit.parameterNames[j]),
    warnings,
    weighting: input.weighting,
    atomsPerFormulaUnit: n,
    rawFileSha256: run.rawFileSha256,
    iterations: fit.iterations,
    elapsedMs,
    maskedIdx: maskedInWindow,
    windowIdx: inWindowIdx.length ? [inWindowIdx[0], inWindowIdx[inWindowIdx.length - 1]] : null,
    startValues,
    massMg: mass?.massMg ?? null,
    massSigmaMg: mass?.massSigmaMg ?? null,
  };
  const covariance = subMatrix(fit.covariance, free) as number[][] | null;
  const outcome: FitOutcome = {
    model: def,
    window: [window[0], window[1]],
    pointsUsed: fit.pointsUsed.length,
    maskedExcluded: fit.maskedExcluded,
    converged: fit.converged,
    stopReason: fit.stopReason,
    iterations: fit.iterations,
    chiSquare: fit.chiSquare,
    reducedChiSquare: fit.reducedChiSquare,
    dof: fit.dof,
    aic: fit.aic,
    bic: fit.bic,
    parameters,
    freeParameters: stored.freeParameters,
    covariance,
    correlation: subMatrix(fit.correlation, free),
    warnings,
    weighting: input.weighting,
    atomsPerFormulaUnit: n,
    inputSha256: fitInputSha256(usedPoints),
    rawFileSha256: run.rawFileSha256,
    softwareVersion: SOFTWARE_VERSION,
    residuals,
    curve: modelCurve(model, fit.params, window),
    elapsedMs,
  };
  return { outcome, stored, covarianceUnscaled: subMatrix(fit.covarianceUnscaled, free) as number[][] | null };
}

const capitalise = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

/**
 * Systematic uncertainty of each parameter from the sample mass, by the shared refit at m ± σ_m
 * (shared/fitting/mass-systematic.ts), started from the nominal solution; fixed parameters get null.
 */
function massErrorsOf(
  input: EngineInput,
  def: ModelDefinitionInput,
  n: number,
  window: readonly [number, number],
  mass: { massMg: number; massSigmaMg: number },
  nominal: HeatCapacityFit,
): (number | null)[] {
  const { systematic } = massSystematic(
    { temperatureK: input.temperatureK, cp: input.cp, sigma: input.sigma, masked: input.masked },
    def,
    { atomsPerFormulaUnit: n, windowK: [window[0], window[1]], maxStarts: 1 },
    { massMg: mass.massMg, sigmaMassMg: mass.massSigmaMg },
    nominal,
  );
  return nominal.parameters.map((p, j) => (p.fixed ? null : systematic[j]));
}

/* ------------------------------------------------------------------------------------------------
 * The service functions the routes call
 * ---------------------------------------------------------------------------------------------- */

/**
 * Fits a model to a run's window without storing anything.
 * @param db the database
 * @param params lab and run
 * @param body model definition and window [tmin, tmax] in K
 * @returns the outcome with residuals and the fitted curve
 * @throws HttpError 404 unknown run; 422 when the engine refuses (fewer points than free parameters, …)
 */
export function previewFit(db: Db, params: RunParams, body: PreviewFitBody): FitOutcome {
  const run = loadRunForFit(db, params.labId, params.runId);
  return runEngine(run, body.model, body.window).outcome;
}

/**
 * Fits and stores a draft: the fit row and one fit_parameters row per parameter, in one transaction.
 * A fit that does not converge is stored only with saveUnconverged (and stays flagged: converged false).
 * @param db the database
 * @param params lab and run
 * @param body model, window (K), optional notes and saveUnconverged
 * @param userId who saves it
 * @returns the stored fit
 * @throws HttpError 404 unknown run; 422 engine refusal, or not converged without saveUnconverged
 */
export function createFit(db: Db, params: RunParams, body: CreateFitBody, userId: string): Fit {
  const run = loadRunForFit(db, params.labId, params.runId);
  const { outcome, stored } = runEngine(run, body.model, body.window);
  if (!outcome.converged && body.saveUnconverged !== true) {
    throw unprocessable(
      `The fit did not converge (${outcome.stopReason}), so it was not saved. Try other start values, a narrower window or fewer free parameters, or save it knowingly (saveUnconverged).`,
      [{ path: "saveUnconverged", message: "set true to store a fit that did not converge; it is flagged and cannot be approved" }],
    );
  }
  const id = randomUUID();
  const now = Date.now();
  db.transaction((tx) => {
    tx.insert(fits)
      .values({
        id,
        labId: params.labId,
        runId: params.runId,
        state: "draft",
        model: body.model as unknown as Record<string, unknown>,
        windowMinK: body.window[0],
        windowMaxK: body.window[1],
        pointsUsed: outcome.pointsUsed,
        maskedExcluded: outcome.maskedExcluded,
        converged: outcome.converged,
        stopReason: outcome.stopReason,
        chiSquare: outcome.chiSquare,
        reducedChiSquare: outcome.reducedChiSquare,
        dof: outcome.dof,
        aic: outcome.aic,
        bic: outcome.bic,
        covariance: outcome.covariance ?? [],
        correlation: (outcome.correlation ?? []) as number[][],
        result: stored as unknown as Record<string, unknown>,
        inputSha256: outcome.inputSha256,
        softwareVersion: outcome.softwareVersion,
        notes: body.notes ?? "",
        createdBy: userId,
        createdAt: now,
      })
      .run();
    tx.insert(fitParameters)
      .values(
        outcome.parameters.map((p) => ({
          fitId: id,
          name: p.name,
          value: p.value,
          stderr: p.stderr,
          stderrUnscaled: p.stderrUnscaled,
          stderrMass: p.stderrMass,
          unit: p.unit,
          fixed: p.fixed,
        })),
      )
      .run();
  });
  return getFit(db, { labId: params.labId, fitId: id });
}

/** The points a stored fit used, rebuilt from the run and the mask the fit saw. */
function storedInput(run: RunForFit, row: FitRow): { maskedIdx: Set<number>; window: [number, number] } {
  const result = row.result as unknown as StoredResult;
  return { maskedIdx: new Set(result.maskedIdx), window: [row.windowMinK, row.windowMaxK] };
}

/**
 * One stored fit with its residuals and fitted curve, recomputed from the stored parameters on the
 * points it used (the run's points are never altered; the mask the fit saw is stored with it).
 * @param db the database
 * @param params lab and fit
 * @returns the fit
 * @throws HttpError 404 unknown fit
 */
export function getFit(db: Db, params: FitParams): Fit {
  const row = fitRow(db, params.labId, params.fitId);
  const paramRows = parameterRows(db, row.id);
  const summary = mapSummary(row, paramRows, people(db, [row.createdBy, row.approvedBy]));
  const run = loadRunForFit(db, row.labId, row.runId);
  const { maskedIdx, window } = storedInput(run, row);
  const input = engineInput(run, window, maskedIdx);
  const model = buildComposite(summary.model, summary.atomsPerFormulaUnit);
  const values = model.params.map((spec) => summary.parameters.find((p) => p.name === spec.name)?.value ?? Number.NaN);
  const scatter = input.sigma === null ? Math.sqrt(row.chiSquare / Math.max(1, row.dof)) : 1;
  const residuals: ResidualPoint[] = [];
  const used: FitInputPoint[] = [];
  for (let i = 0; i < input.temperatureK.length; i++) {
    const T = input.temperatureK[i];
    if (input.masked[i] || T < window[0] || T > window[1]) continue;
    const m = model.evaluate(values, T);
    const s = input.sigma === null ? scatter : input.sigma[i];
    used.push({ temperatureK: T, cp: input.cp[i], sigma: input.sigma === null ? Number.NaN : input.sigma[i] });
    residuals.push({ temperatureK: T, normalized: s > 0 ? (input.cp[i] - m) / s : 0 });
  }
  const warnings = [...summary.warnings];
  if (fitInputSha256(used) !== row.inputSha256) {
    warnings.push("The run's points no longer match the input this fit was made from (input SHA-256 differs); the residuals shown use the current points.");
  }
  return {
    ...summary,
    warnings,
    covariance: row.covariance.length ? row.covariance : null,
    residuals,
    curve: modelCurve(model, values, window),
  };
}

/**
 * Re-runs the engine on a stored fit's own definition and input (the points it used, the mask it saw),
 * for checking that a stored fit re-computes.
 * @param db the database
 * @param params lab and fit
 * @returns the fresh outcome and whether its input hash equals the stored one
 * @throws HttpError 404 unknown fit
 */
export function recomputeFit(db: Db, params: FitParams): { outcome: FitOutcome; sameInput: boolean } {
  const row = fitRow(db, params.labId, params.fitId);
  const run = loadRunForFit(db, row.labId, row.runId);
  const { maskedIdx, window } = storedInput(run, row);
  const { outcome } = runEngine(run, row.model as unknown as ModelDefinitionInput, window, { maskedIdx });
  return { outcome, sameInput: outcome.inputSha256 === row.inputSha256 };
}

/**
 * Fits each candidate model to the same window and orders them: converged fits by BIC (lowest first),
 * then fits that did not converge by BIC, then candidates the engine refused. The mass systematic is
 * left out of ranking (it does not change the order); Fit and Save compute it.
 * @param db the database
 * @param params lab and run
 * @param body window (K) and candidates (default DEFAULT_RANK_CANDIDATES)
 * @param onProgress called after each candidate with (done, total, label)
 * @returns the ordered ranking
 * @throws HttpError 404 unknown run; 422 for an addenda run or a run without atom count
 */
export async function rankRunModels(
  db: Db,
  params: RunParams,
  body: RankBody,
  onProgress?: (done: number, total: number, label: string) => void,
): Promise<RankResult> {
  const run = loadRunForFit(db, params.labId, params.runId);
  const candidates = body.candidates?.length
    ? body.candidates.map((c) => ({ label: c.label ?? modelLabel(c.model), model: c.model }))
    : DEFAULT_RANK_CANDIDATES.map((c) => ({ label: c.label, model: c.model }));
  const started = performance.now();
  const entries: RankEntry[] = [];
  let pointsUsed = 0;
  for (const [k, c] of candidates.entries()) {
    try {
      const { outcome } = runEngine(run, c.model, body.window, { withMass: false });
      const { residuals: _r, curve: _c, ...rest } = outcome;
      pointsUsed = outcome.pointsUsed;
      entries.push({ label: c.label, model: c.model, outcome: rest, error: null, deltaBic: null });
    } catch (err) {
      if (!(err instanceof HttpError) || err.status !== 422) throw err;
      if (/addenda run|no atom count/.test(err.message)) throw err;
      entries.push({ label: c.label, model: c.model, outcome: null, error: err.message, deltaBic: null });
    }
    onProgress?.(k + 1, candidates.length, c.label);
    // Let the event loop send the progress line before the next candidate is fitted.
    await new Promise<void>((resolve) => setImmediate(resolve));
  }
  const group = (e: RankEntry) => (e.outcome === null ? 2 : e.outcome.converged ? 0 : 1);
  entries.sort((a, b) => group(a) - group(b) || (a.outcome && b.outcome ? a.outcome.bic - b.outcome.bic : 0));
  const best = entries.find((e) => e.outcome?.converged) ?? entries.find((e) => e.outcome);
  for (const e of entries) e.deltaBic = e.outcome && best?.outcome ? e.outcome.bic - best.outcome.bic : null;
  if (pointsUsed === 0) {
    const inWindow = run.points.filter((p) => !p.masked && p.temperatureK >= body.window[0] && p.temperatureK <= body.window[1]).length;
    pointsUsed = inWindow;
  }
  return { window: [body.window[0], body.window[1]], pointsUsed, entries, elapsedMs: performance.now() - started };
}

/** A short label of a model definition, e.g. "γT + Debye + Einstein". */
export function modelLabel(def: ModelDefinitionInput): string {
  const words: Record<string, string> = { electronic: "γT", t3: "βT³", t5: "δT⁵", einstein: "Einstein", schottky: "Schottky", nuclear: "nuclear A/T²" };
  return def.components.map((c) => (c.kind === "debye" ? (c.dimension && c.dimension !== 3 ? `Debye ${c.dimension}D` : "Debye") : words[c.kind])).join(" + ");
}

/* ------------------------------------------------------------------------------------------------
 * θ_D(T) and the thermodynamic functions of a run, against one of its fits
 * ---------------------------------------------------------------------------------------------- */

/** The fit asked for, else the run's approved fit, else its newest. */
function chooseFit(db: Db, params: RunParams, fitId?: string): Fit {
  const run = db.select({ id: runs.id }).from(runs).where(and(eq(runs.id, params.runId), eq(runs.labId, params.labId))).get();
  if (!run) throw notFound("No such run in this lab");
  let row: FitRow | undefined;
  if (fitId) {
    row = db.select().from(fits).where(and(eq(fits.id, fitId), eq(fits.runId, params.runId), eq(fits.labId, params.labId))).get();
    if (!row) throw notFound("No such fit of this run");
  } else {
    row =
      db.select().from(fits).where(and(eq(fits.runId, params.runId), eq(fits.state, "approved"))).get() ??
      db.select().from(fits).where(eq(fits.runId, params.runId)).orderBy(desc(fits.createdAt), desc(sql`rowid`)).limit(1).get();
    if (!row) throw unprocessable("This run has no saved fit yet. Fit a model and save it first: below the data and for the electronic part the fitted model is needed.");
  }
  return getFit(db, { labId: params.labId, fitId: row.id });
}

/** The fitted composite of a stored fit and its parameter vector. */
function fittedModel(fit: Fit): { model: CompositeModel; values: number[] } {
  const model = buildComposite(fit.model, fit.atomsPerFormulaUnit);
  const values = model.params.map((spec) => fit.parameters.find((p) => p.name === spec.name)?.value ?? Number.NaN);
  return { model, values };
}

/** Components that are not lattice vibrations: taken off the data before the θ_D inversion. */
const NON_LATTICE = new Set(["electronic", "schottky", "nuclear"]);

const NO_SOLUTION_WORDS = {
  "above-limit": "the lattice part is at or above the Dulong–Petit limit 3nR",
  "not-positive": "the lattice part is zero or negative after the subtraction",
} as const;

/**
 * θ_D(T) of a run: for each point, the Debye temperature that alone reproduces its lattice part, the
 * data minus the fitted electronic term (and any fitted Schottky and nuclear terms), by H1's
 * thetaDFromPoint; plus the fit's own θ_D (its Debye term, or from β of a T³ term).
 * @param db the database
 * @param params lab and run
 * @param fitId the fit to use; default the approved fit, else the newest
 * @returns one entry per point of the run (masked points flagged), null θ_D with the reason where there is none
 * @throws HttpError 404 unknown run or fit; 422 when the run has no fit
 * @see shared/physics/theta-d.ts
 */
export function runThetaDCurve(db: Db, params: RunParams, fitId?: string): ThetaDCurve {
  const fit = chooseFit(db, params, fitId);
  const run = loadRunForFit(db, params.labId, params.runId);
  const { model, values } = fittedModel(fit);
  const n = fit.atomsPerFormulaUnit;
  const kinds = fit.model.components.map((c) => c.kind);
  const debyes = fit.model.components.filter((c) => c.kind === "debye");
  const dimension = debyes.length === 1 && debyes[0].kind === "debye" ? (debyes[0].dimension ?? 3) : 3;
  const subtracted = [...new Set(kinds.filter((k) => NON_LATTICE.has(k)))];
  const points: ThetaDPointOut[] = run.points.map((p) => {
    const parts = model.parts(values, p.temperatureK);
    let lattice = p.cp;
    parts.forEach((part, i) => {
      if (NON_LATTICE.has(kinds[i])) lattice -= part.value;
    });
    const r = thetaDFromPoint(lattice, p.temperatureK, n, dimension);
    return {
      temperatureK: p.temperatureK,
      lattice,
      thetaD: r.thetaD,
      noSolution: r.thetaD === null ? NO_SOLUTION_WORDS[r.reason] : null,
      masked: p.masked,
    };
  });
  let fittedThetaD: ThetaDCurve["fittedThetaD"] = null;
  const theta = fit.parameters.find((p) => p.name === "thetaD");
  const beta = fit.parameters.find((p) => p.name === "beta");
  if (theta) fittedThetaD = { value: theta.value, stderr: theta.stderr, source: "the Debye term of the fit" };
  else if (beta && beta.value > 0) {
    const value = thetaDFromBeta(beta.value, n);
    // θ ∝ β^(−1/3): σ_θ/θ = σ_β/(3β).
    fittedThetaD = { value, stderr: beta.stderr === null ? null : (value * beta.stderr) / (3 * beta.value), source: "β of the T³ term, θ_D = (12π⁴nR/5β)^(1/3)" };
  }
  return { fitId: fit.id, atomsPerFormulaUnit: n, subtracted, fittedThetaD, points };
}

type ThetaDPointOut = ThetaDCurve["points"][number];

/**
 * S(T) = ∫₀ᵀ C/T dT and H(T) − H(0) = ∫₀ᵀ C dT of a run: the unmasked data (monotone interpolation)
 * from its first point up, the fitted model of the chosen fit below it (H1's thermoTable).
 * @param db the database
 * @param params lab and run
 * @param fitId the fit for the part below the data; default the approved fit, else the newest
 * @param at temperatures in K (≤ the last data point); default round temperatures and 298.15 K within the data
 * @returns the table
 * @throws HttpError 404 unknown run or fit; 422 no fit, a temperature above the data, or a model whose entropy diverges at 0 K
 * @see shared/physics/thermo.ts
 */
export function runThermoTable(db: Db, params: RunParams, fitId?: string, at?: number[]): ThermoTable {
  const fit = chooseFit(db, params, fitId);
  const run = loadRunForFit(db, params.labId, params.runId);
  const data = run.points.filter((p) => !p.masked);
  if (data.length < 2) throw unprocessable("The run has fewer than two unmasked points to integrate");
  const ts = data.map((p) => p.temperatureK);
  const cs = data.map((p) => p.cp);
  const first = ts[0];
  const last = ts[ts.length - 1];
  const above = at?.find((t) => t > last);
  if (above !== undefined) throw unprocessable(`${above} K is above the last data point (${last} K); the data are not extrapolated upwards`);
  const { model, values } = fittedModel(fit);
  const lowT = (T: number) => model.evaluate(values, T);
  let rows: { T: number; S: number; H: number }[];
  try {
    rows = thermoTable(ts, cs, lowT, at ? [...at].sort((a, b) => a - b) : undefined);
  } catch (err) {
    if (err instanceof RangeError) {
      throw unprocessable(
        `The entropy cannot be integrated with this fit below ${first} K: ${err.message}. A nuclear A/T² tail makes C/T diverge at 0 K; choose a fit without it.`,
      );
    }
    throw err;
  }
  const interp = monotoneInterpolator(ts, cs);
  const below = thermoTable(ts, cs, lowT, [first])[0];
  const reference = rows.find((r) => r.T === 298.15) ?? rows[rows.length - 1];
  return {
    fitId: fit.id,
    dataStartK: first,
    dataEndK: last,
    modelShareOfEntropy: reference && reference.S > 0 ? below.S / reference.S : 0,
    rows: rows.map((r) => ({ temperatureK: r.T, cp: r.T >= first ? interp(r.T) : lowT(r.T), entropy: r.S, enthalpy: r.H })),
  };
}

/**
 * The thermodynamic table as CSV: T_K, Cp, S, H − H(0) in SI, one row per temperature.
 * @returns the file name and text
 * @throws as runThermoTable
 */
export function thermoTableCsv(db: Db, params: RunParams, fitId?: string, at?: number[]): { fileName: string; text: string } {
  const table = runThermoTable(db, params, fitId, at);
  const lines = ["T_K,Cp_J_per_mol_K,S_J_per_mol_K,H_minus_H0_J_per_mol"];
  for (const r of table.rows) lines.push([r.temperatureK, r.cp, r.entropy, r.enthalpy].map((v) => String(Number(v.toPrecision(10)))).join(","));
  return { fileName: `thermo-${params.runId.slice(0, 8)}-fit-${table.fitId.slice(0, 8)}.csv`, text: `${lines.join("\n")}\n` };
}
