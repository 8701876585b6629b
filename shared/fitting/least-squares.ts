/*
 * Weighted nonlinear least squares: minimise χ²(p) = Σ ((y_i − f(x_i; p)) / σ_i)² over the free
 * parameters, within bounds, on ml-levenberg-marquardt 5.1.0, with our own convergence test,
 * covariance, standard errors, correlation matrix and information criteria.
 *
 * How the package is used, and why (read from its source, node_modules/ml-levenberg-marquardt/src):
 * - Its `weights` option w_i enters the objective as Σ (y − f)² · w_i² (error_calculation.ts divides by
 *   weightSquare = 1/w²), so w = 1/σ gives χ². But its step (step.ts) builds Jᵀ·diag(weightSquare)·J and
 *   Jᵀ·diag(weightSquare)·r, i.e. it weights the step by σ² instead of 1/σ². Objective and step disagree
 *   whenever the σ_i differ, and on a test line with σ = 0.1 and 10 it never improved on its start.
 *   We therefore never pass `weights`: the package sees whitened data ỹ_i = y_i/σ_i and a whitened model
 *   f(x_i; p)/σ_i with unit weights, for which objective and step are both exactly χ².
 * - Its damping is λ·I (not Marquardt's λ·diag(JᵀJ)), so it depends on parameter units. We hand it
 *   scaled parameters u_j = p_j·D_j with D_j the norm of the whitened Jacobian column (the MINPACK
 *   scaling, Moré 1978, updated as a running maximum), which makes λ·I act like λ·diag(JᵀJ).
 * - It always takes its step (no rejection; it only remembers the best point), stops only at
 *   maxIterations or when χ² ≤ errorTolerance (absolute), and reports neither convergence nor
 *   covariance. So it runs in bursts (2, 4, 8, … up to 32 iterations) from the best point so far; after
 *   each burst we take up to three steps of our own: Gauss–Newton first, Marquardt-damped with
 *   rejection when that fails to lower χ² (damping update of Nielsen, IMM-REP-1999-05), no parameter
 *   moving by more than |p_j| + 10/D_j in one step. From close by these finish the job (Gauss–Newton
 *   converges quadratically there); from far away the package does most iterations
 *   (result.packageIterations says how many).
 * - Convergence is our test: the Gauss–Newton predicted decrease gᵀ(JᵀJ)⁻¹g (g = Jᵀr, whitened) is
 *   exactly χ²(p) − χ²_min for a linear model, so "predicted decrease ≤ chiSquareTolerance·χ²" (1e-14)
 *   says χ² is at its minimum to that relative precision, with the parameters within
 *   √(tol·dof) standard errors of it. Also converged: no damped step lowers χ² while the prediction is
 *   below 1e-9·χ² (the rounding floor). Not converged: the iteration cap, or three rounds without any
 *   decrease of χ² ("no-progress").
 * - It receives our own Jacobian (analytic when the model gives one, else a five-point central
 *   difference with step ε^(1/3)·|p|), never its default coarse forward difference (fixed step 0.1).
 *
 * Covariance at the solution: C = (JᵀWJ)⁻¹ with W = diag(1/σ²) ("unscaled", right when σ are true
 * standard uncertainties) and s²·C with s² = χ²/(N − k) ("scaled", the usual choice when σ are only
 * relative). It is formed from the Householder QR of the whitened, column-normalised Jacobian and the
 * SVD (ml-matrix) of its small triangular factor, which avoids squaring the condition number. A
 * numerically rank-deficient Jacobian (smallest/largest singular value below 1e-12, or 1e-8 with a
 * finite-difference Jacobian) gives covariance null: the data cannot separate the free parameters.
 * See Press et al., Numerical Recipes 3rd ed., §15.4–15.5; Bevington & Robinson, Data Reduction and
 * Error Analysis, 3rd ed., ch. 8.
 *
 * Fixed parameters are held at their value: their stdErrors are null (not estimated), their rows and
 * columns of the covariance matrices are 0 and of the correlation matrix null.
 */
import { levenbergMarquardt } from "ml-levenberg-marquardt";
import { Matrix, SingularValueDecomposition } from "ml-matrix";
import { choleskySolve, householderQR } from "@shared/fitting/small-linear-algebra";

/** y = f(x; p) for the full parameter vector p (fixed ones included). */
export type ModelFunction = (params: readonly number[], x: number) => number;
/** ∂f/∂p_j at x for every parameter of the full vector p, same order as p. */
export type ModelJacobian = (params: readonly number[], x: number) => ArrayLike<number>;

export interface LeastSquaresData {
  x: readonly number[];
  y: readonly number[];
  /** Standard uncertainty of each y (same unit as y), or null for unit uncertainties (χ² is then the plain sum of squares). */
  sigma: readonly number[] | null;
}

