/*
 * Fitting a composite heat-capacity model to one reduced run: temperature window, masked points, user
 * settings (start values, fixed parameters, bounds), automatic multi-start, and plain-word warnings a
 * scientist should read before quoting the numbers.
 *
 * Warning thresholds (common practice, no source): |correlation| > 0.95; reduced χ² < 0.2 (σ look too
 * large) or > 5 (the model misses the data or σ are too small); Σ oscillator atoms off the formula's n
 * by more than 10 % and more than 2 standard errors when the atom counts are free.
 */
import { buildComposite } from "@shared/physics/composite";
import type { CompositeModel, ModelDefinition } from "@shared/physics/model-types";
import { fitLeastSquares, type LeastSquaresResult, type StopReason } from "@shared/fitting/least-squares";
import { startValueCandidates } from "@shared/fitting/start-values";

export interface HeatCapacityData {
  /** K, > 0 */
  temperatureK: readonly number[];
  /** Molar heat capacity, J/(mol·K) per mole of formula units. */
  cp: readonly number[];
  /** Standard uncertainty of cp, J/(mol·K), or null (then every point has equal weight). */
  sigma: readonly number[] | null;
  /** true for points the user masked out; they are kept but not fitted. */
  masked?: readonly boolean[];
}

export interface FitModelOptions {
  /** Atoms per formula unit n (> 0). */
  atomsPerFormulaUnit: number;
  /** Fit only points with windowK[0] ≤ T ≤ windowK[1], K. */
  windowK?: [number, number];
  /** How many automatic starting points to try at most (default 3). */
  maxStarts?: number;
}

export interface FittedParameter {
  name: string;
  unit: string;
  value: number;
  /** Scaled by √χ²_red; null when fixed or not estimable. */
  stdError: number | null;
  /** Taking σ as absolute; null when fixed or not estimable. */
  stdErrorUnscaled: number | null;
  fixed: boolean;
  atBound: boolean;
  lower: number;
  upper: number;
}

export interface HeatCapacityFit extends LeastSquaresResult {
  definition: ModelDefinition;
  parameterNames: string[];
  parameterUnits: string[];
  parameters: FittedParameter[];
  /** Indices (into the input arrays) of the points fitted. */
  pointsUsed: number[];
  /** How many points inside the window were left out because they are masked. */
  maskedExcluded: number;
  /** How many unmasked points lie outside the window. */
  outsideWindow: number;
  /** The window actually used, K. */
  windowK: [number, number];
  /** Starting points fitted (the best χ² is kept). */
  startsTried: number;
  /** The starting vector of the kept fit. */
  startValues: number[];
  warnings: string[];
}

const STOP_WORDS: Record<StopReason, string> = {
  "chi-square-stationary": "χ² reached its minimum",
  "exact-fit": "the model passes through every point",
  "no-free-parameters": "every parameter is fixed",
  "max-iterations": "the iteration limit was reached",
  "no-progress": "no step could lower χ² any further",
};

const format = (v: number) => (Math.abs(v) >= 1e4 || (Math.abs(v) < 1e-3 && v !== 0) ? v.toExponential(3) : v.toPrecision(4));

/**
 * Fits a composite heat-capacity model to a run.
 * @param data T (K), molar cp (J/(mol·K)), σ (J/(mol·K) or null) and optional mask
 * @param def components, optional constrainAtoms, and per-parameter value / fixed / lower / upper
 * @param opts atoms per formula unit, optional temperature window (K), optional cap on starting points
 * @returns the least-squares result with names, units, points used, masked points excluded and warnings
 * @throws TypeError / RangeError for malformed data, a bad window, a fixed parameter without a value,
 *   no more points than free parameters, or no starting point at which the model is finite
 * @see shared/fitting/least-squares.ts for the method and its sources
 */
