import { useRef, useState, type KeyboardEvent, type PointerEvent } from "react";
import {
  CartesianGrid,
  ComposedChart,
  ErrorBar,
  Line,
  ReferenceArea,
  ReferenceLine,
  ResponsiveContainer,
  Scatter,
  Tooltip,
  XAxis,
  YAxis,
  usePlotArea,
  useXAxisInverseScale,
  useXAxisScale,
} from "recharts";
import type { CurvePoint } from "@shared/schemas/fits";
import { CHART_AXIS, CHART_GRID, xAxisTitle, yAxisTitle } from "@/components/ui/chart-style";
import { decimateForDisplay, logTicks } from "../utils";

/** R in J/(mol·K), CODATA 2018 (exact from k_B and N_A); only for the C/(3nR) display scale. */
const R_DISPLAY = 8.314462618;

export type FitView = "cp" | "ct" | "reduced";

export const FIT_VIEWS: readonly { id: FitView; label: string }[] = [
  { id: "cp", label: "Cp against T" },
  { id: "ct", label: "C/T against T²" },
  { id: "reduced", label: "C/(3nR) against T" },
];

export interface ChartPoint {
  temperatureK: number;
  cp: number;
  sigma: number | null;
  masked: boolean;
}

interface FitChartProps {
  points: readonly ChartPoint[];
  view: FitView;
  atomsPerFormulaUnit: number;
  window: readonly [number, number];
  onWindowChange: (w: [number, number]) => void;
  curve?: readonly CurvePoint[] | null;
  logT?: boolean;
  height?: number;
}

interface Plotted {
  x: number;
  y: number;
  err?: number;
  T: number;
}

function transform(view: FitView, n: number, T: number, cp: number, sigma: number | null): Plotted {
  if (view === "ct") return { x: T * T, y: cp / T, err: sigma == null ? undefined : sigma / T, T };
  if (view === "reduced") {
    const scale = 3 * n * R_DISPLAY;
    return { x: T, y: cp / scale, err: sigma == null ? undefined : sigma / scale, T };
  }
  return { x: T, y: cp, err: sigma ?? undefined, T };
}

const fmt = (v: number) => (Math.abs(v) >= 1000 || (Math.abs(v) < 0.01 && v !== 0) ? v.toExponential(2) : String(Number(v.toPrecision(4))));

