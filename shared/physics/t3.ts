/*
 * Cubic (low-temperature lattice) term of the heat capacity, the leading term of the Debye model for
 * T ≲ θ_D/50.
 *
 *   C_3(T) = β T³,   θ_D = (12π⁴ n R / (5β))^{1/3}  (see theta-d.ts)
 *
 * Units: T in K; C in J/(mol·K) per mole of formula units; β (beta) in J/(mol·K⁴).
 * Source: P. Debye, Ann. Phys. 39, 789 (1912); Kittel, Introduction to Solid State Physics, 8th ed.,
 * ch. 5 (Debye T³ law).
 * Valid at low T only (below about θ_D/50 the Debye function and βT³ agree to 1%). β is left unbounded
 * so that a small negative correction term can be fitted beside a Debye or Einstein component.
 */
import type { ParamSpec } from "./model-types";

/** Parameters: [beta]. */
export const params: readonly ParamSpec[] = [
  { name: "beta", unit: "J/(mol·K⁴)", lower: Number.NEGATIVE_INFINITY, upper: Number.POSITIVE_INFINITY },
];

/**
 * βT³.
 * @param p [beta in J/(mol·K⁴)]
 * @param temperatureK T in K
 * @returns J/(mol·K)
 * @see Kittel, Introduction to Solid State Physics, 8th ed., ch. 5
 */
export function evaluate(p: readonly number[], temperatureK: number): number {
  return p[0] * temperatureK * temperatureK * temperatureK;
}

/**
 * ∂(βT³)/∂β = T³.
 * @param p [beta]
 * @param temperatureK T in K
 * @returns [K³]
 */
export function jacobian(_p: readonly number[], temperatureK: number): number[] {
  return [temperatureK * temperatureK * temperatureK];
}