export function fitHeatCapacity(data: HeatCapacityData, def: ModelDefinition, opts: FitModelOptions): HeatCapacityFit {
  if (data === null || typeof data !== "object") throw new TypeError("data must be an object with temperatureK, cp and sigma");
  if (opts === null || typeof opts !== "object") throw new TypeError("opts must be an object with atomsPerFormulaUnit");
  const { temperatureK: t, cp, sigma, masked } = data;
  if (!Array.isArray(t)) throw new TypeError("data.temperatureK must be an array of numbers");
  if (!Array.isArray(cp)) throw new TypeError("data.cp must be an array of numbers");
  const n = t.length;
  if (cp.length !== n) throw new RangeError(`data.cp must have length ${n} (got ${cp.length})`);
  if (sigma !== null) {
    if (!Array.isArray(sigma)) throw new TypeError("data.sigma must be an array of numbers or null");
    if (sigma.length !== n) throw new RangeError(`data.sigma must have length ${n} (got ${sigma.length})`);
  }
  if (masked !== undefined) {
    if (!Array.isArray(masked)) throw new TypeError("data.masked must be an array of booleans");
    if (masked.length !== n) throw new RangeError(`data.masked must have length ${n} (got ${masked.length})`);
  }
  for (let i = 0; i < n; i++) {
    if (!(Number.isFinite(t[i]) && t[i] > 0)) throw new RangeError(`data.temperatureK[${i}] must be a finite temperature > 0 K (got ${String(t[i])})`);
    if (!Number.isFinite(cp[i])) throw new RangeError(`data.cp[${i}] must be a finite number (got ${String(cp[i])})`);
    if (sigma !== null && !(Number.isFinite(sigma[i]) && sigma[i] > 0)) {
      throw new RangeError(`data.sigma[${i}] must be a finite number > 0 (got ${String(sigma[i])})`);
    }
  }
  const atoms = opts.atomsPerFormulaUnit;
  if (!(Number.isFinite(atoms) && atoms > 0)) throw new RangeError(`opts.atomsPerFormulaUnit must be a number > 0 (got ${String(atoms)})`);
  if (opts.windowK !== undefined) {
    const w = opts.windowK;
    if (!Array.isArray(w) || w.length !== 2 || !(w[0] < w[1]) || !Number.isFinite(w[0]) || !Number.isFinite(w[1])) {
      throw new RangeError(`opts.windowK must be [tMinK, tMaxK] with tMinK < tMaxK (got ${JSON.stringify(w)})`);
    }
  }
  const maxStarts = opts.maxStarts ?? 3;
  if (!(Number.isInteger(maxStarts) && maxStarts >= 1)) throw new RangeError(`opts.maxStarts must be an integer ≥ 1 (got ${maxStarts})`);

  const model: CompositeModel = buildComposite(def, atoms);
  const specs = model.params;
  const settings = def.parameters ?? {};
  const fixed = specs.map((s) => settings[s.name]?.fixed === true);
  const lower = specs.map((s) => settings[s.name]?.lower ?? s.lower);
  const upper = specs.map((s) => settings[s.name]?.upper ?? s.upper);
  specs.forEach((s, j) => {
    const v = settings[s.name]?.value;
    if (fixed[j] && v === undefined) throw new RangeError(`parameter ${s.name} is fixed but has no value`);
    if (v !== undefined && !Number.isFinite(v)) throw new RangeError(`parameter ${s.name}: value must be a finite number (got ${String(v)})`);
    if (!(lower[j] <= upper[j])) throw new RangeError(`parameter ${s.name}: lower bound ${lower[j]} is above upper bound ${upper[j]}`);
    if (!fixed[j] && v !== undefined && (v < lower[j] || v > upper[j])) {
      throw new RangeError(`parameter ${s.name}: start value ${v} lies outside its bounds [${lower[j]}, ${upper[j]}]`);
    }
  });

  const [wLo, wHi] = opts.windowK ?? [-Infinity, Infinity];
  const used: number[] = [];
  let maskedExcluded = 0;
  let outsideWindow = 0;
  for (let i = 0; i < n; i++) {
    const inside = t[i] >= wLo && t[i] <= wHi;
    if (masked?.[i]) {
      if (inside) maskedExcluded++;
    } else if (!inside) outsideWindow++;
    else used.push(i);
  }
  const freeCount = fixed.filter((f) => !f).length;
  if (used.length <= freeCount) {
    throw new RangeError(
      `the model has ${freeCount} free parameter(s) but only ${used.length} unmasked point(s) lie in the window` +
        (opts.windowK ? ` ${wLo}–${wHi} K` : "") +
        `; at least ${freeCount + 1} are needed. Widen the window, unmask points, or fix parameters.`,
    );
  }
  const ts = used.map((i) => t[i]);
  const cs = used.map((i) => cp[i]);
  const ss = sigma === null ? null : used.map((i) => sigma[i]);

  const candidates = startValueCandidates({ temperatureK: ts, cp: cs, sigma: ss }, model, def, {
    atomsPerFormulaUnit: atoms,
    maxCandidates: Math.max(maxStarts, 1),
  });
  const bestScreen = candidates[0].screenChiSquare;
  const nonlinear = specs
    .map((s, j) => ({ name: s.name, j }))
    .filter(({ name, j }) => !fixed[j] && /^(thetaD|thetaE|gap)\d*$/.test(name))
    .map(({ j }) => j);
  let best: { fit: LeastSquaresResult; start: number[] } | null = null;
  let firstError: unknown = null;
  let tried = 0;
  for (const candidate of candidates) {
    if (tried >= maxStarts) break;
    // Starts whose amplitude screen is already ten times worse than the best rarely lead to a better minimum.
    if (tried > 0 && !(candidate.screenChiSquare <= 10 * bestScreen)) break;
    const start = candidate.values.map((v, j) => Math.min(Math.max(v, lower[j]), upper[j]));
    // A start whose characteristic temperatures all lie within a factor 1.5 of a converged fit's would
    // almost surely run into the same minimum: skip it.
    if (best !== null && best.fit.converged && nonlinear.every((j) => Math.abs(Math.log(start[j] / best!.fit.params[j])) < Math.log(1.5))) {
      continue;
    }
    tried++;
    try {
      const fit = fitLeastSquares({ x: ts, y: cs, sigma: ss }, model.evaluate, {
        initialValues: start,
        lowerBounds: lower,
        upperBounds: upper,
        fixed,
        jacobianFunction: model.jacobian,
      });
      if (best === null || better(fit, best.fit)) best = { fit, start };
    } catch (error) {
      if (firstError === null) firstError = error;
    }
  }
  if (best === null) {
    const reason = firstError instanceof Error ? firstError.message : String(firstError);
    throw new RangeError(`no starting point gave a usable fit: ${reason}`);
  }

  const { fit } = best;
  const warnings = buildWarnings(fit, model, def, atoms, fixed, sigma === null);
  const parameters: FittedParameter[] = specs.map((s, j) => ({
    name: s.name,
    unit: s.unit,
    value: fit.params[j],
    stdError: fit.stdErrors[j],
    stdErrorUnscaled: fit.stdErrorsUnscaled[j],
    fixed: fixed[j],
    atBound: fit.atBound[j],
    lower: lower[j],
    upper: upper[j],
  }));
  return {
    ...fit,
    definition: def,
    parameterNames: specs.map((s) => s.name),
    parameterUnits: specs.map((s) => s.unit),
    parameters,
    pointsUsed: used,
    maskedExcluded,
    outsideWindow,
    windowK: [Math.min(...ts), Math.max(...ts)],
    startsTried: tried,
    startValues: best.start,
    warnings,
  };
}

