/*
 * Two-level Schottky anomaly: n_S centres per formula unit, each with a ground level of degeneracy g₀
 * and an excited level of degeneracy g₁ at energy k_B Δ above it.
 *
 *   C_S(T) = n_S R (Δ/T)² g e^{Δ/T} / (1 + g e^{Δ/T})²,   g = g₀/g₁
 *
 * Units: T in K; C in J/(mol·K) per mole of formula units; Δ (gap) in K; n_S and g (gRatio) dimensionless.
 * Source: W. Schottky, Phys. Z. 23, 448 (1922); in this form e.g. E. S. R. Gopal, Specific Heats at Low
 * Temperatures (Plenum, 1966) and A. Tari, The Specific Heat of Matter at Low Temperatures (2003).
 * Valid for any T > 0, Δ ≥ 0, g > 0. Evaluated overflow-free: with w = g e^{Δ/T}, w/(1+w)² is symmetric
 * under w → 1/w, so it is computed from v = e^{−|ln g + Δ/T|} ≤ 1 as v/(1+v)².
 */
import { GAS_CONSTANT } from "./constants";
import type { ParamSpec } from "./model-types";

/** Parameters: [gap, nS, gRatio]. */
export const params: readonly ParamSpec[] = [
  { name: "gap", unit: "K", lower: 0, upper: 1e5 },
  { name: "nS", unit: "1", lower: 0, upper: Number.POSITIVE_INFINITY },
  // gRatio must be > 0: at g = 0 the anomaly vanishes and so do all its derivatives.
  { name: "gRatio", unit: "1", lower: 0, upper: Number.POSITIVE_INFINITY },
];

/**
 * The dimensionless two-level shape (Δ/T)² w/(1+w)², w = g e^{Δ/T}, and (1 − w)/(1 + w) for the derivatives.
 * Both are evaluated from v = e^{−|z|}, z = ln w, so nothing overflows.
 */
function shape(y: number, g: number): { f: number; s: number } {
  const z = Math.log(g) + y;
  const v = Math.exp(-Math.abs(z));
  const f = v / ((1 + v) * (1 + v));
  // (1 − w)/(1 + w) = −tanh(z/2); written with v: for z > 0 it is −(1 − v)/(1 + v).
  const s = z > 0 ? -(1 - v) / (1 + v) : (1 - v) / (1 + v);
  return { f, s };
}

/**
 * Two-level Schottky heat capacity.
 * @param p [gap Δ in K, nS, gRatio g = g₀/g₁]
 * @param temperatureK T in K (> 0)
 * @returns J/(mol·K); 0 where the anomaly is exponentially small (including Δ/T → ∞)
 * @see W. Schottky, Phys. Z. 23, 448 (1922)
 */
export function evaluate(p: readonly number[], temperatureK: number): number {
  const y = p[0] / temperatureK;
  const { f } = shape(y, p[2]);
  if (f === 0) return 0;
  return p[1] * GAS_CONSTANT * y * y * f;
}

/**
 * Analytic ∂C_S/∂[gap, nS, gRatio]:
 * ∂/∂Δ = n_S R (y/T) F [2 + y S], ∂/∂n_S = R y² F, ∂/∂g = n_S R y² F S / g, with y = Δ/T,
 * F = w/(1+w)², S = (1 − w)/(1 + w).
 * @param p [gap in K, nS, gRatio]
 * @param temperatureK T in K (> 0)
 * @returns [J/(mol·K²), J/(mol·K), J/(mol·K)]
 */
export function jacobian(p: readonly number[], temperatureK: number): number[] {
  const y = p[0] / temperatureK;
  const { f, s } = shape(y, p[2]);
  if (f === 0) return [0, 0, 0];
  const r = GAS_CONSTANT * y * y * f;
  return [p[1] * GAS_CONSTANT * (y / temperatureK) * f * (2 + y * s), r, (p[1] * r * s) / p[2]];
}
