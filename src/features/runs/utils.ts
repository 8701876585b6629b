import type { RunPoint } from "@shared/schemas/runs";

/** R in J/(mol·K), CODATA 2018 (exact from k_B and N_A): for the C/(3nR) view only. */
export const GAS_CONSTANT_DISPLAY = 8.314462618;

/** Above this many points the charts draw a thinned copy; tables, downloads and fits always use every point. */
export const DISPLAY_POINT_LIMIT = 2000;

/**
 * Thins a series for drawing: every k-th point so at most `limit` remain, always keeping the first, the
 * last and every masked point (so a masked outlier never disappears from view). Never used for computing.
 * @param points in temperature order
 * @param limit largest number of unmasked points to draw
 * @returns the same objects, fewer of them, order kept
 */
export function decimateForDisplay<T extends { masked: boolean }>(points: readonly T[], limit = DISPLAY_POINT_LIMIT): T[] {
  if (points.length <= limit) return [...points];
  const stride = Math.ceil(points.length / limit);
  return points.filter((p, i) => p.masked || i % stride === 0 || i === points.length - 1);
}

/** Which of the three standard views. */
export type RunView = "cp" | "ct" | "reduced";

export const RUN_VIEWS: readonly { id: RunView; label: string; description: string }[] = [
  { id: "cp", label: "Cp against T", description: "Molar heat capacity per formula unit." },
  { id: "ct", label: "C/T against T²", description: "Low-temperature view: a straight line γ + βT² where the Sommerfeld and Debye T³ terms hold." },
  { id: "reduced", label: "C/(3nR) against T", description: "Heat capacity over the Dulong–Petit limit 3nR: the classical value is the line at 1." },
];

/** One point as drawn: x and y of the view, its error bar, and what the tooltip names. */
export interface PlottedPoint {
  index: number;
  x: number;
  y: number;
  /** Half-length of the error bar in y units; undefined without σ. */
  err?: number;
  temperatureK: number;
  masked: boolean;
}

/**
 * The points of one view.
 * @param points the run's points (J/(mol·K), or J/K for addenda runs)
 * @param view which view
 * @param atomsPerFormulaUnit n, for the C/(3nR) view
 */
export function plotPoints(points: readonly RunPoint[], view: RunView, atomsPerFormulaUnit: number | null): PlottedPoint[] {
  const scale = 3 * (atomsPerFormulaUnit ?? 1) * GAS_CONSTANT_DISPLAY;
  return points.map((p) => {
    const T = p.temperatureK;
    const sigma = p.cpSigma ?? undefined;
    if (view === "ct") return { index: p.index, x: T * T, y: p.cp / T, err: sigma === undefined ? undefined : sigma / T, temperatureK: T, masked: p.masked };
    if (view === "reduced") return { index: p.index, x: T, y: p.cp / scale, err: sigma === undefined ? undefined : sigma / scale, temperatureK: T, masked: p.masked };
    return { index: p.index, x: T, y: p.cp, err: sigma, temperatureK: T, masked: p.masked };
  });
}

/** Tick and tooltip numbers: 4 significant digits, exponent form for very large or small values. */
export function formatAxisNumber(v: number): string {
  if (!Number.isFinite(v)) return "";
  if (v !== 0 && (Math.abs(v) >= 1e4 || Math.abs(v) < 1e-3)) return v.toExponential(1);
  return String(Number(v.toPrecision(4)));
}

/** A heat capacity, σ or temperature in a table cell (6 significant digits). */
export function formatCell(v: number | null): string {
  if (v === null || !Number.isFinite(v)) return "—";
  if (v !== 0 && (Math.abs(v) >= 1e6 || Math.abs(v) < 1e-4)) return v.toExponential(5);
  return String(Number(v.toPrecision(6)));
}
