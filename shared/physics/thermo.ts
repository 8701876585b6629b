/*
 * Thermodynamic functions of a solid from its measured heat capacity:
 *
 *   S(T) = ∫₀ᵀ C(T')/T' dT',   H(T) − H(0) = ∫₀ᵀ C(T') dT'
 *
 * Below the first data point T₀ a low-temperature model supplies C (analytic integrals for
 * γT + βT³ + δT⁵, numerical ones for any other model); from T₀ on, the data are joined by the monotone
 * cubic interpolant of shared/numerics/monotone-interpolation.ts and each cubic piece is integrated
 * exactly (∫C dT in closed form; ∫C/T dT by 12-point Gauss–Legendre when the piece lies at least one
 * width away from T = 0, else by the closed form with the logarithm).
 * Units: T in K; C in J/(mol·K); S in J/(mol·K); H − H(0) in J/mol (per mole of formula units when C is).
 * Source: the third law with S(0) = 0 for an ordered crystal (common practice, no source); e.g.
 * E. S. R. Gopal, Specific Heats at Low Temperatures (Plenum, 1966).
 * Valid from 0 K to the last data point (no extrapolation above it). The low-T model must make C/T
 * integrable at 0 (a nuclear A/T² tail is not: its entropy diverges).
 */
import { monotoneInterpolator } from "@shared/numerics/monotone-interpolation";

/** Heat capacity below the first data point: a function C(T) in J/(mol·K), or the coefficients of γT + βT³ + δT⁵. */
export type LowTModel =
  | ((temperatureK: number) => number)
  | { gamma: number; beta: number; delta?: number };

/** One row of a thermodynamic table: T in K, S in J/(mol·K), H = H(T) − H(0) in J/mol. */
export interface ThermoRow {
  T: number;
  S: number;
  H: number;
}

/**
 * Round temperatures (K) for tables, plus the standard 298.15 K; thermoTable keeps those inside the data
 * range (common practice of thermodynamic tables, no source).
 */
export const DEFAULT_TABLE_TEMPERATURES: readonly number[] = [
  1, 2, 3, 4, 5, 6, 8, 10, 12, 15, 20, 25, 30, 35, 40, 45, 50, 60, 70, 80, 90, 100, 110, 120, 130, 140, 150, 160,
  170, 180, 190, 200, 210, 220, 230, 240, 250, 260, 270, 280, 290, 298.15, 300, 310, 320, 330, 340, 350, 360, 370,
  380, 390, 400, 450, 500, 550, 600, 650, 700, 750, 800, 850, 900, 950, 1000,
];

/**
 * Nodes and weights of the n-point Gauss–Legendre rule on [−1, 1], by Newton's method on P_n from
 * Tricomi's start values (converges to full double precision in a few steps; A&S 25.4.29 for the rule).
 */
function gaussLegendre(n: number): { nodes: number[]; weights: number[] } {
  // P_n(x) and P_{n−1}(x) by the three-term recurrence, and P_n'(x) from them.
  const legendre = (x: number): { p: number; dp: number } => {
    let p0 = 1;
    let p1 = x;
    for (let k = 2; k <= n; k++) {
      const p2 = ((2 * k - 1) * x * p1 - (k - 1) * p0) / k;
      p0 = p1;
      p1 = p2;
    }
    return { p: p1, dp: (n * (x * p1 - p0)) / (x * x - 1) };
  };
  const nodes: number[] = [];
  const weights: number[] = [];
  for (let i = 1; i <= n; i++) {
    let x = Math.cos((Math.PI * (i - 0.25)) / (n + 0.5));
    for (let iter = 0; iter < 100; iter++) {
      const { p, dp } = legendre(x);
      const dx = p / dp;
      x -= dx;
      if (Math.abs(dx) < 1e-17) break;
    }
    const { dp } = legendre(x);
    nodes.push(x);
    weights.push(2 / ((1 - x * x) * dp * dp));
  }
  return { nodes, weights };
}

const GL = gaussLegendre(12);

/** ∫ f over [a, b] by the 12-point Gauss–Legendre rule. */
function gaussIntegral(f: (t: number) => number, a: number, b: number): number {
  const mid = 0.5 * (a + b);
  const half = 0.5 * (b - a);
  let s = 0;
  for (let i = 0; i < GL.nodes.length; i++) s += GL.weights[i] * f(mid + half * GL.nodes[i]);
  return s * half;
}