/** The two draggable edges of the fit window, drawn inside the chart (they use its x scale). */
function WindowHandles({
  window,
  toX,
  fromX,
  onChange,
  bounds,
}: {
  window: readonly [number, number];
  toX: (T: number) => number;
  fromX: (x: number) => number;
  onChange: (w: [number, number]) => void;
  bounds: readonly [number, number];
}) {
  const scale = useXAxisScale();
  const inverse = useXAxisInverseScale();
  const area = usePlotArea();
  const [drag, setDrag] = useState<{ which: 0 | 1; T: number } | null>(null);
  const svgLeft = useRef(0);
  if (!scale || !inverse || !area) return null;

  const shown: [number, number] = [window[0], window[1]];
  if (drag) shown[drag.which] = drag.T;

  const clampT = (which: 0 | 1, T: number) => {
    const lo = which === 0 ? bounds[0] : shown[0];
    const hi = which === 0 ? shown[1] : bounds[1];
    return Math.min(hi, Math.max(lo, T));
  };
  const commit = (which: 0 | 1, T: number) => {
    const next: [number, number] = [window[0], window[1]];
    next[which] = Number(T.toPrecision(6));
    if (next[0] < next[1]) onChange(next);
  };

  const onPointerDown = (which: 0 | 1) => (e: PointerEvent<SVGGElement>) => {
    e.currentTarget.setPointerCapture(e.pointerId);
    svgLeft.current = e.currentTarget.ownerSVGElement?.getBoundingClientRect().left ?? 0;
    setDrag({ which, T: shown[which] });
  };
  const onPointerMove = (which: 0 | 1) => (e: PointerEvent<SVGGElement>) => {
    if (!drag || drag.which !== which) return;
    const px = Math.min(area.x + area.width, Math.max(area.x, e.clientX - svgLeft.current));
    const x = Number(inverse(px));
    if (Number.isFinite(x)) setDrag({ which, T: clampT(which, fromX(x)) });
  };
  const onPointerUp = (which: 0 | 1) => () => {
    if (drag && drag.which === which) commit(which, drag.T);
    setDrag(null);
  };
  const onKey = (which: 0 | 1) => (e: KeyboardEvent<SVGGElement>) => {
    const T = window[which];
    const step = Math.max(0.01, Math.abs(T) * 0.01) * (e.shiftKey ? 10 : 1);
    let next: number | null = null;
    if (e.key === "ArrowLeft" || e.key === "ArrowDown") next = T - step;
    else if (e.key === "ArrowRight" || e.key === "ArrowUp") next = T + step;
    else if (e.key === "Home") next = which === 0 ? bounds[0] : window[0];
    else if (e.key === "End") next = which === 0 ? window[1] : bounds[1];
    if (next === null) return;
    e.preventDefault();
    commit(which, clampT(which, next));
  };

  return (
    <g>
      {([0, 1] as const).map((which) => {
        const px = scale(toX(shown[which]));
        if (px === undefined || !Number.isFinite(px)) return null;
        const label = which === 0 ? "Window start" : "Window end";
        return (
          <g
            key={which}
            role="slider"
            tabIndex={0}
            aria-label={`${label} (K)`}
            aria-valuemin={which === 0 ? bounds[0] : window[0]}
            aria-valuemax={which === 0 ? window[1] : bounds[1]}
            aria-valuenow={shown[which]}
            aria-valuetext={`${fmt(shown[which])} K`}
            className="cursor-ew-resize outline-none [&:focus-visible_rect]:stroke-[var(--color-focus)] [&:focus-visible_rect]:stroke-2"
            onPointerDown={onPointerDown(which)}
            onPointerMove={onPointerMove(which)}
            onPointerUp={onPointerUp(which)}
            onPointerCancel={() => setDrag(null)}
            onKeyDown={onKey(which)}
            style={{ touchAction: "none" }}
          >
            <rect x={px - 8} y={area.y} width={16} height={area.height} fill="transparent" />
            <line x1={px} x2={px} y1={area.y} y2={area.y + area.height} stroke="var(--color-ember)" strokeWidth={2} />
            <rect
              x={px - 6}
              y={area.y + area.height / 2 - 14}
              width={12}
              height={28}
              rx={4}
              fill="var(--color-surface)"
              stroke="var(--color-ember)"
              strokeWidth={1.5}
            />
            <line x1={px - 2} x2={px - 2} y1={area.y + area.height / 2 - 7} y2={area.y + area.height / 2 + 7} stroke="var(--color-ember)" />
            <line x1={px + 2} x2={px + 2} y1={area.y + area.height / 2 - 7} y2={area.y + area.height / 2 + 7} stroke="var(--color-ember)" />
            {drag && drag.which === which ? (
              <text x={px + 10} y={area.y + 14} fontSize={12} fill="var(--color-ink)">
                {fmt(shown[which])} K
              </text>
            ) : null}
          </g>
        );
      })}
    </g>
  );
}

/**
 * The run's data with the fit window: points in the window solid, outside it faint, masked points as
 * crosses; the fitted curve over it; the window's two edges drag along the temperature axis (or take
 * arrow keys when focused).
 */