export interface LeastSquaresOptions {
  /** Start values of every parameter; fixed parameters are held at these values. */
  initialValues: readonly number[];
  /** Lower bounds, one per parameter (may be -Infinity). */
  lowerBounds?: readonly number[];
  /** Upper bounds, one per parameter (may be Infinity). */
  upperBounds?: readonly number[];
  /** true where a parameter is held fixed. */
  fixed?: readonly boolean[];
  /** Analytic Jacobian of the model; without it, central differences are used. */
  jacobianFunction?: ModelJacobian;
  /** Cap on iterations (package iterations plus our own Gauss–Newton steps). */
  maxIterations?: number;
  /** Converged when the Gauss–Newton predicted decrease of χ² is ≤ this fraction of χ². */
  chiSquareTolerance?: number;
}

export type StopReason =
  /** the Gauss–Newton predicted decrease of χ² fell below chiSquareTolerance·χ² */
  | "chi-square-stationary"
  /** χ² reached zero to rounding: the model passes through every point */
  | "exact-fit"
  /** every parameter is fixed; nothing was fitted */
  | "no-free-parameters"
  /** not converged: the iteration cap was reached */
  | "max-iterations"
  /** not converged: neither the package nor our own steps could lower χ² any further */
  | "no-progress";

export interface LeastSquaresResult {
  /** Fitted values of every parameter (fixed ones at their held value). */
  params: number[];
  /** √diag(s²·C): standard errors scaled by the reduced χ²; null for fixed parameters or when covariance is null. */
  stdErrors: (number | null)[];
  /** √diag(C): standard errors taking σ as absolute; null for fixed parameters or when covariance is null. */
  stdErrorsUnscaled: (number | null)[];
  /** s²·(JᵀWJ)⁻¹ over all parameters (fixed rows/columns 0); null when JᵀWJ is singular. */
  covariance: number[][] | null;
  /** (JᵀWJ)⁻¹ over all parameters (fixed rows/columns 0); null when JᵀWJ is singular. */
  covarianceUnscaled: number[][] | null;
  /** C_ij/√(C_ii C_jj); null entries for fixed parameters; null when covariance is null. */
  correlation: (number | null)[][] | null;
  chiSquare: number;
  /** χ²/dof. */
  reducedChiSquare: number;
  /** N − k, k = number of free parameters. */
  dof: number;
  /** Akaike information criterion; see informationCriteria for the form used. */
  aic: number;
  /** Bayesian (Schwarz) information criterion; see informationCriteria for the form used. */
  bic: number;
  /**
   * "known-sigma": AIC = χ² + 2k, BIC = χ² + k·ln N (Gaussian errors with the given σ; −2 ln L up to a
   * constant). "estimated-sigma" (sigma null): AIC = N·ln(χ²/N) + 2(k+1), BIC = N·ln(χ²/N) + (k+1)·ln N,
   * the variance counted as one more parameter. Burnham & Anderson, Model Selection and Multimodel
   * Inference, 2nd ed. (2002), §2.2 and §6.4; Schwarz, Ann. Statist. 6 (1978) 461.
   */
  informationCriteria: "known-sigma" | "estimated-sigma";
  /** Package iterations plus our own (Gauss–Newton / Marquardt) steps. */
  iterations: number;
  /** How many of those iterations ml-levenberg-marquardt ran. */
  packageIterations: number;
  converged: boolean;
  stopReason: StopReason;
  /** N. */
  pointCount: number;
  /** k. */
  freeParameterCount: number;
  /** y_i − f(x_i; params), in the unit of y. */
  residuals: number[];
  /** true where a free parameter ended on one of its bounds. */
  atBound: boolean[];
}

const EPSILON = Number.EPSILON;
const FD_STEP = Math.cbrt(EPSILON);
/**
 * Smallest/largest singular value of the column-normalised Jacobian below which the covariance is
 * reported as null: 1e-12 with an analytic Jacobian; 1e-8 with finite differences, whose own relative
 * error (about 1e-11 for the five-point stencil, 1e-10 three-point) would otherwise make exactly
 * dependent columns look independent.
 */
const RANK_TOLERANCE_ANALYTIC = 1e-12;
const RANK_TOLERANCE_FINITE_DIFFERENCE = 1e-8;
/**
 * Our own steps per round between package bursts: enough for Gauss–Newton to finish from close by
 * (it converges quadratically there), few enough that from far away the package does the travelling.
 */
const OWN_STEPS_PER_ROUND = 3;
/** In one of our own steps a parameter moves at most |p_j| + this many 1/D_j (its statistical scale). */
const STEP_CAP_SCALES = 10;
/** No damped step lowers χ², and Gauss–Newton predicts less than this fraction of it: the rounding floor. */
const ROUNDING_FLOOR = 1e-9;

function checkNumberArray(value: unknown, name: string, length: number | null): asserts value is readonly number[] {
  if (!Array.isArray(value)) throw new TypeError(`${name} must be an array of numbers`);
  if (length !== null && value.length !== length) {
    throw new RangeError(`${name} must have length ${length} (got ${value.length})`);
  }
}

