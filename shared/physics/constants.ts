/*
 * Physical constants used by the heat-capacity models. SI units throughout.
 * Source: CODATA 2018 recommended values (Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021),
 * doi:10.1103/RevModPhys.93.025010). Since the 2019 SI redefinition k_B, N_A and h are exact.
 */

/** Boltzmann constant, J/K (CODATA 2018, exact). */
export const BOLTZMANN = 1.380649e-23;

/** Avogadro constant, 1/mol (CODATA 2018, exact). */
export const AVOGADRO = 6.02214076e23;

/** Planck constant, J·s (CODATA 2018, exact). */
export const PLANCK = 6.62607015e-34;

/** Molar gas constant R = k_B·N_A, J/(mol·K) = 8.314462618… (exact product of two exact constants; CODATA 2018). */
export const GAS_CONSTANT = BOLTZMANN * AVOGADRO;

/**
 * Dulong–Petit limit of the lattice heat capacity, 3nR: the classical value every vibrational model tends to at high T.
 * @param atomsN atoms per formula unit n (dimensionless)
 * @returns heat capacity in J/(mol·K) per mole of formula units; NaN for negative or non-finite n
 * @see A. T. Petit and P. L. Dulong, Ann. Chim. Phys. 10, 395 (1819); CODATA 2018 for R
 */
export function dulongPetit(atomsN: number): number {
  if (!(atomsN >= 0) || !Number.isFinite(atomsN)) return Number.NaN;
  return 3 * atomsN * GAS_CONSTANT;
}
