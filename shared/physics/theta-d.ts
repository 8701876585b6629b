/*
 * Debye temperature from heat capacity: the θ_D that a single Debye solid would need to reproduce a
 * lattice heat capacity, point by point (θ_D(T), the standard diagnostic of how far a solid is from a
 * Debye solid), and from the coefficient β of the low-temperature T³ law.
 *
 *   C_lat(T) = 3 n R D_d(θ_D/T)  solved for θ_D;   θ_D = (12π⁴ n R / (5β))^{1/3}  (d = 3 T³ law)
 *
 * Units: T in K; C in J/(mol·K) per mole of formula units; θ_D in K; β in J/(mol·K⁴); n atoms per
 * formula unit.
 * Source: P. Debye, Ann. Phys. 39, 789 (1912); Kittel, Introduction to Solid State Physics, 8th ed., ch. 5.
 * Valid for 0 < C_lat < 3nR (D_d is strictly decreasing from 1 to 0, so the root is unique); outside
 * that range there is no Debye temperature and the result says why.
 */
import { GAS_CONSTANT } from "./constants";
import { type DebyeDimension, debyeFunction, debyeFunctionDerivative } from "./debye";

/** θ_D of one point, or why there is none: "above-limit" (C_lat ≥ 3nR) or "not-positive" (C_lat ≤ 0). */
export type ThetaDResult = { thetaD: number } | { thetaD: null; reason: "above-limit" | "not-positive" };

/** One point of a θ_D(T) curve. */
export type ThetaDPoint = ThetaDResult & { temperatureK: number; latticeCp: number };

// ∫₀^∞ t^{d+1}eᵗ/(eᵗ−1)² dt = Γ(d+2)ζ(d+1): 2ζ(2), 6ζ(3), 24ζ(4) (ζ values: OEIS A013661, A002117, A013662).
const FULL_INTEGRAL = [Number.NaN, 2 * 1.6449340668482264, 6 * 1.2020569031595942, 24 * 1.0823232337111381];

function checkDimension(d: number): asserts d is DebyeDimension {
  if (d !== 1 && d !== 2 && d !== 3) throw new RangeError(`dimension must be 1, 2 or 3, got ${d}`);
}

/**
 * Solves D_d(x) = y for x, 0 < y < 1, by Newton's method on ln D against ln x inside a bracket that
 * always holds the root (bisection when a Newton step leaves it).
 * Bracket: D_d(x) < d Γ(d+2)ζ(d+1)/x^d for every x, so x_hi = (dΓζ/y)^{1/d} has D < y; x_lo is halved from a
 * start value until D(x_lo) > y.
 */
function invertDebye(y: number, d: DebyeDimension): number {
  let hi = ((d * FULL_INTEGRAL[d]) / y) ** (1 / d);
  // Small-x start from D ≈ 1 − d x²/(12(d+2)), the first term of the Bernoulli series.
  let x = Math.min(hi, Math.sqrt(((1 - y) * 12 * (d + 2)) / d));
  let lo = x;
  while (debyeFunction(lo, d) <= y) lo *= 0.5;
  if (!(x > lo && x < hi)) x = Math.sqrt(lo * hi);
  const lnY = Math.log(y);
  for (let iter = 0; iter < 100; iter++) {
    const dx = debyeFunction(x, d);
    const g = Math.log(dx) - lnY;
    if (g === 0) return x;
    if (g > 0) lo = x;
    else hi = x;
    // g'(ln x) = x D'(x)/D(x) < 0
    const slope = (x * debyeFunctionDerivative(x, d)) / dx;
    let next = x * Math.exp(-g / slope);
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (Math.abs(next - x) <= 2e-16 * x) return next;
    x = next;
  }
  return x;
}

/**
 * The Debye temperature that alone reproduces a lattice heat capacity at one temperature.
 * @param latticeCp lattice heat capacity C_lat in J/(mol·K) per mole of formula units (electronic and other
 *   terms already subtracted)
 * @param temperatureK T in K (> 0)
 * @param atomsN atoms per formula unit n (> 0)
 * @param dimension lattice dimension d of the Debye model: 1, 2 or 3
 * @returns { thetaD } in K, or { thetaD: null, reason } when C_lat ≥ 3nR ("above-limit") or C_lat ≤ 0 ("not-positive")
 * @throws RangeError when latticeCp is NaN, T or n is not a positive finite number, or d is not 1, 2 or 3
 * @see P. Debye, Ann. Phys. 39, 789 (1912)
 */
