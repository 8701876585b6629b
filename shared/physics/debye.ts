/*
 * Debye model of the lattice heat capacity: n_D atoms whose 3 n_D vibrational modes fill a d-dimensional
 * phonon density of states g(ω) ∝ ω^{d−1} up to the cut-off k_B θ_D/ħ (d = 3: ordinary solids;
 * d = 2, 1: layered and chain solids, with every atom still carrying 3 modes).
 *
 *   C_D(T) = 3 n_D R · D_d(x),   D_d(x) = (d/x^d) ∫₀ˣ t^{d+1} eᵗ/(eᵗ − 1)² dt,   x = θ_D/T
 *
 * For d = 3 this is C_D = 9 n_D R (T/θ_D)³ ∫₀^{θ_D/T} t⁴eᵗ/(eᵗ−1)² dt. D_d → 1 as x → 0 (Dulong–Petit,
 * 3 n_D R) and D_d → d Γ(d+2) ζ(d+1)/x^d as x → ∞ (for d = 3: (12π⁴/5) n_D R (T/θ_D)³).
 * Units: T in K; C in J/(mol·K) per mole of formula units; θ_D in K; n_D dimensionless.
 * Source: P. Debye, Ann. Phys. 39, 789 (1912), doi:10.1002/andp.19123441404; the d-dimensional density of
 * states g(ω) ∝ ω^{d−1} is the usual model of layered (d = 2) and chain (d = 1) lattices (V. V. Tarasov's
 * models; e.g. A. Tari, The Specific Heat of Matter at Low Temperatures, Imperial College Press, 2003).
 * Valid for all x ≥ 0 (T > 0). Numerics, each branch exact to about 1e-15 relative (tested against mpmath):
 *  - 0 ≤ x ≤ 4: Chebyshev series in u = 2(x/4)² − 1 (coefficients from
 *    fixtures/physics/debye/generate-coefficients.py), summed by Clenshaw's recurrence;
 *  - x > 4: exact large-x form ∫₀ˣ = Γ(d+2)ζ(d+1) − Σ_{k≥1} k ∫ₓ^∞ t^{d+1} e^{−kt} dt, each tail integral in
 *    closed form, the sum stopped once a term is below 1e-17 of the total (11 terms at x = 4, 1 above x ≈ 50,
 *    none once e^{−x} underflows).
 */
import gamma from "@stdlib/math-base-special-gamma";
import { GAS_CONSTANT } from "./constants";
import { DEBYE_CHEBYSHEV, DEBYE_CHEBYSHEV_X_MAX, DEBYE_DERIVATIVE_CHEBYSHEV } from "./debye-coefficients";
import { einsteinFunction } from "./einstein";
import type { ParamSpec } from "./model-types";

/** Lattice dimension of a Debye component. */
export type DebyeDimension = 1 | 2 | 3;

// Riemann zeta at 2, 3, 4: ζ(2) = π²/6 (OEIS A013661), ζ(3) Apéry's constant (OEIS A002117),
// ζ(4) = π⁴/90 (OEIS A013662), each the double nearest the exact value.
const ZETA = [Number.NaN, Number.NaN, 1.6449340668482264, 1.2020569031595942, 1.0823232337111381];

/** ∫₀^∞ t^{d+1} eᵗ/(eᵗ − 1)² dt = Γ(d+2) ζ(d+1) for d = 1, 2, 3 (index d). */
const FULL_INTEGRAL = [Number.NaN, gamma(3) * ZETA[2], gamma(4) * ZETA[3], gamma(5) * ZETA[4]];

const X_MAX = DEBYE_CHEBYSHEV_X_MAX;

/** 1/k for the tail sum (a table lookup is cheaper than a division in the inner loop). */
const RECIPROCALS = Array.from({ length: 64 }, (_, k) => (k === 0 ? 0 : 1 / k));

function isDimension(d: number): d is DebyeDimension {
  return d === 1 || d === 2 || d === 3;
}

