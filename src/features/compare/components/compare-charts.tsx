import { useState } from "react";
import {
  CartesianGrid,
  ComposedChart,
  ErrorBar,
  Legend,
  Line,
  ReferenceLine,
  ResponsiveContainer,
  Scatter,
  Tooltip,
  XAxis,
  YAxis,
} from "recharts";
import type { CompareCurve, ComparisonResult } from "@shared/schemas/compare";
import { seriesColor } from "@/lib/series-palette";
import { useSettings } from "@/lib/settings";
import { CHART_AXIS, CHART_GRID, xAxisTitle, yAxisTitle } from "@/components/ui/chart-style";
import { collapsePoints, cOverT3Points, logTicks, parameterSymbol, shortNumber, universalDebyeCurve } from "../utils";

/** The chosen parameter by batch (groups side by side) or against x, each fit with its error bar, and each group's weighted mean. */
export function ParameterChart({ result }: { result: ComparisonResult }) {
  const { resolvedTheme } = useSettings();
  const byX = result.groupBy === "x";
  const groupIndex = new Map(result.groups.map((g, i) => [g.key, i]));
  const perGroup = new Map<string, number>();
  const counts = new Map(result.groups.map((g) => [g.key, g.n]));
  const pointsByGroup = result.groups.map(() => [] as { x: number; y: number; err: number; label: string }[]);
  const flagged: { x: number; y: number; err: number; label: string }[] = [];
  let withoutX = 0;
  for (const r of result.rows) {
    if (byX && r.x == null) {
      withoutX += 1;
      continue;
    }
    const gi = groupIndex.get(r.groupKey) ?? 0;
    const k = perGroup.get(r.groupKey) ?? 0;
    perGroup.set(r.groupKey, k + 1);
    const n = counts.get(r.groupKey) ?? 1;
    // Spread the fits of one batch a little sideways so their error bars do not overlap.
    const offset = byX ? 0 : n > 1 ? -0.25 + (0.5 * k) / (n - 1) : 0;
    const p = { x: byX ? (r.x ?? 0) : gi + offset, y: r.value, err: r.sigmaTotal ?? r.sigmaStat ?? 0, label: `${r.sampleLabel} · ${r.runLabel}` };
    (r.flagged ? flagged : pointsByGroup[gi]).push(p);
  }
  const means = result.groups
    .filter((g) => g.weightedMean != null && (!byX || g.x != null))
    .map((g) => ({ x: byX ? g.x! : groupIndex.get(g.key)!, y: g.weightedMean!, err: g.weightedSigma ?? 0, label: `${g.label}: weighted mean` }));
  const sym = parameterSymbol(result.parameter);
  const unit = result.unit ? ` (${result.unit})` : "";
  const xs = result.groups.filter((g) => g.x != null).map((g) => g.x!);
  const xDomain: [number, number] = byX
    ? [Math.min(...xs) - 0.05 * (Math.max(...xs) - Math.min(...xs) || 1), Math.max(...xs) + 0.05 * (Math.max(...xs) - Math.min(...xs) || 1)]
    : [-0.6, result.groups.length - 0.4];
  return (
    <figure className="space-y-2">
      <div className="h-80 w-full" data-testid="parameter-chart">
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart margin={{ top: 12, right: 20, bottom: 12, left: 8 }}>
            <CartesianGrid {...CHART_GRID} />
            <XAxis
              type="number"
              dataKey="x"
              domain={xDomain}
              ticks={byX ? [...new Set(xs)].sort((a, b) => a - b) : result.groups.map((_, i) => i)}
              tickFormatter={(v: number) => (byX ? shortNumber(v) : (result.groups[Math.round(v)]?.label ?? ""))}
              allowDecimals={byX}
              label={xAxisTitle(byX ? "composition x" : "batch")}
              height={44}
              {...CHART_AXIS}
            />
            <YAxis type="number" dataKey="y" width={72} domain={["auto", "auto"]} tickFormatter={shortNumber} label={yAxisTitle(`${sym}${unit}`)} {...CHART_AXIS} />
            {pointsByGroup.map((pts, i) => (
              <Scatter key={result.groups[i].key} name={result.groups[i].label} data={pts} fill={seriesColor(i, resolvedTheme)} shape="circle" isAnimationActive={false}>
                <ErrorBar dataKey="err" direction="y" stroke={seriesColor(i, resolvedTheme)} width={4} />
              </Scatter>
            ))}
            {flagged.length > 0 && (
              <Scatter name={`more than ${result.thresholdSigma}σ from its group`} data={flagged} fill="var(--color-danger)" shape="triangle" isAnimationActive={false}>
                <ErrorBar dataKey="err" direction="y" stroke="var(--color-danger)" width={4} />
              </Scatter>
            )}
            <Scatter name="weighted mean" data={means} fill="var(--color-ink)" shape="diamond" isAnimationActive={false}>
              <ErrorBar dataKey="err" direction="y" stroke="var(--color-ink)" width={10} strokeWidth={2} />
            </Scatter>
            <Tooltip
              isAnimationActive={false}
              cursor={{ strokeDasharray: "3 3" }}
              formatter={(v, name) => (name === "y" && typeof v === "number" ? [shortNumber(v), sym] : typeof v === "number" ? shortNumber(v) : String(v))}
              labelFormatter={() => ""}
            />
            <Legend verticalAlign="top" height={28} wrapperStyle={{ fontSize: 12 }} />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="text-xs text-ink-muted">
        {sym} of each approved fit with its error bar (statistical ⊕ systematic σ); diamonds are the weighted means of the groups with
        their σ; triangles are fits more than {result.thresholdSigma}σ from their group&apos;s weighted mean.
        {withoutX > 0 && ` ${withoutX} fit${withoutX === 1 ? "" : "s"} of samples without a composition x ${withoutX === 1 ? "is" : "are"} in the tables only.`}
      </figcaption>
    </figure>
  );
}

