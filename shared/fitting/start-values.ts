/*
 * Automatic starting values for a composite heat-capacity model, read off the data.
 *
 * - γ, β (and the nuclear A) from the lowest points: C = γT + βT³ (+ A/T²) by weighted linear least squares
 *   on the points up to max(5th-lowest T, min(3·T_min, 10 K)), where the low-temperature expansion holds
 *   for ordinary solids (θ_D/T ≳ 30).
 * - θ_D from β: θ_D = (12π⁴ n_D R / 5β)^{1/3} (linear.ts, thetaDFromBeta); and, as a second candidate, from
 *   the temperature where C first reaches half of 3nR, θ_D = x_½·T_½ with D₃(x_½) = ½.
 * - θ_E from the maximum of (C − γT)/T³. For one Einstein mode C/T³ ∝ x³E(x)/θ³ = x⁵eˣ/(eˣ−1)²/θ³ with
 *   x = θ_E/T; d ln/dx = 5/x + 1 − 2eˣ/(eˣ−1) = 0 gives x·coth(x/2) = 5, x* = 4.928119358173284
 *   (mpmath 1.3.0 findroot), so θ_E ≈ 4.928·T_peak. Because a Debye background and neighbouring modes
 *   shift that peak, θ_E is also scanned on a log grid.
 * - Schottky gap from the anomaly: C_S ∝ x²w/(1+w)², w = g·eˣ, x = Δ/T; the maximum of C_S/T^m solves
 *   (2+m)/x = tanh((x + ln g)/2). For C itself (m = 0) and g = 1, x·tanh(x/2) = 2, x* = 2.399357280515468,
 *   i.e. T_peak = Δ/2.3994 ≈ 0.4168·Δ. On a lattice background the anomaly is easier to see as a local
 *   maximum of C/T (m = 1; the background γ + βT² only rises); the gap is also scanned on a log grid.
 * - Amplitudes (γ, β, δ, n_D, n_E, n_S, A), which enter the model linearly, are solved by weighted linear
 *   least squares for every combination of the nonlinear candidates above on a subsample of about 48
 *   points; the combinations are returned best first by that χ².
 * - A user's parameters[name].value always replaces the automatic value.
 * Source for the low-temperature expansion and the T³ law: Kittel, Introduction to Solid State Physics,
 * 8th ed., ch. 5–6; Schottky shape: Gopal, Specific Heats at Low Temperatures (1966), ch. 5. The peak
 * positions are derived above (common practice, no source).
 */
import { debyeFunction } from "@shared/physics/debye";
import { GAS_CONSTANT } from "@shared/physics/constants";
import type { HeatCapacityModel, ModelDefinition } from "@shared/physics/model-types";
import { fitLinearLeastSquares, thetaDFromBeta } from "@shared/fitting/linear";
import { leastSquaresSolve } from "@shared/fitting/small-linear-algebra";

/** Root of x·coth(x/2) = 5: the Einstein C/T³ peak sits at θ_E/T = this (mpmath 1.3.0, 30 digits, rounded). */
export const EINSTEIN_C_OVER_T3_PEAK_X = 4.928119358173284;

/**
 * x = Δ/T at the maximum of C_S/T^m for the two-level Schottky anomaly with degeneracy ratio g = g₀/g₁:
 * the root of (2 + m)/x = tanh((x + ln g)/2), found by bisection.
 * @param gRatio g₀/g₁ (> 0)
 * @param power m ≥ 0: 0 for the peak of C itself, 1 for the peak of C/T
 * @returns Δ/T_peak (dimensionless); 2.399357280515468 for g = 1, m = 0; NaN for g ≤ 0 or m < 0
 */
