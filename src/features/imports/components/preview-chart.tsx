import { memo, useState } from "react";
import { CartesianGrid, ComposedChart, ReferenceLine, ResponsiveContainer, Scatter, Tooltip, XAxis, YAxis } from "recharts";
import type { ReducedRun } from "@shared/schemas/ingest";
import { seriesColor } from "@/lib/series-palette";
import { useSettings } from "@/lib/settings";
import { CHART_GRID, chartAxis, xAxisTitle, yAxisTitle } from "@/components/ui/chart-style";
import { formatField } from "../utils";

// R in J/(mol·K), CODATA 2018 (exact from k_B and N_A): only to draw the Dulong–Petit line 3nR.
const R = 8.314462618;
// Drawing a preview needs no more points than this per run (the commit keeps all of them).
const PREVIEW_POINTS = 1500;

const tick = (v: number) => (Math.abs(v) >= 1e4 || (Math.abs(v) < 1e-3 && v !== 0) ? v.toExponential(1) : String(Number(v.toPrecision(3))));

/** The reduced curve(s) the file would give, one colour per field; the Dulong–Petit limit for sample runs. */
export const PreviewChart = memo(function PreviewChart({ runs, atomsPerFormulaUnit, unit }: { runs: readonly ReducedRun[]; atomsPerFormulaUnit: number | null; unit: string }) {
  const [logT, setLogT] = useState(true);
  const { resolvedTheme } = useSettings();
  const series = runs.map((r) => {
    const stride = Math.max(1, Math.ceil(r.points.length / PREVIEW_POINTS));
    return {
      fieldT: r.fieldT,
      data: r.points.filter((p, i) => i % stride === 0 && (!logT || p.temperatureK > 0)).map((p) => ({ x: p.temperatureK, y: p.heatCapacity })),
    };
  });
  const count = runs.reduce((s, r) => s + r.points.length, 0);
  return (
    <figure className="space-y-2">
      <div className="flex items-center justify-between gap-2">
        <figcaption className="text-sm font-medium text-ink">Reduced curve ({count} points)</figcaption>
        <label className="flex items-center gap-2 text-xs text-ink">
          <input type="checkbox" checked={logT} onChange={(e) => setLogT(e.target.checked)} />
          log temperature axis
        </label>
      </div>
      <div className="h-64 w-full" role="img" aria-label={`Preview of ${runs.length} run(s), heat capacity in ${unit} against temperature`}>
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart margin={{ top: 8, right: 16, bottom: 8, left: 8 }}>
            <CartesianGrid {...CHART_GRID} />
            <XAxis type="number" dataKey="x" scale={logT ? "log" : "linear"} domain={["auto", "auto"]} allowDataOverflow tickFormatter={tick} {...chartAxis(11)} label={xAxisTitle("T (K)", { fontSize: 11 })} height={36} />
            <YAxis type="number" dataKey="y" width={64} domain={["auto", "auto"]} tickFormatter={tick} {...chartAxis(11)} label={yAxisTitle(unit, { fontSize: 11 })} />
            {atomsPerFormulaUnit ? (
              <ReferenceLine y={3 * atomsPerFormulaUnit * R} stroke="var(--color-frost)" strokeDasharray="6 4" ifOverflow="extendDomain" label={{ value: "3nR", position: "insideTopLeft", fontSize: 11, fill: "var(--color-frost-ink)" }} />
            ) : null}
            {series.map((s, i) => (
              <Scatter key={i} name={formatField(s.fieldT)} data={s.data} fill={seriesColor(i, resolvedTheme)} shape="circle" isAnimationActive={false} />
            ))}
            <Tooltip isAnimationActive={false} formatter={(v) => (typeof v === "number" ? tick(v) : String(v))} labelFormatter={() => ""} />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      {runs.length > 1 ? (
        <ul className="flex flex-wrap gap-3 text-xs text-ink-muted">
          {runs.map((r, i) => (
            <li key={i} className="flex items-center gap-1">
              <span aria-hidden="true" className="inline-block size-2 rounded-full" style={{ background: seriesColor(i, resolvedTheme) }} />
              {formatField(r.fieldT)}: {r.points.length} points
            </li>
          ))}
        </ul>
      ) : null}
    </figure>
  );
});
