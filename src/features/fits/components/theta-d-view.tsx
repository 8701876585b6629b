import { CartesianGrid, ReferenceArea, ReferenceLine, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis } from "recharts";
import type { ThetaDCurve } from "@shared/schemas/fits";
import { MeasuredValue } from "@/components/ui/measured-value";
import { CHART_AXIS, CHART_GRID, xAxisTitle, yAxisTitle } from "@/components/ui/chart-style";
import { decimateForDisplay, logTicks } from "../utils";

const fmt = (v: number) => String(Number(v.toPrecision(4)));

/**
 * θ_D(T): each point's equivalent Debye temperature after the fitted electronic part is taken off,
 * with the fitted θ_D across it. Points with no solution sit on a strip under the axis, marked apart.
 */
export function ThetaDView({ curve, logT }: { curve: ThetaDCurve; logT?: boolean }) {
  const shown = decimateForDisplay(curve.points.filter((p) => !p.masked));
  const solved = shown.filter((p) => p.thetaD !== null).map((p) => ({ x: p.temperatureK, y: p.thetaD as number }));
  const unsolved = curve.points.filter((p) => !p.masked && p.thetaD === null);
  const ys = solved.map((p) => p.y);
  const fitted = curve.fittedThetaD?.value;
  const lo = Math.min(...ys, fitted ?? Infinity);
  const hi = Math.max(...ys, fitted ?? -Infinity);
  const pad = Number.isFinite(lo) && Number.isFinite(hi) ? Math.max(1, (hi - lo) * 0.12) : 10;
  const floor = Number.isFinite(lo) ? Math.max(0, lo - 2 * pad) : 0;
  const strip = unsolved.map((p) => ({ x: p.temperatureK, y: floor + pad * 0.4 }));
  const xs = curve.points.filter((p) => !p.masked).map((p) => p.temperatureK);
  const tLo = Math.min(...xs) * 0.95;
  const tHi = Math.max(...xs) * 1.05;
  return (
    <figure className="space-y-2">
      <div className="h-72 w-full" data-testid="theta-d-chart">
        <ResponsiveContainer width="100%" height="100%">
          <ScatterChart margin={{ top: 12, right: 20, bottom: 8, left: 8 }}>
            <CartesianGrid {...CHART_GRID} />
            <XAxis
              type="number"
              dataKey="x"
              scale={logT ? "log" : "linear"}
              domain={logT ? [tLo, tHi] : ["auto", "auto"]}
              ticks={logT ? logTicks(tLo, tHi) : undefined}
              tickFormatter={fmt}
              height={36}
              {...CHART_AXIS}
              label={xAxisTitle("T (K)", { offset: -2 })}
            />
            <YAxis
              type="number"
              dataKey="y"
              width={70}
              domain={[floor, Number.isFinite(hi) ? hi + pad : 100]}
              allowDataOverflow
              tickFormatter={fmt}
              {...CHART_AXIS}
              label={yAxisTitle("θ_D(T) (K)")}
            />
            {strip.length > 0 ? <ReferenceArea y1={floor} y2={floor + pad * 0.8} fill="var(--color-danger-soft)" fillOpacity={0.8} /> : null}
            {fitted !== undefined ? (
              <ReferenceLine
                y={fitted}
                stroke="var(--color-series-2)"
                strokeWidth={2}
                strokeDasharray="8 4"
                label={{ value: `fitted θ_D = ${fmt(fitted)} K`, position: "insideTopRight", fill: "var(--color-ink)", fontSize: 12 }}
              />
            ) : null}
            <Scatter name="θ_D(T)" data={solved} fill="var(--color-series-1)" isAnimationActive={false} />
            <Scatter name="no solution" data={strip} fill="var(--color-danger)" shape="cross" isAnimationActive={false} />
            <Tooltip isAnimationActive={false} formatter={(v) => (typeof v === "number" ? fmt(v) : String(v))} labelFormatter={() => ""} />
          </ScatterChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="space-y-1 text-sm">
        <p>
          {curve.fittedThetaD ? (
            <>
              Fitted θ_D <MeasuredValue value={curve.fittedThetaD.value} sigma={curve.fittedThetaD.stderr ?? undefined} unit="K" /> ({curve.fittedThetaD.source}).{" "}
            </>
          ) : (
            "This fit has no Debye term or T³ term, so there is no fitted θ_D to compare with. "
          )}
          Subtracted before the inversion: {curve.subtracted.length ? curve.subtracted.join(", ") : "nothing"}; n = {curve.atomsPerFormulaUnit}.
        </p>
        {unsolved.length > 0 ? (
          <p className="text-danger">
            {unsolved.length} point{unsolved.length > 1 ? "s have" : " has"} no solution (crosses on the shaded strip): the lattice part is at or below 0, or
            at or above 3nR. First: {fmt(unsolved[0].temperatureK)} K — {unsolved[0].noSolution}.
          </p>
        ) : (
          <p className="text-ink-muted">Every point has a solution. A flat θ_D(T) means a single Debye solid describes the lattice.</p>
        )}
      </figcaption>
    </figure>
  );
}
