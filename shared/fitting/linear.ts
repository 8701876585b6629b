/*
 * Weighted linear least squares y ≈ X·b with covariance, and the low-temperature heat-capacity line
 * C/T = γ + β·T² (+ δ·T⁴) fitted against T², with θ_D from β.
 *
 * The solution goes through the Householder QR of the whitened, column-normalised design matrix and the
 * SVD (ml-matrix) of its k×k factor R = U·S·Vᵀ: b = V·S⁻¹·Uᵀ·Qᵀỹ and C = (XᵀWX)⁻¹ = V·S⁻²·Vᵀ, never the
 * normal equations, whose condition number is the square of X's (T² and T⁴ columns over a decade of
 * temperature are strongly collinear).
 * See Press et al., Numerical Recipes 3rd ed. (2007) §15.4.2; Bevington & Robinson, Data Reduction and
 * Error Analysis, 3rd ed., ch. 6–7.
 */
import { Matrix, SingularValueDecomposition } from "ml-matrix";
import { thetaDFromBeta as thetaDValueFromBeta } from "@shared/physics/theta-d";
import { householderQR } from "@shared/fitting/small-linear-algebra";

export interface LinearFitResult {
  /** Fitted coefficients, in the order of the design matrix columns. */
  params: number[];
  /** √diag(s²·C), s² = χ²/dof. */
  stdErrors: number[];
  /** √diag(C), taking σ as absolute standard uncertainties. */
  stdErrorsUnscaled: number[];
  /** s²·(XᵀWX)⁻¹. */
  covariance: number[][];
  /** (XᵀWX)⁻¹, W = diag(1/σ²). */
  covarianceUnscaled: number[][];
  correlation: number[][];
  chiSquare: number;
  reducedChiSquare: number;
  /** N − k. */
  dof: number;
  pointCount: number;
  /** y_i − (X·b)_i, in the unit of y. */
  residuals: number[];
}

const RANK_TOLERANCE = 1e-12;

/**
 * Weighted linear least squares with covariance.
 * @param design N rows of k regressor values (the design matrix X)
 * @param y N observations
 * @param sigma N standard uncertainties of y (unit of y), or null for unit uncertainties
 * @returns coefficients with scaled and unscaled errors, covariance, correlation, χ² and dof
 * @throws TypeError for non-arrays; RangeError for ragged or wrong-length input, non-finite values,
 *   σ ≤ 0, no more points than coefficients, or columns the data cannot separate (rank-deficient X)
 * @see Press et al., Numerical Recipes, 3rd ed. (2007), §15.4
 */