/** Σ a_j T_j(u) by Clenshaw's recurrence (a_0 already halved in the table). */
function chebyshevSum(a: readonly number[], u: number): number {
  const u2 = 2 * u;
  let b1 = 0;
  let b2 = 0;
  for (let j = a.length - 1; j >= 1; j--) {
    const b0 = u2 * b1 - b2 + a[j];
    b2 = b1;
    b1 = b0;
  }
  return u * b1 - b2 + a[0];
}

/**
 * ∫₀ˣ t^{d+1} eᵗ/(eᵗ−1)² dt for x > X_MAX as Γ(d+2)ζ(d+1) minus the tail. eᵗ/(eᵗ−1)² = Σ_k k e^{−kt}, and
 * k ∫ₓ^∞ t^m e^{−kt} dt = e^{−kx} Σ_{i=0}^{m} m!/(m−i)! x^{m−i} k^{−i}  (m = d+1), a polynomial in 1/k.
 */
function integralLargeX(x: number, d: DebyeDimension): number {
  const full = FULL_INTEGRAL[d];
  const ex = Math.exp(-x);
  if (ex === 0) return full;
  // Coefficients of the polynomial in q = 1/k, highest power first (m = d + 1).
  let c0: number, c1: number, c2: number, c3: number, c4: number;
  if (d === 1) {
    c4 = 0;
    c3 = 0;
    c2 = 2;
    c1 = 2 * x;
    c0 = x * x;
  } else if (d === 2) {
    c4 = 0;
    c3 = 6;
    c2 = 6 * x;
    c1 = 3 * x * x;
    c0 = x * x * x;
  } else {
    const x2 = x * x;
    c4 = 24;
    c3 = 24 * x;
    c2 = 12 * x2;
    c1 = 4 * x2 * x;
    c0 = x2 * x2;
  }
  const stop = 1e-17 * full;
  let tail = 0;
  let ekx = ex;
  for (let k = 1; k < 64; k++) {
    const q = RECIPROCALS[k];
    const term = ekx * ((((c4 * q + c3) * q + c2) * q + c1) * q + c0);
    tail += term;
    if (term < stop) break;
    ekx *= ex;
  }
  return full - tail;
}

/**
 * The Debye heat-capacity function D_d(x) = C_D/(3 n R) = (d/x^d) ∫₀ˣ t^{d+1} eᵗ/(eᵗ−1)² dt.
 * @param x θ_D/T (dimensionless)
 * @param dimension lattice dimension d: 1, 2 or 3
 * @returns D_d(x) in [0, 1]; 1 at x = 0 (the T → ∞ limit), 0 at +Infinity; NaN for NaN, x < 0 or another dimension
 * @see P. Debye, Ann. Phys. 39, 789 (1912); checked against mpmath 1.3.0 in fixtures/physics/debye
 */
export function debyeFunction(x: number, dimension: DebyeDimension = 3): number {
  if (!(x >= 0) || !isDimension(dimension)) return Number.NaN;
  if (x <= X_MAX) {
    const r = x / X_MAX;
    return chebyshevSum(DEBYE_CHEBYSHEV[dimension - 1], 2 * r * r - 1);
  }
  if (x === Number.POSITIVE_INFINITY) return 0;
  // Divide by x one power at a time: x^d alone would overflow for x > 1e102 while the result is still normal.
  let v = dimension * integralLargeX(x, dimension);
  for (let i = 0; i < dimension; i++) v /= x;
  return v;
}

/**
 * dD_d/dx of the Debye heat-capacity function.
 * For x ≤ 4 a Chebyshev series of D_d'(x)/x (generated with the values); above, the identity
 * D_d'(x) = (d/x)(E(x) − D_d(x)) with E the Einstein function (differentiate the definition), which has no
 * harmful cancellation there.
 * @param x θ_D/T (dimensionless)
 * @param dimension lattice dimension d: 1, 2 or 3
 * @returns dD_d/dx (dimensionless, ≤ 0); 0 at x = 0 and +Infinity; NaN for NaN, x < 0 or another dimension
 */