function checkFinite(values: readonly number[], name: string): void {
  for (let i = 0; i < values.length; i++) {
    if (typeof values[i] !== "number" || !Number.isFinite(values[i])) {
      throw new RangeError(`${name}[${i}] must be a finite number (got ${String(values[i])})`);
    }
  }
}

/**
 * Weighted nonlinear least-squares fit of y = f(x; p) with standard uncertainties σ.
 *
 * @param data x (any unit), y and sigma (unit of y; null for unit uncertainties)
 * @param model f(p, x) over the full parameter vector
 * @param options initial values, optional bounds, fixed flags, analytic Jacobian and stopping controls
 * @returns fitted parameters with scaled and unscaled standard errors and covariance, correlation, χ²,
 *   reduced χ², dof, AIC, BIC, iteration count and an honest convergence flag with its reason.
 *   Not converging is reported in the result, not thrown.
 * @throws TypeError when an argument is not an array or function; RangeError for wrong lengths,
 *   non-finite values, σ ≤ 0, a start outside its bounds, no more points than free parameters, or a
 *   model that is not finite at the start values.
 * @see Moré, "The Levenberg–Marquardt algorithm: implementation and theory", LNM 630 (1978) 105–116
 * @see Press et al., Numerical Recipes, 3rd ed. (2007), §15.5
 */