/** Markers per run in the collapse plot: enough to see the shape, few enough for a dozen runs in SVG (display only). */
const COLLAPSE_POINTS_PER_RUN = 150;

/** Every k-th point so that at most `max` remain, first and last kept (display only, never for computing). */
function thin<T>(pts: readonly T[], max: number): T[] {
  if (pts.length <= max) return [...pts];
  return Array.from({ length: max }, (_, i) => pts[Math.round((i * (pts.length - 1)) / (max - 1))]);
}

/**
 * Every chosen run as C/(3nR) against T/θ_D over the universal Debye curve (the curve from shared/physics
 * debyeFunction). A solid with one Debye temperature lies on the curve; departures show where it is not one.
 */
export function CollapseChart({ curves }: { curves: readonly CompareCurve[] }) {
  const { resolvedTheme } = useSettings();
  const [subtract, setSubtract] = useState(true);
  const usable = curves.filter((c) => c.thetaD != null && c.thetaD > 0);
  const universal = universalDebyeCurve(0.01, 2);
  const series = usable.map((c) => ({
    c,
    pts: thin(collapsePoints(c.points, c.thetaD!, c.atomsPerFormulaUnit, c.gamma, subtract).filter((p) => p.x >= 0.01 && p.x <= 2), COLLAPSE_POINTS_PER_RUN),
  }));
  return (
    <figure className="space-y-2">
      <label className="inline-flex items-center gap-2 text-sm text-ink">
        <input type="checkbox" checked={subtract} onChange={(e) => setSubtract(e.target.checked)} />
        Subtract the fitted electronic part γT
      </label>
      <div className="h-80 w-full" data-testid="collapse-chart">
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart margin={{ top: 12, right: 20, bottom: 12, left: 8 }}>
            <CartesianGrid {...CHART_GRID} />
            <XAxis type="number" dataKey="x" scale="log" domain={[0.01, 2]} allowDataOverflow ticks={[0.01, 0.02, 0.05, 0.1, 0.2, 0.5, 1, 2]} tickFormatter={shortNumber} label={xAxisTitle("T/θ_D")} height={44} {...CHART_AXIS} />
            <YAxis type="number" dataKey="y" width={60} domain={[0, 1.2]} allowDataOverflow tickFormatter={shortNumber} label={yAxisTitle("C/(3nR)")} {...CHART_AXIS} />
            <ReferenceLine y={1} stroke="var(--color-frost)" strokeDasharray="6 4" label={{ value: "Dulong–Petit 3nR", position: "insideTopLeft", fill: "var(--color-frost-ink)", fontSize: 12 }} />
            <Line name="Debye curve" data={universal} dataKey="y" type="monotone" dot={false} stroke="var(--color-ink)" strokeWidth={2} isAnimationActive={false} />
            {series.map(({ c, pts }, i) => (
              <Scatter key={c.fitId} name={c.label} data={pts} fill={seriesColor(i, resolvedTheme)} shape="circle" isAnimationActive={false} />
            ))}
            <Tooltip isAnimationActive={false} formatter={(v) => (typeof v === "number" ? shortNumber(v) : String(v))} labelFormatter={() => ""} />
            <Legend verticalAlign="top" height={28} wrapperStyle={{ fontSize: 12 }} />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="text-xs text-ink-muted">
        {usable.length} run{usable.length === 1 ? "" : "s"} scaled by each fit&apos;s own θ_D and n; the line is the Debye function
        C/(3nR) = D(θ_D/T).
        {curves.length > usable.length && ` ${curves.length - usable.length} run(s) without a θ_D are left out.`}
      </figcaption>
    </figure>
  );
}

/** C/T³ against T for every chosen run (log T), the usual view of low-lying optical modes. */
export function CT3Chart({ curves }: { curves: readonly CompareCurve[] }) {
  const { resolvedTheme } = useSettings();
  const series = curves.map((c) => ({ c, pts: cOverT3Points(c.points) }));
  const ts = series.flatMap((s) => s.pts.map((p) => p.x));
  const domain: [number, number] = ts.length ? [Math.min(...ts) * 0.9, Math.max(...ts) * 1.1] : [1, 300];
  return (
    <figure className="space-y-2">
      <div className="h-80 w-full" data-testid="ct3-chart">
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart margin={{ top: 12, right: 20, bottom: 12, left: 16 }}>
            <CartesianGrid {...CHART_GRID} />
            <XAxis type="number" dataKey="x" scale="log" domain={domain} allowDataOverflow ticks={logTicks(domain[0], domain[1])} tickFormatter={shortNumber} label={xAxisTitle("T (K)")} height={44} {...CHART_AXIS} />
            <YAxis type="number" dataKey="y" width={76} domain={["auto", "auto"]} tickFormatter={shortNumber} label={yAxisTitle("C/T³ (J/(mol·K⁴))")} {...CHART_AXIS} />
            {series.map(({ c, pts }, i) => (
              <Line key={c.fitId} name={c.label} data={pts} dataKey="y" type="linear" dot={false} stroke={seriesColor(i, resolvedTheme)} strokeWidth={1.5} isAnimationActive={false} />
            ))}
            <Tooltip isAnimationActive={false} formatter={(v) => (typeof v === "number" ? shortNumber(v) : String(v))} labelFormatter={() => ""} />
            <Legend verticalAlign="top" height={28} wrapperStyle={{ fontSize: 12 }} />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="text-xs text-ink-muted">Molar heat capacity over T³ of each chosen run; a Debye solid is flat at low T, an Einstein mode adds a bump.</figcaption>
    </figure>
  );
}