export function debyeFunctionDerivative(x: number, dimension: DebyeDimension = 3): number {
  if (!(x >= 0) || !isDimension(dimension)) return Number.NaN;
  return derivativeGivenValue(x, dimension, x <= X_MAX ? 0 : debyeFunction(x, dimension));
}

/** D_d'(x) for valid x ≥ 0 and d; `value` must be D_d(x) when x > X_MAX (unused below). */
function derivativeGivenValue(x: number, d: DebyeDimension, value: number): number {
  if (x === 0) return 0;
  if (x <= X_MAX) {
    const r = x / X_MAX;
    return x * chebyshevSum(DEBYE_DERIVATIVE_CHEBYSHEV[d - 1], 2 * r * r - 1);
  }
  if (x === Number.POSITIVE_INFINITY) return 0;
  return (d / x) * (einsteinFunction(x) - value);
}

/**
 * D_d(x) and dD_d/dx together, sharing one evaluation of D_d (for jacobians).
 * @param x θ_D/T (dimensionless)
 * @param dimension lattice dimension d: 1, 2 or 3
 * @returns [D_d(x), dD_d/dx], each as debyeFunction and debyeFunctionDerivative give them
 */
export function debyeValueAndSlope(x: number, dimension: DebyeDimension = 3): [number, number] {
  if (!(x >= 0) || !isDimension(dimension)) return [Number.NaN, Number.NaN];
  const value = debyeFunction(x, dimension);
  return [value, derivativeGivenValue(x, dimension, value)];
}

/**
 * Low-temperature (T ≪ θ_D) limit of the Debye heat capacity, 3 n R · d Γ(d+2) ζ(d+1) (T/θ_D)^d;
 * for d = 3 this is the T³ law (12π⁴/5) n R (T/θ_D)³.
 * @param temperatureK T in K
 * @param thetaD Debye temperature θ_D in K (> 0)
 * @param atomsN atoms n per formula unit
 * @param dimension lattice dimension d: 1, 2 or 3
 * @returns J/(mol·K) per mole of formula units; NaN for another dimension
 * @see P. Debye, Ann. Phys. 39, 789 (1912); Kittel, Introduction to Solid State Physics, 8th ed., ch. 5 (Debye T³ law)
 */
export function debyeLowTLimit(
  temperatureK: number,
  thetaD: number,
  atomsN: number,
  dimension: DebyeDimension = 3,
): number {
  if (!isDimension(dimension)) return Number.NaN;
  return 3 * atomsN * GAS_CONSTANT * dimension * FULL_INTEGRAL[dimension] * (temperatureK / thetaD) ** dimension;
}

/** Parameters of the Debye component: [thetaD, nD]. */
export const params: readonly ParamSpec[] = [
  { name: "thetaD", unit: "K", lower: 0, upper: 1e5 },
  { name: "nD", unit: "1", lower: 0, upper: Number.POSITIVE_INFINITY },
];

/**
 * Debye heat capacity C_D = 3 n_D R D_d(θ_D/T).
 * @param p [thetaD in K, nD dimensionless]
 * @param temperatureK T in K (> 0)
 * @param dimension lattice dimension d: 1, 2 or 3
 * @returns J/(mol·K)
 */
export function evaluate(p: readonly number[], temperatureK: number, dimension: DebyeDimension = 3): number {
  return 3 * p[1] * GAS_CONSTANT * debyeFunction(p[0] / temperatureK, dimension);
}

/**
 * Analytic ∂C_D/∂[thetaD, nD].
 * @param p [thetaD in K, nD]
 * @param temperatureK T in K (> 0)
 * @param dimension lattice dimension d: 1, 2 or 3
 * @returns [J/(mol·K²), J/(mol·K)]
 */
export function jacobian(p: readonly number[], temperatureK: number, dimension: DebyeDimension = 3): number[] {
  const [value, slope] = debyeValueAndSlope(p[0] / temperatureK, dimension);
  return [(3 * p[1] * GAS_CONSTANT * slope) / temperatureK, 3 * GAS_CONSTANT * value];
}
