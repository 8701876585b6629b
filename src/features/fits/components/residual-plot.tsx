import { CartesianGrid, ReferenceLine, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis } from "recharts";
import type { ResidualPoint } from "@shared/schemas/fits";
import { CHART_AXIS, CHART_GRID, xAxisTitle, yAxisTitle } from "@/components/ui/chart-style";
import { decimateForDisplay, logTicks } from "../utils";

const fmt = (v: number) => String(Number(v.toPrecision(3)));

/**
 * Residuals of the fit divided by each point's σ, against T. For a model that describes the data and
 * honest σ they scatter about 0 with about 95 % inside ±2; a run of same-sign residuals shows what the
 * model misses.
 */
export function ResidualPlot({ residuals, logT, height = 160 }: { residuals: readonly ResidualPoint[]; logT?: boolean; height?: number }) {
  const shown = decimateForDisplay(residuals);
  const normal = shown.filter((r) => Math.abs(r.normalized) <= 3).map((r) => ({ x: r.temperatureK, y: r.normalized }));
  const far = shown.filter((r) => Math.abs(r.normalized) > 3).map((r) => ({ x: r.temperatureK, y: r.normalized }));
  const extreme = Math.max(3.5, ...shown.map((r) => Math.abs(r.normalized)));
  const limit = Math.ceil(Math.min(extreme, 50));
  const outside = residuals.filter((r) => Math.abs(r.normalized) > 2).length;
  const tLo = Math.min(...shown.map((r) => r.temperatureK));
  const tHi = Math.max(...shown.map((r) => r.temperatureK));
  return (
    <figure className="space-y-1">
      <div style={{ height }} className="w-full" data-testid="residual-plot">
        <ResponsiveContainer width="100%" height="100%">
          <ScatterChart margin={{ top: 8, right: 20, bottom: 8, left: 8 }}>
            <CartesianGrid {...CHART_GRID} />
            <XAxis
              type="number"
              dataKey="x"
              scale={logT ? "log" : "linear"}
              domain={logT ? [tLo * 0.95, tHi * 1.05] : ["auto", "auto"]}
              ticks={logT ? logTicks(tLo * 0.95, tHi * 1.05) : undefined}
              tickFormatter={fmt}
              height={32}
              {...CHART_AXIS}
              label={xAxisTitle("T (K)", { offset: -2 })}
            />
            <YAxis
              type="number"
              dataKey="y"
              width={70}
              domain={[-limit, limit]}
              allowDataOverflow
              {...CHART_AXIS}
              label={yAxisTitle("(C − fit)/σ")}
            />
            <ReferenceLine y={0} stroke="var(--color-ink-muted)" />
            <ReferenceLine y={2} stroke="var(--color-line-strong)" strokeDasharray="4 4" />
            <ReferenceLine y={-2} stroke="var(--color-line-strong)" strokeDasharray="4 4" />
            <Scatter data={normal} fill="var(--color-series-1)" isAnimationActive={false} />
            <Scatter data={far} fill="var(--color-series-2)" shape="diamond" isAnimationActive={false} />
            <Tooltip isAnimationActive={false} formatter={(v) => (typeof v === "number" ? fmt(v) : String(v))} labelFormatter={() => ""} />
          </ScatterChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="text-xs text-ink-muted">
        Residuals over σ: {outside} of {residuals.length} points lie outside ±2 (about 5 % expected when the model and σ are right); beyond ±3
        drawn as diamonds.
      </figcaption>
    </figure>
  );
}
