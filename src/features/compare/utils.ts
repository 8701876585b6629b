import type { CompareGroupBy } from "@shared/schemas/compare";
import { GAS_CONSTANT } from "@shared/physics/constants";
import { debyeFunction } from "@shared/physics/debye";

/** Words for the parameter names the fitter uses (shared/physics/model-types). */
const PARAMETER_WORDS: Record<string, { symbol: string; words: string }> = {
  thetaD: { symbol: "θ_D", words: "Debye temperature" },
  thetaE: { symbol: "θ_E", words: "Einstein temperature" },
  gamma: { symbol: "γ", words: "Sommerfeld coefficient" },
  beta: { symbol: "β", words: "T³ coefficient" },
  delta: { symbol: "δ", words: "T⁵ coefficient" },
  nD: { symbol: "n_D", words: "Debye oscillator atoms" },
  nE: { symbol: "n_E", words: "Einstein oscillator atoms" },
  gap: { symbol: "Δ", words: "Schottky gap" },
  nS: { symbol: "n_S", words: "Schottky centres" },
  gRatio: { symbol: "g₀/g₁", words: "Schottky degeneracy ratio" },
  nuclearA: { symbol: "A", words: "nuclear T⁻² coefficient" },
};

/** "θ_D (Debye temperature)", "θ_E2 (Einstein temperature 2)", or the name itself. */
export function parameterLabel(name: string): string {
  const m = /^([A-Za-z]+?)(\d+)?$/.exec(name);
  const w = m ? PARAMETER_WORDS[m[1]] : undefined;
  if (!w) return name;
  return m![2] ? `${w.symbol}${m![2]} (${w.words} ${m![2]})` : `${w.symbol} (${w.words})`;
}

/** Short symbol of a parameter for axis labels. */
export function parameterSymbol(name: string): string {
  const m = /^([A-Za-z]+?)(\d+)?$/.exec(name);
  const w = m ? PARAMETER_WORDS[m[1]] : undefined;
  return w ? `${w.symbol}${m![2] ?? ""}` : name;
}

/** The query string of a comparison (same names as the API). */
export function compareSearch(s: { parameter: string; groupBy: CompareGroupBy; batchIds: readonly string[]; sampleIds: readonly string[] }): string {
  const q = new URLSearchParams({ parameter: s.parameter, groupBy: s.groupBy });
  if (s.batchIds.length) q.set("batchIds", s.batchIds.join(","));
  if (s.sampleIds.length) q.set("sampleIds", s.sampleIds.join(","));
  return q.toString();
}

/** Reads a comma list from the page's search parameters. */
export function idList(value: string | null): string[] {
  return value ? value.split(",").filter((x) => x !== "") : [];
}

/**
 * One run in the collapse plot: C/(3nR) against T/θ_D. With `subtractElectronic` the fitted γT is taken
 * off first, so the lattice part alone meets the Debye curve.
 * @param points temperature (K) and molar heat capacity (J/(mol·K)) per formula unit
 * @param thetaD the run's fitted Debye temperature (K)
 * @param atoms atoms per formula unit n
 * @param gamma fitted Sommerfeld coefficient (J/(mol·K²)) or null
 */
export function collapsePoints(
  points: readonly { t: number; cp: number }[],
  thetaD: number,
  atoms: number,
  gamma: number | null,
  subtractElectronic: boolean,
): { x: number; y: number }[] {
  const scale = 3 * atoms * GAS_CONSTANT;
  return points
    .filter((p) => p.t > 0)
    .map((p) => ({ x: p.t / thetaD, y: (p.cp - (subtractElectronic && gamma != null ? gamma * p.t : 0)) / scale }));
}

/**
 * The universal Debye curve C/(3nR) = D₃(θ_D/T) on log-spaced T/θ_D from `from` to `to`.
 * @see shared/physics/debye.ts debyeFunction
 */
export function universalDebyeCurve(from = 0.01, to = 2, steps = 160): { x: number; y: number }[] {
  const out: { x: number; y: number }[] = [];
  const a = Math.log(from);
  const b = Math.log(to);
  for (let i = 0; i <= steps; i++) {
    const u = Math.exp(a + ((b - a) * i) / steps);
    out.push({ x: u, y: debyeFunction(1 / u, 3) });
  }
  return out;
}

/** C/T³ against T, the view in which low-lying optical modes show as a bump (J/(mol·K⁴)). */
export function cOverT3Points(points: readonly { t: number; cp: number }[]): { x: number; y: number }[] {
  return points.filter((p) => p.t > 0).map((p) => ({ x: p.t, y: p.cp / p.t ** 3 }));
}

/** Short number for axes and tooltips. */
export function shortNumber(v: number): string {
  if (!Number.isFinite(v)) return "";
  if (v !== 0 && (Math.abs(v) >= 1e4 || Math.abs(v) < 1e-2)) return v.toExponential(2);
  return String(Number(v.toPrecision(4)));
}

/** "2.0–20 K" */
export function windowText(minK: number, maxK: number): string {
  return `${shortNumber(minK)}–${shortNumber(maxK)} K`;
}

/** A standard uncertainty on its own, to two significant digits (GUM §7.2.6), with its unit: "0.11 K". */
export function sigmaText(sigma: number, unit: string): string {
  if (!Number.isFinite(sigma)) return "–";
  const v = sigma === 0 ? "0" : Math.abs(sigma) >= 1e4 || Math.abs(sigma) < 1e-3 ? sigma.toExponential(1) : String(Number(sigma.toPrecision(2)));
  return unit ? `${v}\u00a0${unit}` : v;
}

/** Round ticks (1, 2, 5 per decade) inside [lo, hi] for a log axis. */
export function logTicks(lo: number, hi: number): number[] {
  const out: number[] = [];
  if (!(lo > 0) || !(hi > lo)) return out;
  for (let e = Math.floor(Math.log10(lo)); e <= Math.ceil(Math.log10(hi)); e++) {
    for (const m of [1, 2, 5]) {
      const v = m * 10 ** e;
      if (v >= lo && v <= hi) out.push(Number(v.toPrecision(3)));
    }
  }
  return out;
}