export function fitLeastSquares(
  data: LeastSquaresData,
  model: ModelFunction,
  options: LeastSquaresOptions,
): LeastSquaresResult {
  if (data === null || typeof data !== "object") throw new TypeError("data must be an object with x, y and sigma");
  if (typeof model !== "function") throw new TypeError("model must be a function (params, x) => y");
  if (options === null || typeof options !== "object") throw new TypeError("options must be an object");
  const { x, y, sigma } = data;
  checkNumberArray(x, "data.x", null);
  const n = x.length;
  checkNumberArray(y, "data.y", n);
  checkFinite(x, "data.x");
  checkFinite(y, "data.y");
  if (sigma !== null) {
    checkNumberArray(sigma, "data.sigma", n);
    for (let i = 0; i < n; i++) {
      if (!(typeof sigma[i] === "number" && Number.isFinite(sigma[i]) && sigma[i] > 0)) {
        throw new RangeError(`data.sigma[${i}] must be a finite number > 0 (got ${String(sigma[i])})`);
      }
    }
  }
  const initial = options.initialValues;
  checkNumberArray(initial, "options.initialValues", null);
  const p = initial.length;
  if (p === 0) throw new RangeError("options.initialValues must name at least one parameter");
  checkFinite(initial, "options.initialValues");
  const lower = options.lowerBounds ?? new Array<number>(p).fill(-Infinity);
  const upper = options.upperBounds ?? new Array<number>(p).fill(Infinity);
  checkNumberArray(lower, "options.lowerBounds", p);
  checkNumberArray(upper, "options.upperBounds", p);
  const fixedFlags = options.fixed ?? new Array<boolean>(p).fill(false);
  if (!Array.isArray(fixedFlags)) throw new TypeError("options.fixed must be an array of booleans");
  if (fixedFlags.length !== p) throw new RangeError(`options.fixed must have length ${p} (got ${fixedFlags.length})`);
  for (let j = 0; j < p; j++) {
    if (typeof fixedFlags[j] !== "boolean") throw new TypeError(`options.fixed[${j}] must be a boolean`);
    if (Number.isNaN(lower[j]) || Number.isNaN(upper[j])) throw new RangeError(`bounds of parameter ${j} must not be NaN`);
    if (!fixedFlags[j]) {
      if (!(lower[j] < upper[j])) {
        throw new RangeError(`options.lowerBounds[${j}] (${lower[j]}) must be below options.upperBounds[${j}] (${upper[j]}) for a free parameter`);
      }
      if (initial[j] < lower[j] || initial[j] > upper[j]) {
        throw new RangeError(`options.initialValues[${j}] (${initial[j]}) lies outside its bounds [${lower[j]}, ${upper[j]}]`);
      }
    }
  }
  const jacobian = options.jacobianFunction;
  if (jacobian !== undefined && typeof jacobian !== "function") {
    throw new TypeError("options.jacobianFunction must be a function (params, x) => dF/dp");
  }
  const maxIterations = options.maxIterations ?? 1000;
  if (!(Number.isInteger(maxIterations) && maxIterations >= 1)) {
    throw new RangeError(`options.maxIterations must be an integer ≥ 1 (got ${maxIterations})`);
  }
  const tolerance = options.chiSquareTolerance ?? 1e-14;
  if (!(tolerance > 0 && tolerance < 1)) {
    throw new RangeError(`options.chiSquareTolerance must lie in (0, 1) (got ${tolerance})`);
  }

  const free: number[] = [];
  for (let j = 0; j < p; j++) if (!fixedFlags[j]) free.push(j);
  const k = free.length;
  if (n === 0) throw new RangeError("data.x must hold at least one point");
  if (k > 0 && n <= k) {
    throw new RangeError(
      `the fit needs more points than free parameters to estimate uncertainties: ${n} point(s), ${k} free parameter(s)`,
    );
  }

  const invSigma = new Float64Array(n);
  const yWhite = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    invSigma[i] = sigma === null ? 1 : 1 / sigma[i];
    yWhite[i] = y[i] * invSigma[i];
  }
  const lo = free.map((j) => lower[j]);
  const hi = free.map((j) => upper[j]);

  const toFull = (q: ArrayLike<number>): number[] => {
    const full = initial.slice();
    for (let j = 0; j < k; j++) full[free[j]] = q[j];
    return full;
  };

  // The whitened residuals of the last χ² evaluation, so that linearising at an accepted trial point
  // (the same array) does not evaluate the model there a second time.
  let lastTrial: { q: ArrayLike<number>; r: Float64Array; chi2: number } | null = null;
  const chiSquareOf = (q: ArrayLike<number>): number => {
    const full = toFull(q);
    const r = new Float64Array(n);
    let sum = 0;
    for (let i = 0; i < n; i++) {
      r[i] = yWhite[i] - model(full, x[i]) * invSigma[i];
      sum += r[i] * r[i];
    }
    const chi2 = Number.isFinite(sum) ? sum : NaN;
    lastTrial = { q, r, chi2 };
    return chi2;
  };

  /** ∂f/∂q_j (unwhitened) at x for the free parameters, analytic or by central differences. */
  const gradientAt = (full: readonly number[]): ((xi: number) => ArrayLike<number>) => {
    if (jacobian !== undefined) {
      // With nothing fixed the model's own array is already in the right order (only ever read).
      if (k === p) return (xi) => jacobian(full, xi);
      return (xi) => {
        const g = jacobian(full, xi);
        const out = new Array<number>(k);
        for (let j = 0; j < k; j++) out[j] = g[free[j]];
        return out;
      };
    }
    // Finite differences with h = ε^(1/3)·|p|. The five-point central stencil
    // f' ≈ [8(f(p+h) − f(p−h)) − (f(p+2h) − f(p−2h))] / 12h has truncation error O((h/s)⁴), s the
    // scale on which the model changes with p; that matters when s ≪ |p| (a peak position, say), where
    // the three-point O((h/s)²) error alone costs digits of the covariance. Next to a bound the stencil
    // shrinks to three-point central, then one-sided (−3f(p) + 4f(p±h) − f(p±2h)) / ±2h, so the model
    // is never called outside its bounds. Fornberg, Math. Comp. 51 (1988) 699, Table 1.
    const stencils: { points: number[][]; weights: number[] }[] = [];
    for (let j = 0; j < k; j++) {
      const index = free[j];
      const v = full[index];
      const h = Math.min(FD_STEP * (Math.abs(v) || 1), (hi[j] - lo[j]) / 4);
      const at = (offset: number) => {
        const point = full.slice();
        point[index] = v + offset;
        return point;
      };
      const inside = (offset: number) => v + offset >= lo[j] && v + offset <= hi[j];
      let offsets: number[];
      let weights: number[];
      if (inside(2 * h) && inside(-2 * h)) {
        offsets = [h, -h, 2 * h, -2 * h];
        weights = [8 / 12, -8 / 12, -1 / 12, 1 / 12];
      } else if (inside(h) && inside(-h)) {
        offsets = [h, -h];
        weights = [1 / 2, -1 / 2];
      } else if (inside(2 * h)) {
        offsets = [0, h, 2 * h];
        weights = [-3 / 2, 2, -1 / 2];
      } else {
        offsets = [0, -h, -2 * h];
        weights = [3 / 2, -2, 1 / 2];
      }
      // Divide by the step actually represented in floating point.
      const hActual = v + h - v;
      stencils.push({ points: offsets.map(at), weights: weights.map((w) => w / hActual) });
    }
    return (xi) => {
      const out = new Array<number>(k);
      for (let j = 0; j < k; j++) {
        const { points, weights } = stencils[j];
        let d = 0;
        for (let m = 0; m < points.length; m++) d += weights[m] * model(points[m], xi);
        out[j] = d;
      }
      return out;
    };
  };

  /** Whitened residuals r, whitened Jacobian J (row-major n×k) and χ² at q. */
  const linearise = (q: readonly number[]) => {
    const full = toFull(q);
    const grad = gradientAt(full);
    const known = lastTrial !== null && lastTrial.q === q ? lastTrial : null;
    const r = known === null ? new Float64Array(n) : known.r;
    const jac = new Float64Array(n * k);
    let chi2 = 0;
    for (let i = 0; i < n; i++) {
      const s = invSigma[i];
      if (known === null) {
        r[i] = yWhite[i] - model(full, x[i]) * s;
        chi2 += r[i] * r[i];
      }
      const g = grad(x[i]);
      for (let j = 0; j < k; j++) jac[i * k + j] = g[j] * s;
    }
    if (known !== null) chi2 = known.chi2;
    return { r, jac, chi2: Number.isFinite(chi2) ? chi2 : NaN };
  };

  const columnNorms = (jac: Float64Array): number[] => {
    const norms = new Array<number>(k).fill(0);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < k; j++) norms[j] += jac[i * k + j] * jac[i * k + j];
    }
    return norms.map(Math.sqrt);
  };

  const clampToBounds = (q: number[]): number[] => q.map((v, j) => Math.min(Math.max(v, lo[j]), hi[j]));

  const finish = (
    q: readonly number[],
    iterations: number,
    packageIterations: number,
    converged: boolean,
    stopReason: StopReason,
    jacobianAtSolution: Float64Array | null = null,
  ) =>
    buildResult({
      q, iterations, packageIterations, converged, stopReason, n, k, p, free, initial, x, y, invSigma, model,
      jacobianAtSolution: jacobianAtSolution ?? (k > 0 ? linearise(q).jac : new Float64Array(0)),
      whitenedResiduals: lastTrial !== null && lastTrial.q === q ? lastTrial.r : null,
      sigmaGiven: sigma !== null, lo, hi,
      rankTolerance: jacobian === undefined ? RANK_TOLERANCE_FINITE_DIFFERENCE : RANK_TOLERANCE_ANALYTIC,
    });

  if (k === 0) return finish([], 0, 0, true, "no-free-parameters");

  let q = free.map((j) => initial[j]);
  let chi2 = chiSquareOf(q);
  if (!Number.isFinite(chi2)) {
    const full = toFull(q);
    const bad = x.findIndex((xi) => !Number.isFinite(model(full, xi)));
    throw new RangeError(`the model is not finite at the initial values (at data.x[${bad}] = ${x[bad]})`);
  }
  const yScale = yWhite.reduce((sum, v) => sum + v * v, 0);

  // Running-maximum column scaling (MINPACK lmder, mode 1), started from the Jacobian on about 64
  // evenly spread points (norms scaled up by √(N/m)); the full Jacobian updates it from then on.
  const scale = (() => {
    const stride = Math.max(1, Math.floor(n / 64));
    const grad = gradientAt(toFull(q));
    const sums = new Array<number>(k).fill(0);
    let count = 0;
    for (let i = 0; i < n; i += stride) {
      const g = grad(x[i]);
      for (let j = 0; j < k; j++) sums[j] += (g[j] * invSigma[i]) ** 2;
      count++;
    }
    return sums.map((sq, j) => {
      const c = Math.sqrt((sq * n) / count);
      return c > 0 && Number.isFinite(c) ? c : 1 / (Math.abs(q[j]) || 1);
    });
  })();
  const updateScale = (jac: Float64Array) => {
    const norms = columnNorms(jac);
    for (let j = 0; j < k; j++) if (Number.isFinite(norms[j]) && norms[j] > scale[j]) scale[j] = norms[j];
  };

  const indices = Float64Array.from({ length: n }, (_, i) => i);
  // The package evaluates the model twice at the same parameters in every iteration (after its update
  // for the error, then again at the start of the next step); the values at the last parameter vector
  // are kept and reused, filled lazily (NaN = not computed yet).
  let memoU: number[] | null = null;
  let memoValues = new Float64Array(0);
  const sameVector = (a: ArrayLike<number>, b: ArrayLike<number>) => {
    if (a.length !== b.length) return false;
    for (let j = 0; j < a.length; j++) if (a[j] !== b[j]) return false;
    return true;
  };
  const packageModel = (u: number[]) => {
    if (memoU !== null && sameVector(memoU, u)) {
      const cached = memoValues;
      const full = toFull(u.map((v, j) => v / scale[j]));
      return (i: number) => {
        let v = cached[i];
        if (Number.isNaN(v)) cached[i] = v = model(full, x[i]) * invSigma[i];
        return v;
      };
    }
    const full = toFull(u.map((v, j) => v / scale[j]));
    const values = new Float64Array(n).fill(NaN);
    memoU = u.slice();
    memoValues = values;
    return (i: number) => {
      let v = values[i];
      if (Number.isNaN(v)) values[i] = v = model(full, x[i]) * invSigma[i];
      return v;
    };
  };
  const packageJacobian = (u: number[]) => {
    const full = toFull(u.map((v, j) => v / scale[j]));
    const grad = gradientAt(full);
    return (i: number) => {
      const g = grad(x[i]);
      const out = new Array<number>(k);
      for (let j = 0; j < k; j++) out[j] = (g[j] * invSigma[i]) / scale[j];
      return out;
    };
  };

  let iterations = 0;
  let packageIterations = 0;
  let burst = 2;
  /** The Jacobian to build the covariance from: the last linearisation, if the step after it was negligible. */
  let finalJacobian: Float64Array | null = null;
  let stalledRounds = 0;
  // Marquardt damping of our own steps, relative to the unit diagonal; 0 = plain Gauss–Newton, tried first.
  let mu = 0;
  let nu = 2;
  let stopReason: StopReason | null = null;

  while (stopReason === null) {
    if (iterations >= maxIterations) {
      stopReason = "max-iterations";
      break;
    }
    const chi2AtRoundStart = chi2;

    // 1. A short run of the package from the current best point.
    const budget = Math.min(burst, maxIterations - iterations);
    burst = Math.min(burst * 2, 32);
    const u0 = q.map((v, j) => v * scale[j]);
    if (lastTrial !== null && lastTrial.q === q) {
      // The model values at the start are known from our last χ² evaluation there: f̃ = ỹ − r.
      // (Only when u → q round-trips exactly, as the package will divide u by the scale again.)
      if (sameVector(u0.map((v, j) => v / scale[j]), q)) {
        const known = lastTrial.r;
        memoU = u0.slice();
        memoValues = Float64Array.from(yWhite, (yw, i) => yw - known[i]);
      }
    }
    const run = levenbergMarquardt({ x: indices, y: yWhite }, packageModel, {
      initialValues: u0,
      minValues: lo.map((v, j) => v * scale[j]),
      maxValues: hi.map((v, j) => v * scale[j]),
      maxIterations: budget,
      errorTolerance: 0,
      jacobianFunction: packageJacobian,
    });
    iterations += Math.max(run.iterations, 1);
    packageIterations += run.iterations;
    // With unit weights on whitened data the package's parameterError is exactly χ² at its best point.
    const candidate = clampToBounds(run.parameterValues.map((v, j) => v / scale[j]));
    if (candidate.every(Number.isFinite) && run.parameterError < chi2) {
      q = candidate;
      chi2 = run.parameterError;
      // If the package's best point is the last one it evaluated, its residuals are known too.
      if (memoU !== null && sameVector(memoU, run.parameterValues) && sameVector(memoU.map((v, j) => v / scale[j]), q)) {
        const values = memoValues;
        if (!values.some(Number.isNaN)) {
          lastTrial = { q, r: Float64Array.from(yWhite, (yw, i) => yw - values[i]), chi2 };
        }
      }
    }

    // 2. Our own steps: the undamped Gauss–Newton prediction decides convergence; Marquardt-damped
    //    steps with rejection (Nielsen's damping update, IMM report 1999) make the progress.
    for (let own = 0; own < OWN_STEPS_PER_ROUND && stopReason === null && iterations < maxIterations; own++) {
      const state = linearise(q);
      if (!Number.isFinite(state.chi2)) break;
      chi2 = state.chi2;
      updateScale(state.jac);
      if (chi2 <= 1e-28 * yScale) {
        finalJacobian = state.jac;
        stopReason = "exact-fit";
        break;
      }
      const ne = normalEquations(state.jac, state.r, q, lo, hi, n, k);
      iterations++;
      const gaussNewton = dampedStep(ne, 0, k);
      const predicted = gaussNewton === null ? Infinity : Math.max(gaussNewton.gTdelta, 0);
      if (gaussNewton !== null && predicted <= tolerance * chi2) {
        // At the minimum χ² is flat to rounding, so comparing χ² resolves parameters only to about
        // √ε standard errors; the stationary step is more accurate than that comparison and is taken
        // unless it raises χ² beyond rounding. The Jacobian just computed is the one at the solution.
        const trial = clampToBounds(q.map((v, j) => v + gaussNewton.delta[j]));
        const chi2Trial = chiSquareOf(trial);
        if (chi2Trial <= chi2 * (1 + 1e-12)) {
          q = trial;
          chi2 = chi2Trial;
        }
        finalJacobian = state.jac;
        stopReason = "chi-square-stationary";
        break;
      }
      let accepted = false;
      for (let tries = 0; tries < 12 && !accepted; tries++) {
        const step = mu === 0 ? gaussNewton : dampedStep(ne, mu, k);
        if (step === null) {
          mu = Math.max(mu, 1e-4) * nu;
          nu *= 2;
          continue;
        }
        // Trust-region safeguard: no parameter moves by more than its own size plus a few of its
        // statistical scales (1/D_j) in one step; a longer step is shortened along its direction.
        let shrink = 1;
        for (let j = 0; j < k; j++) {
          const cap = Math.abs(q[j]) + STEP_CAP_SCALES / scale[j];
          if (Math.abs(step.delta[j]) > cap) shrink = Math.min(shrink, cap / Math.abs(step.delta[j]));
        }
        const trial = clampToBounds(q.map((v, j) => v + shrink * step.delta[j]));
        const chi2Trial = chiSquareOf(trial);
        // Predicted decrease of the linearised χ² for this step: 2gᵀδ − δᵀJᵀJδ.
        const model = 2 * shrink * step.gTdelta - shrink * shrink * step.quadratic;
        const rho = model > 0 ? (chi2 - chi2Trial) / model : -1;
        if (chi2Trial < chi2 && rho > 0) {
          q = trial;
          chi2 = chi2Trial;
          accepted = true;
          mu = mu * Math.max(1 / 3, 1 - (2 * rho - 1) ** 3);
          if (mu < 1e-8) mu = 0;
          nu = 2;
        } else {
          mu = Math.max(mu, 1e-4) * nu;
          nu *= 2;
        }
      }
      if (!accepted) {
        if (predicted <= ROUNDING_FLOOR * chi2) {
          // Not even tiny damped steps lower χ², and the Gauss–Newton model predicts a decrease at the
          // rounding level: this is the minimum to working precision.
          finalJacobian = state.jac;
          stopReason = "chi-square-stationary";
        }
        // Otherwise hand back to the package for another burst.
        mu = 0;
        nu = 2;
        break;
      }
    }
    if (stopReason !== null) break;

    if (chi2 < chi2AtRoundStart) {
      stalledRounds = 0;
    } else if (++stalledRounds >= 3) {
      stopReason = "no-progress";
    }
  }

  const converged = stopReason === "chi-square-stationary" || stopReason === "exact-fit";
  return finish(q, iterations, packageIterations, converged, stopReason, finalJacobian);
}