export function fitLinearLeastSquares(
  design: readonly (readonly number[])[],
  y: readonly number[],
  sigma: readonly number[] | null,
): LinearFitResult {
  if (!Array.isArray(design)) throw new TypeError("design must be an array of rows");
  if (!Array.isArray(y)) throw new TypeError("y must be an array of numbers");
  const n = design.length;
  if (y.length !== n) throw new RangeError(`y must have one value per design row: ${n} rows, ${y.length} values`);
  if (n === 0) throw new RangeError("design must have at least one row");
  const k = Array.isArray(design[0]) ? design[0].length : 0;
  if (k === 0) throw new RangeError("design rows must hold at least one regressor");
  if (sigma !== null) {
    if (!Array.isArray(sigma)) throw new TypeError("sigma must be an array of numbers or null");
    if (sigma.length !== n) throw new RangeError(`sigma must have length ${n} (got ${sigma.length})`);
  }
  for (let i = 0; i < n; i++) {
    const row = design[i];
    if (!Array.isArray(row) || row.length !== k) throw new RangeError(`design[${i}] must hold ${k} numbers`);
    for (let j = 0; j < k; j++) {
      if (!Number.isFinite(row[j])) throw new RangeError(`design[${i}][${j}] must be a finite number (got ${String(row[j])})`);
    }
    if (!Number.isFinite(y[i])) throw new RangeError(`y[${i}] must be a finite number (got ${String(y[i])})`);
    if (sigma !== null && !(Number.isFinite(sigma[i]) && sigma[i] > 0)) {
      throw new RangeError(`sigma[${i}] must be a finite number > 0 (got ${String(sigma[i])})`);
    }
  }
  if (n <= k) {
    throw new RangeError(`the fit needs more points than coefficients to estimate uncertainties: ${n} point(s), ${k} coefficient(s)`);
  }

  const w = (i: number) => (sigma === null ? 1 : 1 / sigma[i]);
  const norms = new Array<number>(k).fill(0);
  for (let i = 0; i < n; i++) for (let j = 0; j < k; j++) norms[j] += (design[i][j] * w(i)) ** 2;
  for (let j = 0; j < k; j++) {
    norms[j] = Math.sqrt(norms[j]);
    if (!(norms[j] > 0)) throw new RangeError(`design column ${j} is zero at every point: the data do not determine it`);
  }
  const a = new Float64Array(n * k);
  const yw = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    yw[i] = y[i] * w(i);
    for (let j = 0; j < k; j++) a[i * k + j] = (design[i][j] * w(i)) / norms[j];
  }
  const { r, qtb } = householderQR(a, n, k, yw);
  const svd = new SingularValueDecomposition(new Matrix(r));
  const s = svd.diagonal;
  const u = svd.leftSingularVectors;
  const v = svd.rightSingularVectors;
  const sMax = Math.max(...s);
  if (s.some((si) => !(si > RANK_TOLERANCE * sMax))) {
    throw new RangeError("the design columns are linearly dependent over these points: the data cannot separate the coefficients");
  }
  // R = U S Vᵀ, so b̃ = R⁻¹ Qᵀỹ = V S⁻¹ Uᵀ Qᵀỹ; then undo the column normalisation.
  const uty = s.map((_, c) => {
    let sum = 0;
    for (let i = 0; i < k; i++) sum += u.get(i, c) * qtb![i];
    return sum / s[c];
  });
  const params = new Array<number>(k);
  for (let j = 0; j < k; j++) {
    let sum = 0;
    for (let c = 0; c < k; c++) sum += v.get(j, c) * uty[c];
    params[j] = sum / norms[j];
  }
  const covarianceUnscaled = Array.from({ length: k }, (_, i) =>
    Array.from({ length: k }, (__, j) => {
      let sum = 0;
      for (let c = 0; c < k; c++) sum += (v.get(i, c) * v.get(j, c)) / (s[c] * s[c]);
      return sum / (norms[i] * norms[j]);
    }),
  );
  const residuals = design.map((row, i) => {
    let predicted = 0;
    for (let j = 0; j < k; j++) predicted += row[j] * params[j];
    return y[i] - predicted;
  });
  const chiSquare = residuals.reduce((sum, r, i) => sum + (r * w(i)) ** 2, 0);
  const dof = n - k;
  const reducedChiSquare = chiSquare / dof;
  const covariance = covarianceUnscaled.map((row) => row.map((c) => c * reducedChiSquare));
  const correlation = covarianceUnscaled.map((row, i) =>
    row.map((c, j) => (i === j ? 1 : Math.max(-1, Math.min(1, c / Math.sqrt(covarianceUnscaled[i][i] * covarianceUnscaled[j][j]))))),
  );
  return {
    params,
    stdErrors: covariance.map((row, j) => Math.sqrt(row[j])),
    stdErrorsUnscaled: covarianceUnscaled.map((row, j) => Math.sqrt(row[j])),
    covariance,
    covarianceUnscaled,
    correlation,
    chiSquare,
    reducedChiSquare,
    dof,
    pointCount: n,
    residuals,
  };
}

export interface LowTemperatureFitOptions {
  /** Also fit δ·T⁵ (C/T = γ + βT² + δT⁴). */
  withT5?: boolean;
  /** Use only points with T ≤ tMaxK (K). */
  tMaxK?: number;
}

export interface LowTemperatureFit extends LinearFitResult {
  /** "gamma", "beta" and, with withT5, "delta": the order of params. */
  parameterNames: string[];
  /** J/(mol·K²), J/(mol·K⁴), J/(mol·K⁶). */
  units: string[];
  gamma: number;
  beta: number;
  /** null unless withT5. */
  delta: number | null;
  /** Indices (into the input arrays) of the points used. */
  pointsUsed: number[];
  /** Lowest and highest temperature used, K. */
  temperatureRangeK: [number, number];
}

/**
 * Low-temperature expansion C = γT + βT³ (+ δT⁵), fitted as C/T = γ + β·T² (+ δ·T⁴) against T² by
 * weighted linear least squares; σ(C/T) = σ(C)/T.
 * @param temperatureK temperatures, K (> 0)
 * @param heatCapacity C at each temperature, J/(mol·K)
 * @param sigma standard uncertainty of each C, J/(mol·K), or null for unit uncertainties of C/T
 * @param options withT5 adds the δT⁵ term; tMaxK keeps only T ≤ tMaxK
 * @returns γ (J/(mol·K²)), β (J/(mol·K⁴)), δ (J/(mol·K⁶)) with the full linear-fit result in that order
 * @throws TypeError / RangeError for wrong lengths, non-finite values, T ≤ 0, σ ≤ 0, a bad tMaxK, or
 *   too few points in the window
 * @see Kittel, Introduction to Solid State Physics, 8th ed., ch. 5–6 (C = γT + AT³ at low T); Gopal,
 *   Specific Heats at Low Temperatures (1966), ch. 2
 */
