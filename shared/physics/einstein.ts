/*
 * Einstein model of the lattice heat capacity: n_E atoms whose 3 n_E oscillators all vibrate at one
 * frequency ω_E = k_B θ_E / ħ.
 *
 *   C_E(T) = 3 n_E R · E(x),   E(x) = x² eˣ / (eˣ − 1)²,   x = θ_E / T
 *
 * Units: T in K; C in J/(mol·K) per mole of formula units; θ_E in K; n_E dimensionless (atoms per
 * formula unit assigned to the mode).
 * Source: A. Einstein, Ann. Phys. 22, 180 (1907), doi:10.1002/andp.19063270110; in this form e.g.
 * C. Kittel, Introduction to Solid State Physics, 8th ed., ch. 5.
 * Valid for any x ≥ 0: E is evaluated without overflow as (x·e^{−x/2} / (−expm1(−x)))², which stays
 * exact to a few ulp from x = 1e-300 to 1490 (beyond, e^{−x/2} underflows and E = 0, its true value
 * rounded). E(0) = 1 is the T → ∞ limit.
 */
import { GAS_CONSTANT } from "./constants";
import { BERNOULLI_OVER_FACTORIAL } from "./debye-coefficients";
import type { ParamSpec } from "./model-types";

/**
 * The Einstein function E(x) = C_E/(3nR) = x² eˣ/(eˣ − 1)².
 * @param x θ_E/T (dimensionless)
 * @returns E(x) in [0, 1]; 1 at x = 0 (the T → ∞ limit), 0 at +Infinity, NaN for NaN or x < 0
 * @see A. Einstein, Ann. Phys. 22, 180 (1907)
 */
export function einsteinFunction(x: number): number {
  if (!(x >= 0)) return Number.NaN;
  if (x === 0) return 1;
  if (x === Number.POSITIVE_INFINITY) return 0;
  // E = (x e^{-x/2} / (1 − e^{-x}))²: e^{-x/2} keeps x·e^{-x/2} normal up to x ≈ 1400, and expm1
  // avoids the cancellation in 1 − e^{-x} at small x.
  const r = (x * Math.exp(-0.5 * x)) / -Math.expm1(-x);
  return r * r;
}

/** Below this x the derivative uses its Bernoulli series (the closed form cancels there). */
const DERIVATIVE_SERIES_X_MAX = 1;

/**
 * dE/dx of the Einstein function.
 * Closed form dE/dx = (2E/x)·(1 − x/2 − x/(eˣ − 1)); for x < 1 the bracket cancels to −x²/12, so there
 * it is summed as −Σ_k B_2k x^{2k}/(2k)! (generating function of the Bernoulli numbers, A&S 23.1.1).
 * @param x θ_E/T (dimensionless)
 * @returns dE/dx (dimensionless, ≤ 0); 0 at x = 0 and +Infinity; NaN for NaN or x < 0
 * @see M. Abramowitz and I. A. Stegun, Handbook of Mathematical Functions (1964), eq. 23.1.1
 */
export function einsteinFunctionDerivative(x: number): number {
  if (!(x >= 0)) return Number.NaN;
  return derivativeGivenValue(x, einsteinFunction(x));
}

/**
 * E(x) and dE/dx together, sharing one evaluation of E (for jacobians).
 * @param x θ_E/T (dimensionless)
 * @returns [E(x), dE/dx], each as einsteinFunction and einsteinFunctionDerivative give them
 */
export function einsteinValueAndSlope(x: number): [number, number] {
  if (!(x >= 0)) return [Number.NaN, Number.NaN];
  const e = einsteinFunction(x);
  return [e, derivativeGivenValue(x, e)];
}

/** dE/dx for x ≥ 0 given e = E(x). */
function derivativeGivenValue(x: number, e: number): number {
  if (x === 0 || x === Number.POSITIVE_INFINITY) return 0;
  if (x < DERIVATIVE_SERIES_X_MAX) {
    // Σ_k B_2k x^{2k−1}/(2k)!, 12 terms: the (k+1)th term is below 1e-19 of the first for x < 1.
    const x2 = x * x;
    let s = 0;
    for (let k = 11; k >= 0; k--) s = s * x2 + BERNOULLI_OVER_FACTORIAL[k];
    return -2 * e * x * s;
  }
  // expm1 overflows to Infinity above x ≈ 709.8, where x/expm1(x) correctly becomes 0.
  return ((2 * e) / x) * (1 - 0.5 * x - x / Math.expm1(x));
}

/** Parameters of the Einstein component: [thetaE, nE]. */
export const params: readonly ParamSpec[] = [
  { name: "thetaE", unit: "K", lower: 0, upper: 1e5 },
  { name: "nE", unit: "1", lower: 0, upper: Number.POSITIVE_INFINITY },
];

/**
 * Einstein heat capacity C_E = 3 n_E R E(θ_E/T).
 * @param p [thetaE in K, nE dimensionless]
 * @param temperatureK T in K (> 0)
 * @returns J/(mol·K)
 * @see A. Einstein, Ann. Phys. 22, 180 (1907)
 */
export function evaluate(p: readonly number[], temperatureK: number): number {
  return 3 * p[1] * GAS_CONSTANT * einsteinFunction(p[0] / temperatureK);
}

/**
 * Analytic ∂C_E/∂[thetaE, nE].
 * @param p [thetaE in K, nE]
 * @param temperatureK T in K (> 0)
 * @returns [J/(mol·K²), J/(mol·K)]
 */
export function jacobian(p: readonly number[], temperatureK: number): number[] {
  const [value, slope] = einsteinValueAndSlope(p[0] / temperatureK);
  return [(3 * p[1] * GAS_CONSTANT * slope) / temperatureK, 3 * GAS_CONSTANT * value];
}