interface NormalEquations {
  /** JᵀJ (lower triangle filled), k×k */
  a: number[][];
  /** Jᵀr */
  g: number[];
  /** Free parameters that may move: not held on a bound by the gradient, and with a nonzero column. */
  active: number[];
  /** √(JᵀJ)_jj of the active parameters, for the unit-diagonal scaling. */
  d: number[];
}

function normalEquations(
  jac: Float64Array,
  r: Float64Array,
  q: readonly number[],
  lo: readonly number[],
  hi: readonly number[],
  n: number,
  k: number,
): NormalEquations {
  // Accumulate JᵀJ (lower triangle) and Jᵀr in flat typed arrays: this loop runs over every point.
  const flat = new Float64Array(k * k);
  const gFlat = new Float64Array(k);
  for (let i = 0; i < n; i++) {
    const row = i * k;
    const ri = r[i];
    for (let j = 0; j < k; j++) {
      const jj = jac[row + j];
      gFlat[j] += jj * ri;
      const base = j * k;
      for (let m = 0; m <= j; m++) flat[base + m] += jj * jac[row + m];
    }
  }
  const a: number[][] = Array.from({ length: k }, (_, j) => Array.from(flat.subarray(j * k, j * k + k)));
  const g = Array.from(gFlat);
  // χ² decreases when q_j moves along g_j; a parameter on a bound with g pointing outwards stays put.
  const active: number[] = [];
  for (let j = 0; j < k; j++) {
    const blocked = (q[j] <= lo[j] && g[j] <= 0) || (q[j] >= hi[j] && g[j] >= 0);
    if (!blocked && a[j][j] > 0 && Number.isFinite(a[j][j])) active.push(j);
  }
  return { a, g, active, d: active.map((j) => Math.sqrt(a[j][j])) };
}