export function fitLowT(
  temperatureK: readonly number[],
  heatCapacity: readonly number[],
  sigma: readonly number[] | null,
  options: LowTemperatureFitOptions = {},
): LowTemperatureFit {
  if (!Array.isArray(temperatureK)) throw new TypeError("temperatureK must be an array of numbers");
  if (!Array.isArray(heatCapacity)) throw new TypeError("heatCapacity must be an array of numbers");
  const n = temperatureK.length;
  if (heatCapacity.length !== n) throw new RangeError(`heatCapacity must have length ${n} (got ${heatCapacity.length})`);
  if (sigma !== null) {
    if (!Array.isArray(sigma)) throw new TypeError("sigma must be an array of numbers or null");
    if (sigma.length !== n) throw new RangeError(`sigma must have length ${n} (got ${sigma.length})`);
  }
  const { withT5 = false, tMaxK } = options;
  if (tMaxK !== undefined && !(Number.isFinite(tMaxK) && tMaxK > 0)) {
    throw new RangeError(`options.tMaxK must be a finite temperature > 0 K (got ${String(tMaxK)})`);
  }
  for (let i = 0; i < n; i++) {
    if (!(Number.isFinite(temperatureK[i]) && temperatureK[i] > 0)) {
      throw new RangeError(`temperatureK[${i}] must be a finite temperature > 0 K (got ${String(temperatureK[i])})`);
    }
    if (!Number.isFinite(heatCapacity[i])) throw new RangeError(`heatCapacity[${i}] must be a finite number (got ${String(heatCapacity[i])})`);
  }
  const used: number[] = [];
  for (let i = 0; i < n; i++) if (tMaxK === undefined || temperatureK[i] <= tMaxK) used.push(i);
  const k = withT5 ? 3 : 2;
  if (used.length <= k) {
    throw new RangeError(
      `the low-temperature line needs more than ${k} points${tMaxK === undefined ? "" : ` at or below ${tMaxK} K`}; found ${used.length}`,
    );
  }
  const design = used.map((i) => {
    const t2 = temperatureK[i] ** 2;
    return withT5 ? [1, t2, t2 * t2] : [1, t2];
  });
  const yOverT = used.map((i) => heatCapacity[i] / temperatureK[i]);
  const sigmaOverT = sigma === null ? null : used.map((i) => sigma[i] / temperatureK[i]);
  const fit = fitLinearLeastSquares(design, yOverT, sigmaOverT);
  const ts = used.map((i) => temperatureK[i]);
  return {
    ...fit,
    parameterNames: withT5 ? ["gamma", "beta", "delta"] : ["gamma", "beta"],
    units: withT5 ? ["J/(mol·K²)", "J/(mol·K⁴)", "J/(mol·K⁶)"] : ["J/(mol·K²)", "J/(mol·K⁴)"],
    gamma: fit.params[0],
    beta: fit.params[1],
    delta: withT5 ? fit.params[2] : null,
    pointsUsed: used,
    temperatureRangeK: [Math.min(...ts), Math.max(...ts)],
  };
}

/**
 * Debye temperature from the T³ coefficient: θ_D = (12π⁴·n·R / 5β)^{1/3}, with
 * σ(θ_D) = θ_D·σ(β)/(3β) from dθ_D/dβ = −θ_D/(3β) (first-order propagation).
 * @param beta T³ coefficient β, J/(mol·K⁴) per mole of formula units (> 0)
 * @param atomsN atoms per formula unit n (> 0)
 * @param sigmaBeta standard uncertainty of β, J/(mol·K⁴), or null/omitted
 * @returns θ_D in K and its standard uncertainty in K (null without sigmaBeta)
 * @throws RangeError for β ≤ 0, n ≤ 0, a negative σ(β) or non-finite input
 * @see Kittel, Introduction to Solid State Physics, 8th ed., ch. 5, eq. (5.35) (from memory)
 */
export function thetaDFromBeta(
  beta: number,
  atomsN: number,
  sigmaBeta: number | null = null,
): { thetaD: number; sigmaThetaD: number | null } {
  if (!(Number.isFinite(beta) && beta > 0)) {
    throw new RangeError(`beta must be a finite coefficient > 0 J/(mol·K⁴) (got ${String(beta)}); a T³ term ≤ 0 has no Debye temperature`);
  }
  if (!(Number.isFinite(atomsN) && atomsN > 0)) throw new RangeError(`atomsN must be a finite count > 0 (got ${String(atomsN)})`);
  if (sigmaBeta !== null && !(Number.isFinite(sigmaBeta) && sigmaBeta >= 0)) {
    throw new RangeError(`sigmaBeta must be a finite uncertainty ≥ 0 (got ${String(sigmaBeta)})`);
  }
  const thetaD = thetaDValueFromBeta(beta, atomsN);
  return { thetaD, sigmaThetaD: sigmaBeta === null ? null : (thetaD * sigmaBeta) / (3 * beta) };
}