export function schottkyPeakX(gRatio: number, power = 0): number {
  if (!(gRatio > 0) || !Number.isFinite(gRatio) || !(power >= 0)) return Number.NaN;
  const lnG = Math.log(gRatio);
  // f(x) = x·tanh((x + ln g)/2) − (2 + m) is negative at x → 0⁺ and positive at large x, and has one root
  // on x > max(0, −ln g) where the tanh is positive.
  const f = (x: number) => x * Math.tanh((x + lnG) / 2) - (2 + power);
  let lo = Math.max(0, -lnG);
  let hi = lo + 4 + power;
  while (f(hi) < 0) hi *= 2;
  for (let i = 0; i < 200 && hi - lo > 1e-15 * hi; i++) {
    const mid = 0.5 * (lo + hi);
    if (f(mid) < 0) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

export interface StartData {
  /** K, > 0 */
  temperatureK: readonly number[];
  /** J/(mol·K) per mole of formula units */
  cp: readonly number[];
  /** J/(mol·K), or null for unit uncertainties */
  sigma: readonly number[] | null;
}

export interface StartCandidate {
  /** One value per model parameter, in the model's order. */
  values: number[];
  /** χ² of the amplitude-only screen on the subsample (lower is better). */
  screenChiSquare: number;
}

/** Amplitudes: the model is linear in these (common practice, no source; see each component's equation). */
const LINEAR_BASES = new Set(["gamma", "beta", "delta", "nD", "nE", "nS", "nuclearA"]);

const splitName = (name: string): { base: string; ordinal: number } => {
  const m = /^(.*?)(\d+)$/.exec(name);
  return m ? { base: m[1], ordinal: Number(m[2]) } : { base: name, ordinal: 1 };
};

const logGrid = (from: number, to: number, count: number): number[] =>
  Array.from({ length: count }, (_, i) => from * (to / from) ** (count === 1 ? 0 : i / (count - 1)));

/** x with D₃(x) = ½ (bisection on the Debye function; D₃ falls from 1 at x = 0). */
function debyeHalfX(): number {
  let lo = 0;
  let hi = 10;
  for (let i = 0; i < 100; i++) {
    const mid = 0.5 * (lo + hi);
    if (debyeFunction(mid, 3) > 0.5) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/**
 * Candidate starting vectors for fitting `model` to the data, best first.
 * @param data temperatures (K), heat capacities (J/(mol·K)) and their σ (or null); already windowed and unmasked
 * @param model the composite model (its params give names and physical bounds)
 * @param definition the model definition: its parameters[name] settings (value, fixed, lower, upper) are honoured
 * @param options atomsPerFormulaUnit n (> 0); maxCandidates (default 4)
 * @returns up to maxCandidates distinct start vectors, inside the bounds, ordered by screen χ²
 * @throws RangeError for mismatched lengths, too few points or a bad atom count
 */
export function startValueCandidates(
  data: StartData,
  model: HeatCapacityModel,
  definition: ModelDefinition,
  options: { atomsPerFormulaUnit: number; maxCandidates?: number },
): StartCandidate[] {
  const { temperatureK: t, cp: c, sigma } = data;
  const n = t.length;
  if (c.length !== n) throw new RangeError(`cp must have length ${n} (got ${c.length})`);
  if (sigma !== null && sigma.length !== n) throw new RangeError(`sigma must have length ${n} (got ${sigma.length})`);
  if (n < 2) throw new RangeError(`start values need at least 2 points (got ${n})`);
  const atoms = options.atomsPerFormulaUnit;
  if (!(atoms > 0) || !Number.isFinite(atoms)) throw new RangeError(`atomsPerFormulaUnit must be > 0 (got ${atoms})`);
  const maxCandidates = options.maxCandidates ?? 4;

  const specs = model.params;
  const names = specs.map((s) => s.name);
  const settings = definition.parameters ?? {};
  const lower = specs.map((s) => settings[s.name]?.lower ?? s.lower);
  const upper = specs.map((s) => settings[s.name]?.upper ?? s.upper);
  const userValue = (name: string): number | undefined => settings[name]?.value;
  const isFixed = (name: string): boolean => settings[name]?.fixed === true;
  const kinds = new Set(definition.components.map((comp) => comp.kind));

  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => t[a] - t[b]);
  const tMin = t[order[0]];
  const tMax = t[order[n - 1]];

  // --- γ, β, A from the lowest points -------------------------------------------------------------
  const hasElectronic = kinds.has("electronic");
  const hasNuclear = kinds.has("nuclear");
  const columns = 1 + (hasElectronic ? 1 : 0) + (hasNuclear ? 1 : 0);
  const tCut = Math.max(t[order[Math.min(n - 1, Math.max(4, columns + 1))]], Math.min(3 * tMin, 10));
  const low = order.filter((i) => t[i] <= tCut);
  let gamma0 = 0;
  let beta0 = 0;
  let nuclear0 = 0;
  try {
    const design = low.map((i) => [
      t[i] ** 3,
      ...(hasElectronic ? [t[i]] : []),
      ...(hasNuclear ? [t[i] ** -2] : []),
    ]);
    const fit = fitLinearLeastSquares(design, low.map((i) => c[i]), sigma === null ? null : low.map((i) => sigma[i]));
    beta0 = fit.params[0];
    if (hasElectronic) gamma0 = fit.params[1];
    if (hasNuclear) nuclear0 = fit.params[columns - 1];
  } catch {
    // Too few or degenerate low-temperature points: fall back below.
  }
  if (!(gamma0 > 0)) gamma0 = hasElectronic ? Math.max(0, (c[order[0]] / tMin) * 0.1) : 0;
  if (hasNuclear && !(nuclear0 > 0)) nuclear0 = 0.5 * c[order[0]] * tMin * tMin;

  // --- nonlinear candidates ------------------------------------------------------------------------
  const debyeCount = definition.components.filter((comp) => comp.kind === "debye").length;
  const einsteinCount = definition.components.filter((comp) => comp.kind === "einstein").length;
  const debyeAtoms0 = definition.constrainAtoms ? atoms / (1 + einsteinCount) : atoms / Math.max(1, debyeCount + einsteinCount);

  const thetaDCandidates: number[] = [];
  if (beta0 > 0) thetaDCandidates.push(thetaDFromBeta(beta0, debyeAtoms0 / Math.max(1, debyeCount)).thetaD);
  const halfIndex = order.find((i) => c[i] >= 1.5 * atoms * GAS_CONSTANT);
  if (halfIndex !== undefined) thetaDCandidates.push(debyeHalfX() * t[halfIndex]);
  if (thetaDCandidates.length === 0) thetaDCandidates.push(...logGrid(Math.max(20, tMax), Math.max(200, 10 * tMax), 3));

  // (C − γT − A/T²)/T³ over the points above the low-temperature window.
  const reduced = order.map((i) => (c[i] - gamma0 * t[i] - nuclear0 / (t[i] * t[i])) / t[i] ** 3);
  const thetaECandidates: number[] = [];
  {
    let best = -1;
    for (let r = 0; r < n; r++) {
      if (t[order[r]] <= tCut) continue;
      if (best < 0 || reduced[r] > reduced[best]) best = r;
    }
    // A peak strictly inside the range (not at its first or last point) marks an Einstein-like mode.
    if (best > 0 && best < n - 1 && t[order[best - 1]] > tCut) {
      const thetaPeak = EINSTEIN_C_OVER_T3_PEAK_X * t[order[best]];
      thetaECandidates.push(thetaPeak, thetaPeak / 2, thetaPeak * 2);
    }
    thetaECandidates.push(...logGrid(Math.max(2 * tMin, 5), Math.max(5 * tMax, 50), 6));
  }

  const gRatio0 = userValue("gRatio") ?? 1;
  const gapCandidates: number[] = [];
  {
    // First local maximum of C/T in the lowest half of the range.
    const overT = order.map((i) => c[i] / t[i]);
    for (let r = 1; r < n - 1 && t[order[r]] < 0.5 * (tMin + tMax); r++) {
      if (overT[r] > overT[r - 1] && overT[r] >= overT[r + 1]) {
        const x = schottkyPeakX(gRatio0 > 0 ? gRatio0 : 1, 1);
        gapCandidates.push(x * t[order[r]]);
        break;
      }
    }
    gapCandidates.push(...logGrid(Math.max(0.5, tMin / 2), Math.max(2 * tMax, 10), 6));
  }

  // --- per-parameter candidate lists ----------------------------------------------------------------
  const clampInto = (v: number, j: number): number => {
    const lo = lower[j];
    const hi = upper[j];
    if (v >= lo && v <= hi) return v;
    // Keep strictly inside finite bounds, a little away from them.
    const span = Number.isFinite(hi - lo) ? hi - lo : Math.max(1, Math.abs(Number.isFinite(lo) ? lo : hi));
    return v < lo ? lo + 1e-3 * span : hi - 1e-3 * span;
  };
  const nonlinear: { index: number; values: number[] }[] = [];
  const base: number[] = names.map((name, j) => {
    const { base: b } = splitName(name);
    switch (b) {
      case "gamma":
        return gamma0;
      case "beta":
        return kinds.has("debye") || kinds.has("einstein") ? 0 : Math.max(beta0, 0);
      case "delta":
        return 0;
      case "nuclearA":
        return nuclear0;
      case "nD":
        return debyeAtoms0 / Math.max(1, debyeCount);
      case "nE":
        return definition.constrainAtoms ? atoms / (1 + einsteinCount) : atoms / Math.max(1, debyeCount + einsteinCount);
      case "nS":
        return 0.1;
      case "gRatio":
        return gRatio0;
      default:
        return NaN;
    }
  });
  const einsteinSeen: number[] = [];
  names.forEach((name, j) => {
    const { base: b } = splitName(name);
    const given = userValue(name);
    if (given !== undefined) {
      base[j] = given;
      return;
    }
    if (b === "thetaD") nonlinear.push({ index: j, values: unique(thetaDCandidates.map((v) => clampInto(v, j))) });
    else if (b === "thetaE") {
      einsteinSeen.push(j);
      nonlinear.push({ index: j, values: unique(thetaECandidates.map((v) => clampInto(v, j))) });
    } else if (b === "gap") nonlinear.push({ index: j, values: unique(gapCandidates.map((v) => clampInto(v, j))) });
    else if (Number.isNaN(base[j])) base[j] = clampInto(1, j);
    else base[j] = clampInto(base[j], j);
  });

  // --- combinations, screened by a linear solve for the amplitudes ---------------------------------
  const combos: number[][] = [];
  const maxCombos = 400;
  const walk = (level: number, current: number[]) => {
    if (combos.length >= maxCombos) return;
    if (level === nonlinear.length) {
      // Several Einstein modes: keep each unordered set of temperatures once, ascending.
      const thetas = einsteinSeen.map((j) => current[j]);
      for (let a = 1; a < thetas.length; a++) if (!(thetas[a] > thetas[a - 1])) return;
      combos.push(current.slice());
      return;
    }
    const { index, values } = nonlinear[level];
    for (const v of values) {
      current[index] = v;
      walk(level + 1, current);
    }
  };
  walk(0, base.slice());
  if (combos.length === 0) combos.push(base.slice());

  const step = Math.max(1, Math.floor(n / 48));
  const sample = order.filter((_, r) => r % step === 0);
  const linearFree = names
    .map((name, j) => ({ j, name }))
    .filter(({ j, name }) => LINEAR_BASES.has(splitName(name).base) && !isFixed(name) && userValue(name) === undefined)
    .map(({ j }) => j);

  const scored: StartCandidate[] = combos.map((combo) => screen(combo));
  scored.sort((a, b) => a.screenChiSquare - b.screenChiSquare);
  const out: StartCandidate[] = [];
  for (const candidate of scored) {
    if (!Number.isFinite(candidate.screenChiSquare) && out.length > 0) break;
    if (out.some((o) => o.values.every((v, j) => Math.abs(v - candidate.values[j]) <= 1e-9 * Math.abs(v)))) continue;
    out.push(candidate);
    if (out.length >= maxCandidates) break;
  }
  return out;

  function screen(combo: number[]): StartCandidate {
    const values = combo.slice();
    if (linearFree.length > 0) {
      // The model is affine in the amplitudes: f = f₀ + Σ a_j·col_j, col_j = f(e_j) − f₀.
      const zero = values.slice();
      for (const j of linearFree) zero[j] = 0;
      const m = linearFree.length;
      const rows = sample.length;
      const design = new Float64Array(rows * m);
      const target = new Float64Array(rows);
      const units = linearFree.map((j) => {
        const unit = zero.slice();
        unit[j] = 1;
        return unit;
      });
      sample.forEach((i, row) => {
        const w = sigma === null ? 1 : 1 / sigma[i];
        const f0 = model.evaluate(zero, t[i]);
        units.forEach((unit, a) => {
          design[row * m + a] = (model.evaluate(unit, t[i]) - f0) * w;
        });
        target[row] = (c[i] - f0) * w;
      });
      // Scale columns to unit norm so the QR's dependence test is relative.
      const norms = new Array<number>(m).fill(0);
      for (let row = 0; row < rows; row++) for (let a = 0; a < m; a++) norms[a] += design[row * m + a] ** 2;
      for (let a = 0; a < m; a++) norms[a] = Math.sqrt(norms[a]) || 1;
      for (let row = 0; row < rows; row++) for (let a = 0; a < m; a++) design[row * m + a] /= norms[a];
      const solution = leastSquaresSolve(design, rows, m, target);
      // Columns the subsample cannot separate: keep the heuristic amplitudes.
      if (solution !== null) {
        let clamped = false;
        linearFree.forEach((j, a) => {
          const v = solution.x[a] / norms[a];
          values[j] = clampInto(v, j);
          if (values[j] !== v) clamped = true;
        });
        // Unclamped, the solve's own residual sum of squares is the screen χ².
        if (!clamped) return { values, screenChiSquare: Number.isFinite(solution.rss) ? solution.rss : Infinity };
      }
    }
    let chi2 = 0;
    for (const i of sample) {
      const r = (c[i] - model.evaluate(values, t[i])) / (sigma === null ? 1 : sigma[i]);
      chi2 += r * r;
    }
    return { values, screenChiSquare: Number.isFinite(chi2) ? chi2 : Infinity };
  }
}

function unique(values: number[]): number[] {
  const out: number[] = [];
  for (const v of values) if (Number.isFinite(v) && !out.some((o) => Math.abs(o - v) <= 1e-6 * Math.abs(v))) out.push(v);
  return out;
}