/**
 * Solves (JᵀJ + μ·diag(JᵀJ))·δ = Jᵀr on the active parameters (Marquardt's scale-invariant damping; μ = 0
 * is the Gauss–Newton step), scaled to unit diagonal for the Cholesky solve. Returns δ with
 * gᵀδ (the Gauss–Newton predicted χ² decrease when μ = 0) and δᵀJᵀJδ, or null if the system is not
 * numerically positive definite.
 */
function dampedStep(ne: NormalEquations, mu: number, k: number): { delta: number[]; gTdelta: number; quadratic: number } | null {
  const { a, g, active, d } = ne;
  const delta = new Array<number>(k).fill(0);
  if (active.length === 0) return { delta, gTdelta: 0, quadratic: 0 };
  const m = active.map((j, i) =>
    active.map((l, c) => {
      const v = (j >= l ? a[j][l] : a[l][j]) / (d[i] * d[c]);
      return i === c ? v * (1 + mu) : v;
    }),
  );
  const solution = choleskySolve(
    m,
    active.map((j, i) => g[j] / d[i]),
  );
  if (solution === null || !solution.every(Number.isFinite)) return null;
  let gTdelta = 0;
  active.forEach((j, i) => {
    delta[j] = solution[i] / d[i];
    gTdelta += g[j] * delta[j];
  });
  let quadratic = 0;
  for (const j of active) for (const l of active) quadratic += delta[j] * (j >= l ? a[j][l] : a[l][j]) * delta[l];
  return { delta, gTdelta, quadratic };
}