export function thetaDFromPoint(
  latticeCp: number,
  temperatureK: number,
  atomsN: number,
  dimension: DebyeDimension = 3,
): ThetaDResult {
  if (Number.isNaN(latticeCp)) throw new RangeError("thetaDFromPoint: latticeCp is NaN");
  if (!(temperatureK > 0) || !Number.isFinite(temperatureK)) {
    throw new RangeError(`thetaDFromPoint: temperatureK must be a positive number, got ${temperatureK}`);
  }
  if (!(atomsN > 0) || !Number.isFinite(atomsN)) {
    throw new RangeError(`thetaDFromPoint: atomsN must be a positive number, got ${atomsN}`);
  }
  checkDimension(dimension);
  if (latticeCp <= 0) return { thetaD: null, reason: "not-positive" };
  const y = latticeCp / (3 * atomsN * GAS_CONSTANT);
  if (y >= 1) return { thetaD: null, reason: "above-limit" };
  return { thetaD: invertDebye(y, dimension) * temperatureK };
}

/**
 * θ_D(T) for a whole run: subtracts γT from each point, then applies thetaDFromPoint.
 * @param temperaturesK T_i in K (> 0)
 * @param heatCapacities C_i in J/(mol·K) per mole of formula units, same length
 * @param options gamma (J/(mol·K²), default 0), atomsN (n), dimension (default 3)
 * @returns one ThetaDPoint per input point, in input order
 * @throws RangeError on different lengths, or (naming the index) on any point thetaDFromPoint refuses
 */
export function thetaDCurve(
  temperaturesK: readonly number[],
  heatCapacities: readonly number[],
  options: { gamma?: number; atomsN: number; dimension?: DebyeDimension },
): ThetaDPoint[] {
  if (temperaturesK.length !== heatCapacities.length) {
    throw new RangeError(
      `thetaDCurve: ${temperaturesK.length} temperatures but ${heatCapacities.length} heat capacities`,
    );
  }
  const gamma = options.gamma ?? 0;
  if (!Number.isFinite(gamma)) throw new RangeError(`thetaDCurve: gamma must be finite, got ${gamma}`);
  const dimension = options.dimension ?? 3;
  return temperaturesK.map((t, i) => {
    const latticeCp = heatCapacities[i] - gamma * t;
    try {
      return { temperatureK: t, latticeCp, ...thetaDFromPoint(latticeCp, t, options.atomsN, dimension) };
    } catch (err) {
      throw new RangeError(`thetaDCurve: point ${i} (T = ${t} K): ${(err as Error).message}`);
    }
  });
}

/**
 * Debye temperature from the T³ coefficient: θ_D = (12π⁴ n R / (5β))^{1/3}.
 * @param beta β in J/(mol·K⁴) per mole of formula units (> 0)
 * @param atomsN atoms per formula unit n
 * @returns θ_D in K; NaN when β ≤ 0 or n ≤ 0
 * @see Kittel, Introduction to Solid State Physics, 8th ed., ch. 5 (Debye T³ law)
 */
export function thetaDFromBeta(beta: number, atomsN: number): number {
  if (!(beta > 0) || !(atomsN > 0)) return Number.NaN;
  return Math.cbrt((12 * Math.PI ** 4 * atomsN * GAS_CONSTANT) / (5 * beta));
}

/**
 * T³ coefficient of a Debye solid: β = 12π⁴ n R / (5 θ_D³).
 * @param thetaD θ_D in K (> 0)
 * @param atomsN atoms per formula unit n
 * @returns β in J/(mol·K⁴); NaN when θ_D ≤ 0 or n < 0
 * @see Kittel, Introduction to Solid State Physics, 8th ed., ch. 5 (Debye T³ law)
 */
export function betaFromThetaD(thetaD: number, atomsN: number): number {
  if (!(thetaD > 0) || !(atomsN >= 0)) return Number.NaN;
  return (12 * Math.PI ** 4 * atomsN * GAS_CONSTANT) / (5 * thetaD ** 3);
}