/** A converged fit beats an unconverged one; otherwise the lower χ² wins. */
function better(a: LeastSquaresResult, b: LeastSquaresResult): boolean {
  if (a.converged !== b.converged) return a.converged;
  return a.chiSquare < b.chiSquare;
}

function buildWarnings(
  fit: LeastSquaresResult,
  model: CompositeModel,
  def: ModelDefinition,
  atoms: number,
  fixed: boolean[],
  sigmaMissing: boolean,
): string[] {
  const warnings: string[] = [];
  const names = model.params.map((p) => p.name);
  if (!fit.converged) {
    warnings.push(`The fit did not converge (${STOP_WORDS[fit.stopReason]}); treat the parameters as provisional.`);
  }
  if (sigmaMissing) {
    warnings.push(
      "No uncertainties were given, so every point has equal weight; the standard errors are estimated from the scatter about the fit, and χ² has no absolute meaning.",
    );
  }
  names.forEach((name, j) => {
    if (!fit.atBound[j]) return;
    const atLower = fit.params[j] <= (def.parameters?.[name]?.lower ?? model.params[j].lower);
    warnings.push(
      `${name} ended on its ${atLower ? "lower" : "upper"} bound (${format(fit.params[j])} ${model.params[j].unit}); its value and uncertainty are not reliable. Widen the bound, fix the parameter, or drop the component.`,
    );
  });
  if (fit.covariance === null) {
    warnings.push("The data cannot separate some of the free parameters (singular covariance), so no uncertainties are given. Fix or remove a parameter.");
  } else if (fit.correlation !== null) {
    for (let i = 0; i < names.length; i++) {
      for (let j = i + 1; j < names.length; j++) {
        const r = fit.correlation[i][j];
        if (r !== null && Math.abs(r) > 0.95) {
          warnings.push(
            `${names[i]} and ${names[j]} are strongly correlated (r = ${r.toFixed(3)}); each is poorly determined on its own even if their combination is well fixed.`,
          );
        }
      }
    }
  }
  if (!sigmaMissing && fit.dof > 0) {
    const red = fit.reducedChiSquare;
    if (red < 0.2) {
      warnings.push(`Reduced χ² is ${format(red)}: the stated uncertainties look too large for this scatter.`);
    } else if (red > 5) {
      warnings.push(
        `Reduced χ² is ${format(red)}: the model does not describe the data within the stated uncertainties (or they are too small); the scaled standard errors allow for this.`,
      );
    }
  }
  if (!def.constrainAtoms) {
    const atomIndices = names
      .map((name, j) => ({ name, j }))
      .filter(({ name }) => /^(nD|nE)\d*$/.test(name))
      .map(({ j }) => j);
    if (atomIndices.length > 0 && atomIndices.some((j) => !fixed[j])) {
      const sum = atomIndices.reduce((s, j) => s + fit.params[j], 0);
      let variance = 0;
      if (fit.covariance !== null) for (const a of atomIndices) for (const b of atomIndices) variance += fit.covariance[a][b];
      const sd = Math.sqrt(Math.max(variance, 0));
      if (Math.abs(sum - atoms) > 0.1 * atoms && Math.abs(sum - atoms) > 2 * sd) {
        warnings.push(
          `The oscillator atoms add up to ${format(sum)} per formula unit but the formula has ${format(atoms)}; check the sample mass and molar mass, or constrain the atom count.`,
        );
      }
    }
  }
  return warnings;
}