/**
 * S and H − H(0) of the low-temperature model from 0 to T.
 * Polynomial: S = γT + βT³/3 + δT⁵/5, H = γT²/2 + βT⁴/4 + δT⁶/6. A function: Gauss–Legendre on the
 * pieces [T/2^{j+1}, T/2^j], j = 0…79 (each piece 12 points; together exact to ~1e-16 for any C that is
 * smooth on (0, T] and O(T) or smaller at 0).
 * @param lowT the model
 * @param temperatureK upper limit T in K (≥ 0)
 * @returns { S: J/(mol·K), H: J/mol }
 * @throws RangeError when T < 0, or when the model's C/T does not vanish at T → 0 (entropy diverges)
 */
export function lowTIntegrals(lowT: LowTModel, temperatureK: number): { S: number; H: number } {
  if (!(temperatureK >= 0) || !Number.isFinite(temperatureK)) {
    throw new RangeError(`lowTIntegrals: temperature must be ≥ 0 and finite, got ${temperatureK}`);
  }
  if (temperatureK === 0) return { S: 0, H: 0 };
  const t = temperatureK;
  if (typeof lowT !== "function") {
    const delta = lowT.delta ?? 0;
    const t2 = t * t;
    return {
      S: t * (lowT.gamma + t2 * (lowT.beta / 3 + (t2 * delta) / 5)),
      H: t2 * (lowT.gamma / 2 + t2 * (lowT.beta / 4 + (t2 * delta) / 6)),
    };
  }
  let s = 0;
  let h = 0;
  let hi = t;
  let lastS = 0;
  for (let j = 0; j < 80; j++) {
    const lo = 0.5 * hi;
    lastS = gaussIntegral((x) => lowT(x) / x, lo, hi);
    s += lastS;
    h += gaussIntegral(lowT, lo, hi);
    hi = lo;
  }
  // The pieces of an integrable C/T shrink at least like 2^{-j}; a last piece not below 1e-12 of the sum
  // means C/T grows toward 0 K (e.g. a nuclear A/T² term).
  if (!Number.isFinite(s) || Math.abs(lastS) > 1e-12 * Math.abs(s)) {
    throw new RangeError("lowTIntegrals: the low-T model's C/T does not vanish at 0 K, so the entropy integral diverges");
  }
  return { S: s, H: h };
}

/** One cubic piece c0 + c1 u + c2 u² + c3 u³ of the interpolant on [x0, x0 + width], u = (T − x0)/width. */
interface Piece {
  x0: number;
  width: number;
  c0: number;
  c1: number;
  c2: number;
  c3: number;
}

/** ∫ C dT and ∫ C/T dT over [x0, x0 + τ·width] of one cubic piece, 0 ≤ τ ≤ 1. */
function pieceIntegrals(p: Piece, tau: number): { S: number; H: number } {
  const { x0, width, c0, c1, c2, c3 } = p;
  const H = width * tau * (c0 + tau * (c1 / 2 + tau * (c2 / 3 + (tau * c3) / 4)));
  const r = x0 / width;
  let S: number;
  if (r >= 1) {
    // Pole of 1/T at least one width away: 12-point Gauss–Legendre errs by < 1e-18 relative here.
    S = gaussIntegral((u) => (c0 + u * (c1 + u * (c2 + u * c3))) / (r + u), 0, tau);
  } else {
    // Close to T = 0: expand the cubic about u = −r, ∫ p/(r+u) du = a0 ln((r+τ)/r) + Σ a_k ((r+τ)^k − r^k)/k.
    const a3 = c3;
    const a2 = c2 - 3 * r * c3;
    const a1 = c1 - 2 * r * c2 + 3 * r * r * c3;
    const a0 = c0 - r * c1 + r * r * c2 - r * r * r * c3;
    const s1 = r + tau;
    S = a0 * Math.log1p(tau / r) + a1 * tau + (a2 * (s1 * s1 - r * r)) / 2 + (a3 * (s1 * s1 * s1 - r * r * r)) / 3;
  }
  return { S, H };
}

/**
 * S(T) and H(T) − H(0) from a measured curve.
 * @param temperaturesK strictly increasing T_i in K, the first > 0, at least 2 points
 * @param heatCapacities C_i in J/(mol·K), same length, finite
 * @param lowT the model used from 0 K to the first point
 * @returns a function of T (0 ≤ T ≤ last point, in K) giving { S: J/(mol·K), H: J/mol }; it throws RangeError
 *   for T outside that range
 * @throws RangeError on different lengths, fewer than 2 points, T not strictly increasing or not > 0,
 *   non-finite values, or a low-T model whose entropy diverges
 */