export function FitChart({ points, view, atomsPerFormulaUnit: n, window, onWindowChange, curve, logT, height = 320 }: FitChartProps) {
  const shownPoints = decimateForDisplay(points);
  const inWin: Plotted[] = [];
  const outWin: Plotted[] = [];
  const masked: Plotted[] = [];
  for (const p of shownPoints) {
    if (!(p.temperatureK > 0)) continue;
    const t = transform(view, n, p.temperatureK, p.cp, p.sigma);
    if (p.masked) masked.push(t);
    else if (p.temperatureK >= window[0] && p.temperatureK <= window[1]) inWin.push(t);
    else outWin.push(t);
  }
  const fitted = (curve ?? []).map((c) => transform(view, n, c.temperatureK, c.total, null));
  const tMin = points.length ? Math.min(...points.map((p) => p.temperatureK)) : 1;
  const tMax = points.length ? Math.max(...points.map((p) => p.temperatureK)) : 300;
  const useLog = logT === true && view !== "ct";
  const toX = (T: number) => (view === "ct" ? T * T : T);
  const fromX = (x: number) => (view === "ct" ? Math.sqrt(Math.max(0, x)) : x);
  // C/T against T² is read at low temperature: show it over the window only.
  const xDomain: [number, number] =
    view === "ct" ? [0, window[1] * window[1]] : useLog ? [tMin * 0.9, tMax * 1.1] : [0, Math.ceil(tMax * 1.02)];
  const yInView = view === "ct" ? inWin.concat(masked.filter((m) => m.x <= xDomain[1])) : null;
  const yDomain: [number, number] | undefined = yInView
    ? [0, Math.max(1e-12, ...yInView.map((p) => p.y), ...fitted.filter((f) => f.x <= xDomain[1]).map((f) => f.y)) * 1.05]
    : undefined;
  const showErrors = shownPoints.length <= 600;
  const xLabel = view === "ct" ? "T² (K²)" : "T (K)";
  const yLabel = view === "ct" ? "C/T (J/(mol·K²))" : view === "reduced" ? "C/(3nR)" : "Cp (J/(mol·K))";

  return (
    <div style={{ height }} className="w-full select-none" data-testid="fit-chart">
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart margin={{ top: 12, right: 20, bottom: 8, left: 8 }}>
          <CartesianGrid {...CHART_GRID} />
          <XAxis
            type="number"
            dataKey="x"
            domain={xDomain}
            scale={useLog ? "log" : "linear"}
            ticks={useLog ? logTicks(xDomain[0], xDomain[1]) : undefined}
            allowDataOverflow
            tickFormatter={fmt}
            label={xAxisTitle(xLabel)}
            height={40}
            {...CHART_AXIS}
          />
          <YAxis
            type="number"
            dataKey="y"
            width={70}
            domain={yDomain ?? ["auto", "auto"]}
            allowDataOverflow={yDomain !== undefined}
            tickFormatter={fmt}
            label={yAxisTitle(yLabel)}
            {...CHART_AXIS}
          />
          <ReferenceArea x1={toX(window[0])} x2={toX(window[1])} fill="var(--color-ember-soft)" fillOpacity={0.55} ifOverflow="hidden" />
          {view === "reduced" ? (
            <ReferenceLine
              y={1}
              stroke="var(--color-frost)"
              strokeDasharray="6 4"
              label={{ value: "Dulong–Petit 3nR", position: "insideTopRight", fill: "var(--color-frost-ink)", fontSize: 12 }}
            />
          ) : null}
          <Scatter name="outside the window" data={outWin} fill="var(--color-ink-muted)" fillOpacity={0.35} shape="circle" isAnimationActive={false} legendType="none">
            {showErrors ? <ErrorBar dataKey="err" direction="y" stroke="var(--color-line-strong)" width={0} /> : null}
          </Scatter>
          <Scatter name="in the window" data={inWin} fill="var(--color-series-1)" shape="circle" isAnimationActive={false}>
            {showErrors ? <ErrorBar dataKey="err" direction="y" stroke="var(--color-series-1)" width={0} /> : null}
          </Scatter>
          <Scatter name="masked" data={masked} fill="var(--color-danger)" shape="cross" isAnimationActive={false} />
          {fitted.length > 0 ? (
            <Line name="fit" data={fitted} dataKey="y" type="linear" dot={false} stroke="var(--color-series-2)" strokeWidth={2} isAnimationActive={false} />
          ) : null}
          <Tooltip
            isAnimationActive={false}
            formatter={(v) => (typeof v === "number" ? fmt(v) : String(v))}
            labelFormatter={() => ""}
            cursor={{ strokeDasharray: "3 3" }}
          />
          <WindowHandles window={window} toX={toX} fromX={fromX} onChange={onWindowChange} bounds={[Math.max(1e-6, tMin * 0.5), tMax * 1.5]} />
        </ComposedChart>
      </ResponsiveContainer>
      <p className="sr-only">
        {inWin.length} points in the window from {fmt(window[0])} K to {fmt(window[1])} K, {masked.length} masked points shown as crosses.
      </p>
    </div>
  );
}
