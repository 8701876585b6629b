/*
 * Quintic term of the low-temperature heat-capacity expansion, the first correction to the T³ law
 * from the dispersion of the acoustic phonons.
 *
 *   C_5(T) = δ T⁵   (used as C = γT + βT³ + δT⁵, i.e. C/T = γ + βT² + δT⁴)
 *
 * Units: T in K; C in J/(mol·K) per mole of formula units; δ (delta) in J/(mol·K⁶).
 * Source: the harmonic-lattice low-T expansion C = Σ a_k T^{2k+1}, e.g. E. S. R. Gopal, Specific Heats
 * at Low Temperatures (Plenum, 1966).
 * Valid at low T (roughly below θ_D/20); δ may take either sign.
 */
import type { ParamSpec } from "./model-types";

/** Parameters: [delta]. */
export const params: readonly ParamSpec[] = [
  { name: "delta", unit: "J/(mol·K⁶)", lower: Number.NEGATIVE_INFINITY, upper: Number.POSITIVE_INFINITY },
];

/**
 * δT⁵.
 * @param p [delta in J/(mol·K⁶)]
 * @param temperatureK T in K
 * @returns J/(mol·K)
 */
export function evaluate(p: readonly number[], temperatureK: number): number {
  const t2 = temperatureK * temperatureK;
  return p[0] * t2 * t2 * temperatureK;
}

/**
 * ∂(δT⁵)/∂δ = T⁵.
 * @param p [delta]
 * @param temperatureK T in K
 * @returns [K⁵]
 */
export function jacobian(_p: readonly number[], temperatureK: number): number[] {
  const t2 = temperatureK * temperatureK;
  return [t2 * t2 * temperatureK];
}
