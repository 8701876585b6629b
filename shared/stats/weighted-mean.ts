/*
 * Combining several measurements of one quantity (e.g. the Debye temperatures of the samples of a batch).
 *
 * Inverse-variance weighted mean:   x̄_w = Σ wᵢ xᵢ / Σ wᵢ,  wᵢ = 1/σᵢ²
 * its standard uncertainty:         σ_w = (Σ wᵢ)^(−1/2)
 * scatter about it:                 χ² = Σ wᵢ (xᵢ − x̄_w)²,  χ²_red = χ² / (n − 1)   (the Birge ratio squared)
 * Unweighted mean and spread:       x̄ = Σ xᵢ / n,  s = √(Σ (xᵢ − x̄)² / (n − 1)),  s/√n
 *
 * Sources: J. R. Taylor, An Introduction to Error Analysis, 2nd ed. (1997), §7.2, eqs. (7.10) and (7.12)
 * for the weighted mean and its uncertainty, §4.2 eq. (4.9) and §4.4 eq. (4.14) for the sample standard
 * deviation and the standard deviation of the mean; P. R. Bevington & D. K. Robinson, Data Reduction and
 * Error Analysis for the Physical Sciences, 3rd ed. (2003), §4.1, eqs. (4.17) and (4.19).
 * Units: every value and σ in the same unit; the results carry that unit (χ² is dimensionless).
 */

/** Result of {@link weightedMean}. */
export interface WeightedMean {
  /** Inverse-variance weighted mean, same unit as the inputs. */
  mean: number;
  /** Standard uncertainty of the weighted mean, (Σ 1/σᵢ²)^(−1/2). */
  sigma: number;
  /** Σ (xᵢ − mean)² / σᵢ² (dimensionless). */
  chiSquare: number;
  /** chiSquare / (n − 1); NaN for a single value. */
  reducedChiSquare: number;
  n: number;
}

/** Result of {@link unweightedMean}. */
export interface UnweightedMean {
  mean: number;
  /** Sample standard deviation with n − 1 in the denominator; NaN for a single value. */
  spread: number;
  /** spread / √n, the standard deviation of the mean; NaN for a single value. */
  standardError: number;
  n: number;
}

function checkFinite(values: readonly number[], name: string): void {
  values.forEach((v, i) => {
    if (typeof v !== "number" || !Number.isFinite(v)) throw new TypeError(`${name}[${i}] must be a finite number, got ${v}`);
  });
}

/**
 * Inverse-variance weighted mean of independent measurements and its standard uncertainty.
 * @param values measured values xᵢ (any unit, all the same)
 * @param sigmas their standard uncertainties σᵢ (same unit, each > 0)
 * @returns the weighted mean, its σ, χ² about the mean and χ²/(n − 1)
 * @throws RangeError when the arrays are empty or of different lengths, or a σ is not > 0
 * @throws TypeError when a value or σ is not a finite number
 * @see J. R. Taylor, An Introduction to Error Analysis, 2nd ed., §7.2, eqs. (7.10), (7.12)
 */
export function weightedMean(values: readonly number[], sigmas: readonly number[]): WeightedMean {
  if (values.length === 0) throw new RangeError("values must not be empty");
  if (sigmas.length !== values.length) {
    throw new RangeError(`sigmas has ${sigmas.length} entries but values has ${values.length}`);
  }
  checkFinite(values, "values");
  checkFinite(sigmas, "sigmas");
  sigmas.forEach((s, i) => {
    if (!(s > 0)) throw new RangeError(`sigmas[${i}] must be > 0, got ${s}`);
  });
  let sumW = 0;
  let sumWx = 0;
  for (let i = 0; i < values.length; i++) {
    const w = 1 / (sigmas[i] * sigmas[i]);
    sumW += w;
    sumWx += w * values[i];
  }
  const mean = sumWx / sumW;
  let chiSquare = 0;
  for (let i = 0; i < values.length; i++) {
    const d = (values[i] - mean) / sigmas[i];
    chiSquare += d * d;
  }
  const n = values.length;
  return { mean, sigma: 1 / Math.sqrt(sumW), chiSquare, reducedChiSquare: n > 1 ? chiSquare / (n - 1) : Number.NaN, n };
}

/**
 * Plain mean, sample standard deviation (n − 1) and standard deviation of the mean.
 * @param values measured values (any unit)
 * @returns mean, spread and spread/√n in the unit of the values
 * @throws RangeError when values is empty; TypeError when a value is not finite
 * @see J. R. Taylor, An Introduction to Error Analysis, 2nd ed., eqs. (4.9) and (4.14)
 */
export function unweightedMean(values: readonly number[]): UnweightedMean {
  if (values.length === 0) throw new RangeError("values must not be empty");
  checkFinite(values, "values");
  const n = values.length;
  const mean = values.reduce((a, b) => a + b, 0) / n;
  if (n === 1) return { mean, spread: Number.NaN, standardError: Number.NaN, n };
  const ss = values.reduce((a, v) => a + (v - mean) * (v - mean), 0);
  const spread = Math.sqrt(ss / (n - 1));
  return { mean, spread, standardError: spread / Math.sqrt(n), n };
}

/**
 * How many of its own standard uncertainties each value lies from a reference (usually the group's
 * weighted mean): |xᵢ − ref| / σᵢ.
 * @param values measured values
 * @param sigmas their standard uncertainties (each > 0), same unit
 * @param reference the value to measure the distance from, same unit
 * @returns one non-negative number per value (dimensionless)
 * @throws RangeError on a length mismatch or a σ that is not > 0
 */
export function deviationsInSigma(values: readonly number[], sigmas: readonly number[], reference: number): number[] {
  if (sigmas.length !== values.length) {
    throw new RangeError(`sigmas has ${sigmas.length} entries but values has ${values.length}`);
  }
  return values.map((v, i) => {
    if (!(sigmas[i] > 0)) throw new RangeError(`sigmas[${i}] must be > 0, got ${sigmas[i]}`);
    return Math.abs(v - reference) / sigmas[i];
  });
}

/** Distance in σ beyond which a value is flagged as far from its group (common practice, no source). */
export const OUTLIER_THRESHOLD_SIGMA = 3;

/**
 * Flags values lying more than `threshold` of their own σ from the group's weighted mean. A group of one
 * is never flagged (it is its own mean).
 * @param values measured values
 * @param sigmas their standard uncertainties (each > 0)
 * @param threshold distance in σ; a value strictly beyond it is flagged
 * @returns per value: the distance in σ and the flag
 * @throws as {@link weightedMean}
 */
export function flagOutliers(
  values: readonly number[],
  sigmas: readonly number[],
  threshold: number = OUTLIER_THRESHOLD_SIGMA,
): { deviationSigma: number; flagged: boolean }[] {
  const wm = weightedMean(values, sigmas);
  const d = deviationsInSigma(values, sigmas, wm.mean);
  return d.map((deviationSigma) => ({ deviationSigma, flagged: values.length > 1 && deviationSigma > threshold }));
}

/**
 * Adds independent standard uncertainties in quadrature, √(Σ σᵢ²); null and undefined entries count as 0.
 * @param parts standard uncertainties in one unit
 * @returns the combined standard uncertainty in that unit
 * @see JCGM 100:2008 (GUM), eq. (10), uncorrelated inputs with unit sensitivity
 */
export function combineInQuadrature(...parts: (number | null | undefined)[]): number {
  return Math.sqrt(parts.reduce<number>((a, p) => a + (p == null ? 0 : p * p), 0));
}