interface BuildArgs {
  q: readonly number[];
  iterations: number;
  packageIterations: number;
  converged: boolean;
  stopReason: StopReason;
  n: number;
  k: number;
  p: number;
  free: readonly number[];
  initial: readonly number[];
  x: readonly number[];
  y: readonly number[];
  invSigma: Float64Array;
  model: ModelFunction;
  jacobianAtSolution: Float64Array;
  /** (y − f)/σ at q when already known. */
  whitenedResiduals: Float64Array | null;
  rankTolerance: number;
  sigmaGiven: boolean;
  lo: readonly number[];
  hi: readonly number[];
}

function buildResult(args: BuildArgs): LeastSquaresResult {
  const { q, n, k, p, free, initial, x, y, model, sigmaGiven } = args;
  const params = initial.slice();
  for (let j = 0; j < k; j++) params[free[j]] = q[j];
  const known = args.whitenedResiduals;
  const residuals = known === null ? x.map((xi, i) => y[i] - model(params, xi)) : Array.from(known, (r, i) => r / args.invSigma[i]);
  let chiSquare = 0;
  for (let i = 0; i < n; i++) {
    const rw = residuals[i] * args.invSigma[i];
    chiSquare += rw * rw;
  }
  const dof = n - k;
  const reducedChiSquare = dof > 0 ? chiSquare / dof : NaN;

  let covarianceUnscaled: number[][] | null = null;
  if (k > 0) {
    covarianceUnscaled = freeCovariance(args.jacobianAtSolution, n, k, free, p, args.rankTolerance);
  } else {
    covarianceUnscaled = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  }
  const covariance = covarianceUnscaled === null ? null : covarianceUnscaled.map((row) => row.map((v) => v * reducedChiSquare));
  const isFree = new Array<boolean>(p).fill(false);
  for (const j of free) isFree[j] = true;
  const stdErrorsUnscaled = params.map((_, j) =>
    covarianceUnscaled !== null && isFree[j] ? Math.sqrt(covarianceUnscaled[j][j]) : null,
  );
  const stdErrors = params.map((_, j) => (covariance !== null && isFree[j] ? Math.sqrt(covariance[j][j]) : null));
  const correlation =
    covarianceUnscaled === null
      ? null
      : params.map((_, i) =>
          params.map((__, j) => {
            if (!isFree[i] || !isFree[j]) return null;
            if (i === j) return 1;
            const c = covarianceUnscaled![i][j] / Math.sqrt(covarianceUnscaled![i][i] * covarianceUnscaled![j][j]);
            return Math.max(-1, Math.min(1, c));
          }),
        );

  // Information criteria (see LeastSquaresResult.informationCriteria for the forms and sources).
  let aic: number;
  let bic: number;
  if (sigmaGiven) {
    aic = chiSquare + 2 * k;
    bic = chiSquare + k * Math.log(n);
  } else {
    const logVariance = n * Math.log(chiSquare / n);
    aic = logVariance + 2 * (k + 1);
    bic = logVariance + (k + 1) * Math.log(n);
  }

  const atBound = params.map((v, j) => {
    const f = free.indexOf(j);
    if (f < 0) return false;
    return v <= args.lo[f] || v >= args.hi[f];
  });

  return {
    params,
    stdErrors,
    stdErrorsUnscaled,
    covariance,
    covarianceUnscaled,
    correlation,
    chiSquare,
    reducedChiSquare,
    dof,
    aic,
    bic,
    informationCriteria: sigmaGiven ? "known-sigma" : "estimated-sigma",
    iterations: args.iterations,
    packageIterations: args.packageIterations,
    converged: args.converged,
    stopReason: args.stopReason,
    pointCount: n,
    freeParameterCount: k,
    residuals,
    atBound,
  };
}

