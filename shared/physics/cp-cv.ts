/*
 * Difference between the heat capacity at constant pressure (measured) and at constant volume (what
 * lattice models such as Debye and Einstein describe).
 *
 *   dilation:          Cp − Cv = α_V² B V_m T
 *   Nernst–Lindemann:  Cp − Cv = A Cp² T,   A = α_V² B V_m / Cp²  at a reference temperature
 *
 * Units: T in K; Cp, Cv in J/(mol·K); α_V volume expansivity in 1/K; B isothermal bulk modulus in Pa;
 * V_m molar volume in m³/mol; A in mol/J.
 * Source: the thermodynamic identity Cp − Cv = T V α_V² B_T (any thermodynamics text, e.g. Kittel & Kroemer,
 * Thermal Physics, 2nd ed., 1980; E. S. R. Gopal, Specific Heats at Low Temperatures, 1966); W. Nernst and F. A. Lindemann,
 * Z. Elektrochem. 17, 817 (1911) for the one-constant form.
 * Valid: the dilation form is exact given α_V(T), B(T), V_m(T) at that T; the Nernst–Lindemann form assumes
 * α_V B V_m / Cp² stays constant, a fair approximation for many solids below their Debye temperature and above it.
 */

/**
 * Cp − Cv from thermal expansion: α_V² B V_m T.
 * @param alphaV volume expansion coefficient α_V in 1/K (3× the linear coefficient for a cubic solid)
 * @param bulkModulusPa isothermal bulk modulus B in Pa
 * @param molarVolume molar volume V_m in m³/mol (per mole of formula units)
 * @param temperatureK T in K
 * @returns Cp − Cv in J/(mol·K); NaN when B, V_m or T is negative or not finite
 * @see Kittel & Kroemer, Thermal Physics, 2nd ed. (1980)
 */
export function cpMinusCvDilation(
  alphaV: number,
  bulkModulusPa: number,
  molarVolume: number,
  temperatureK: number,
): number {
  if (!Number.isFinite(alphaV) || !(bulkModulusPa >= 0) || !(molarVolume >= 0) || !(temperatureK >= 0)) return Number.NaN;
  if (!Number.isFinite(bulkModulusPa) || !Number.isFinite(molarVolume) || !Number.isFinite(temperatureK)) return Number.NaN;
  return alphaV * alphaV * bulkModulusPa * molarVolume * temperatureK;
}

/**
 * Cp − Cv in the Nernst–Lindemann form A Cp² T.
 * @param constantA A in mol/J
 * @param cp measured Cp in J/(mol·K)
 * @param temperatureK T in K
 * @returns Cp − Cv in J/(mol·K); NaN when T is negative or an input is not finite
 * @see W. Nernst and F. A. Lindemann, Z. Elektrochem. 17, 817 (1911)
 */
export function cpMinusCvNernstLindemann(constantA: number, cp: number, temperatureK: number): number {
  if (!Number.isFinite(constantA) || !Number.isFinite(cp) || !(temperatureK >= 0) || !Number.isFinite(temperatureK)) {
    return Number.NaN;
  }
  return constantA * cp * cp * temperatureK;
}

/**
 * The Nernst–Lindemann constant from one reference state: A = α_V² B V_m / Cp², so that both forms agree there.
 * @param alphaV α_V in 1/K at the reference temperature
 * @param bulkModulusPa B in Pa
 * @param molarVolume V_m in m³/mol
 * @param cp Cp in J/(mol·K) at the reference temperature (> 0)
 * @returns A in mol/J; NaN when Cp ≤ 0 or another input is invalid
 * @see W. Nernst and F. A. Lindemann, Z. Elektrochem. 17, 817 (1911)
 */
export function nernstLindemannConstant(alphaV: number, bulkModulusPa: number, molarVolume: number, cp: number): number {
  if (!(cp > 0) || !Number.isFinite(cp)) return Number.NaN;
  return cpMinusCvDilation(alphaV, bulkModulusPa, molarVolume, 1) / (cp * cp);
}
