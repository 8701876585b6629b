/*
 * Nuclear (hyperfine) tail: the high-temperature side of the nuclear Schottky anomaly, seen below a few
 * kelvin in materials with large hyperfine fields or nuclear quadrupole splittings.
 *
 *   C_N(T) = A / T²
 *
 * Units: T in K; C in J/(mol·K) per mole of formula units; A (nuclearA) in J·K/(mol).
 * Source: the T ≫ Δ_nuclear expansion of a Schottky anomaly (see schottky.ts), e.g. E. S. R. Gopal,
 * Specific Heats at Low Temperatures (Plenum, 1966).
 * Valid only while k_B T is well above the nuclear level splitting (so not below ~10 mK). A is left
 * unbounded (see electronic.ts for why); it must not be used as a low-T model for entropy, since
 * ∫ A/T³ dT diverges at 0.
 */
import type { ParamSpec } from "./model-types";

/** Parameters: [nuclearA]. */
export const params: readonly ParamSpec[] = [
  { name: "nuclearA", unit: "J·K/mol", lower: Number.NEGATIVE_INFINITY, upper: Number.POSITIVE_INFINITY },
];

/**
 * A/T².
 * @param p [nuclearA in J·K/mol]
 * @param temperatureK T in K (> 0)
 * @returns J/(mol·K)
 */
export function evaluate(p: readonly number[], temperatureK: number): number {
  return p[0] / (temperatureK * temperatureK);
}

/**
 * ∂(A/T²)/∂A = 1/T².
 * @param p [nuclearA]
 * @param temperatureK T in K (> 0)
 * @returns [1/K²]
 */
export function jacobian(_p: readonly number[], temperatureK: number): number[] {
  return [1 / (temperatureK * temperatureK)];
}