/**
 * (JᵀJ)⁻¹ of the whitened Jacobian, embedded in p×p. J is column-normalised and QR-factorised
 * (Householder), then the small k×k factor R goes through ml-matrix's SVD: JᵀJ = RᵀR = V·S²·Vᵀ, so
 * (JᵀJ)⁻¹ = V·S⁻²·Vᵀ with S the singular values of J itself (no squared condition number), at O(N·k²).
 */
function freeCovariance(
  jac: Float64Array,
  n: number,
  k: number,
  free: readonly number[],
  p: number,
  rankTolerance: number,
): number[][] | null {
  const norms = new Array<number>(k).fill(0);
  for (let i = 0; i < n; i++) for (let j = 0; j < k; j++) norms[j] += jac[i * k + j] * jac[i * k + j];
  for (let j = 0; j < k; j++) {
    norms[j] = Math.sqrt(norms[j]);
    if (!(norms[j] > 0) || !Number.isFinite(norms[j])) return null;
  }
  const scaled = new Float64Array(n * k);
  for (let i = 0; i < n; i++) for (let j = 0; j < k; j++) scaled[i * k + j] = jac[i * k + j] / norms[j];
  const { r } = householderQR(scaled, n, k);
  const svd = new SingularValueDecomposition(new Matrix(r), { computeLeftSingularVectors: false });
  const s = svd.diagonal;
  const v = svd.rightSingularVectors;
  const sMax = Math.max(...s);
  if (!(sMax > 0) || s.some((si) => !(si > rankTolerance * sMax))) return null;
  const out = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let a = 0; a < k; a++) {
    for (let b = 0; b < k; b++) {
      let sum = 0;
      for (let c = 0; c < k; c++) sum += (v.get(a, c) * v.get(b, c)) / (s[c] * s[c]);
      out[free[a]][free[b]] = sum / (norms[a] * norms[b]);
    }
  }
  return out;
}