export function thermoFunctions(
  temperaturesK: readonly number[],
  heatCapacities: readonly number[],
  lowT: LowTModel,
): (temperatureK: number) => { S: number; H: number } {
  if (temperaturesK.length !== heatCapacities.length) {
    throw new RangeError(`thermo: ${temperaturesK.length} temperatures but ${heatCapacities.length} heat capacities`);
  }
  if (temperaturesK.length < 2) throw new RangeError("thermo: needs at least 2 data points");
  for (let i = 0; i < temperaturesK.length; i++) {
    if (!Number.isFinite(temperaturesK[i])) throw new RangeError(`thermo: temperature ${i} is not finite`);
    if (!Number.isFinite(heatCapacities[i])) throw new RangeError(`thermo: heat capacity ${i} is not finite`);
  }
  if (!(temperaturesK[0] > 0)) throw new RangeError(`thermo: the first temperature must be > 0 K, got ${temperaturesK[0]}`);
  const interp = monotoneInterpolator(temperaturesK, heatCapacities);
  const d = interp.slopes;
  const n = temperaturesK.length;
  const pieces: Piece[] = [];
  for (let i = 0; i < n - 1; i++) {
    const w = temperaturesK[i + 1] - temperaturesK[i];
    const y0 = heatCapacities[i];
    const y1 = heatCapacities[i + 1];
    pieces.push({
      x0: temperaturesK[i],
      width: w,
      c0: y0,
      c1: w * d[i],
      c2: 3 * (y1 - y0) - w * (2 * d[i] + d[i + 1]),
      c3: 2 * (y0 - y1) + w * (d[i] + d[i + 1]),
    });
  }
  // Cumulative S and H at each data point.
  const base = lowTIntegrals(lowT, temperaturesK[0]);
  const cumS = [base.S];
  const cumH = [base.H];
  for (let i = 0; i < n - 1; i++) {
    const q = pieceIntegrals(pieces[i], 1);
    cumS.push(cumS[i] + q.S);
    cumH.push(cumH[i] + q.H);
  }
  const tLast = temperaturesK[n - 1];
  return (temperatureK: number) => {
    if (!(temperatureK >= 0) || !(temperatureK <= tLast)) {
      throw new RangeError(`thermo: T = ${temperatureK} K is outside 0 … ${tLast} K (no extrapolation above the data)`);
    }
    if (temperatureK < temperaturesK[0]) return lowTIntegrals(lowT, temperatureK);
    let lo = 0;
    let hi = n - 1;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (temperaturesK[mid] <= temperatureK) lo = mid;
      else hi = mid;
    }
    const piece = pieces[lo];
    const tau = (temperatureK - piece.x0) / piece.width;
    if (tau === 0) return { S: cumS[lo], H: cumH[lo] };
    const q = pieceIntegrals(piece, tau);
    return { S: cumS[lo] + q.S, H: cumH[lo] + q.H };
  };
}

/**
 * A table of S and H − H(0) at chosen temperatures.
 * @param temperaturesK strictly increasing T_i in K (first > 0)
 * @param heatCapacities C_i in J/(mol·K)
 * @param lowT the model used from 0 K to the first point
 * @param at temperatures in K for the rows (each within 0 … last point); default: the
 *   DEFAULT_TABLE_TEMPERATURES between the first and last data points
 * @returns rows { T (K), S (J/(mol·K)), H (J/mol) } in the order of `at`
 * @throws RangeError as thermoFunctions, and naming the entry of `at` that lies outside the range
 */
export function thermoTable(
  temperaturesK: readonly number[],
  heatCapacities: readonly number[],
  lowT: LowTModel,
  at?: readonly number[],
): ThermoRow[] {
  const f = thermoFunctions(temperaturesK, heatCapacities, lowT);
  const first = temperaturesK[0];
  const last = temperaturesK[temperaturesK.length - 1];
  const targets = at ?? DEFAULT_TABLE_TEMPERATURES.filter((t) => t >= first && t <= last);
  return targets.map((t, i) => {
    if (!(t >= 0) || !(t <= last)) {
      throw new RangeError(`thermoTable: at[${i}] = ${t} K is outside 0 … ${last} K`);
    }
    const { S, H } = f(t);
    return { T: t, S, H };
  });
}
