/*
 * Electronic (Sommerfeld) heat capacity of a metal's conduction electrons, linear in T well below the
 * Fermi temperature.
 *
 *   C_el(T) = γ T
 *
 * Units: T in K; C in J/(mol·K) per mole of formula units; γ (gamma) in J/(mol·K²).
 * Source: A. Sommerfeld, Z. Phys. 47, 1 (1928), doi:10.1007/BF01391052; Kittel, Introduction to Solid
 * State Physics, 8th ed., ch. 6, eq. 34.
 * Valid for T ≪ T_F (always, in a calorimeter). γ is left unbounded: a fitted γ < 0 is a finding
 * (addenda over-subtracted, window too narrow) that clamping would hide; set a lower bound of 0 in the
 * model definition to impose it.
 */
import type { ParamSpec } from "./model-types";

/** Parameters: [gamma]. */
export const params: readonly ParamSpec[] = [
  { name: "gamma", unit: "J/(mol·K²)", lower: Number.NEGATIVE_INFINITY, upper: Number.POSITIVE_INFINITY },
];

/**
 * γT.
 * @param p [gamma in J/(mol·K²)]
 * @param temperatureK T in K
 * @returns J/(mol·K)
 * @see Kittel, Introduction to Solid State Physics, 8th ed., ch. 6
 */
export function evaluate(p: readonly number[], temperatureK: number): number {
  return p[0] * temperatureK;
}

/**
 * ∂(γT)/∂γ = T.
 * @param p [gamma]
 * @param temperatureK T in K
 * @returns [K]
 */
export function jacobian(_p: readonly number[], temperatureK: number): number[] {
  return [temperatureK];
}
