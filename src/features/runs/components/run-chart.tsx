import { memo } from "react";
import {
  CartesianGrid,
  ComposedChart,
  ErrorBar,
  ReferenceLine,
  ResponsiveContainer,
  Scatter,
  Tooltip,
  XAxis,
  YAxis,
} from "recharts";
import type { RunPoint } from "@shared/schemas/runs";
import { CHART_AXIS, CHART_GRID, xAxisTitle, yAxisTitle } from "@/components/ui/chart-style";
import { decimateForDisplay, formatAxisNumber, plotPoints, type PlottedPoint, type RunView } from "../utils";

interface RunChartProps {
  points: readonly RunPoint[];
  view: RunView;
  atomsPerFormulaUnit: number | null;
  /** "J/(mol*K)" for sample runs, "J/K" for addenda runs. */
  cpUnit: "J/(mol*K)" | "J/K";
  logX?: boolean;
  logY?: boolean;
  height?: number;
}

function axisLabels(view: RunView, cpUnit: RunChartProps["cpUnit"]) {
  const cp = cpUnit === "J/K" ? "C (J/K)" : "Cp (J/(mol·K))";
  if (view === "ct") return { x: "T² (K²)", y: cpUnit === "J/K" ? "C/T (J/K²)" : "C/T (J/(mol·K²))" };
  if (view === "reduced") return { x: "T (K)", y: "C/(3nR)" };
  return { x: "T (K)", y: cp };
}

/** A masked point: a hollow diamond, so it reads as "set aside" in colour and in shape. */
function MaskedShape(props: { cx?: number; cy?: number }) {
  const { cx = 0, cy = 0 } = props;
  return <path d={`M${cx} ${cy - 5} L${cx + 5} ${cy} L${cx} ${cy + 5} L${cx - 5} ${cy} Z`} fill="none" stroke="var(--color-danger)" strokeWidth={1.5} />;
}

/**
 * One view of a run: points with error bars where σ exists, masked points as hollow diamonds, and in the
 * C/(3nR) view the Dulong–Petit line at 1. Above ~2,000 points the drawing is thinned (never the data).
 */
export const RunChart = memo(function RunChart({ points, view, atomsPerFormulaUnit, cpUnit, logX = false, logY = false, height = 320 }: RunChartProps) {
  const shown = decimateForDisplay(points);
  const all = plotPoints(shown, view, atomsPerFormulaUnit);
  const useLogX = logX && view !== "ct";
  const useLogY = logY;
  const drawable = all.filter((p) => (!useLogX || p.x > 0) && (!useLogY || p.y > 0));
  const hidden = all.length - drawable.length;
  const kept: PlottedPoint[] = drawable.filter((p) => !p.masked);
  const masked: PlottedPoint[] = drawable.filter((p) => p.masked);
  const labels = axisLabels(view, cpUnit);
  // Error bars on a log axis would need a lower end above 0; they are drawn on linear axes only.
  const showErrors = !useLogY && kept.some((p) => p.err !== undefined);
  const thinned = shown.length < points.length;

  return (
    <figure className="space-y-2">
      <div style={{ height }} className="w-full" role="img" aria-label={`${labels.y} against ${labels.x}: ${kept.length} points, ${masked.length} masked`}>
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart margin={{ top: 12, right: 20, bottom: 8, left: 8 }}>
            <CartesianGrid {...CHART_GRID} />
            <XAxis
              type="number"
              dataKey="x"
              scale={useLogX ? "log" : "linear"}
              domain={useLogX ? ["auto", "auto"] : [0, "auto"]}
              allowDataOverflow={useLogX}
              tickFormatter={formatAxisNumber}
              label={xAxisTitle(labels.x)}
              height={40}
              {...CHART_AXIS}
            />
            <YAxis
              type="number"
              dataKey="y"
              width={76}
              scale={useLogY ? "log" : "linear"}
              domain={["auto", "auto"]}
              allowDataOverflow={useLogY}
              tickFormatter={formatAxisNumber}
              label={yAxisTitle(labels.y)}
              {...CHART_AXIS}
            />
            {view === "reduced" ? (
              <ReferenceLine
                y={1}
                stroke="var(--color-frost)"
                strokeDasharray="6 4"
                ifOverflow="extendDomain"
                label={{ value: "Dulong–Petit limit 3nR", position: "insideBottomRight", fill: "var(--color-frost-ink)", fontSize: 12 }}
              />
            ) : null}
            <Scatter name="points" data={kept} fill="var(--color-series-1)" shape="circle" isAnimationActive={false}>
              {showErrors ? <ErrorBar dataKey="err" direction="y" stroke="var(--color-series-1)" strokeOpacity={0.6} width={0} /> : null}
            </Scatter>
            <Scatter name="masked" data={masked} shape={<MaskedShape />} isAnimationActive={false} />
            <Tooltip
              isAnimationActive={false}
              cursor={{ strokeDasharray: "3 3" }}
              content={({ active, payload }) => {
                const p = active ? (payload?.[0]?.payload as PlottedPoint | undefined) : undefined;
                if (!p) return null;
                return (
                  <div className="rounded-md border border-line bg-surface px-2 py-1 font-mono text-xs text-ink shadow-card">
                    <div>point {p.index}{p.masked ? " (masked)" : ""}</div>
                    <div>T = {formatAxisNumber(p.temperatureK)} K</div>
                    <div>
                      y = {formatAxisNumber(p.y)}
                      {p.err !== undefined ? ` ± ${formatAxisNumber(p.err)}` : ""}
                    </div>
                  </div>
                );
              }}
            />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-muted">
        <span>
          <span aria-hidden="true" className="mr-1 inline-block size-2 rounded-full bg-series-1" />
          measured ({kept.length})
        </span>
        <span>
          <span aria-hidden="true" className="mr-1 inline-block size-2 rotate-45 border border-danger" />
          masked ({masked.length})
        </span>
        {showErrors ? <span>bars: ±1 σ</span> : null}
        {thinned ? <span>drawn thinned to {shown.length} of {points.length} points; tables and fits use all of them</span> : null}
        {hidden > 0 ? <span>{hidden} point(s) at or below zero are not drawn on a log axis</span> : null}
      </figcaption>
    </figure>
  );
});
