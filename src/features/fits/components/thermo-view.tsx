import { useState } from "react";
import { CartesianGrid, Legend, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import type { ThermoTable } from "@shared/schemas/fits";
import { buttonClasses } from "@/components/ui/button";
import { CHART_AXIS, CHART_GRID } from "@/components/ui/chart-style";
import { parseNumberField } from "../utils";

const fmt = (v: number, d = 5) => String(Number(v.toPrecision(d)));

interface ThermoViewProps {
  table: ThermoTable;
  csvUrl: string;
  /** Temperatures asked for (empty: the default table). */
  at: readonly number[];
  onAtChange: (at: number[]) => void;
}

/** S(T) and H(T) − H(0) from the data with the fitted model below the first point: table, plot, CSV. */
export function ThermoView({ table, csvUrl, at, onAtChange }: ThermoViewProps) {
  const [text, setText] = useState(at.join(", "));
  const [error, setError] = useState<string | null>(null);
  const apply = () => {
    const parts = text.split(/[,;\s]+/).filter((s) => s !== "");
    const values = parts.map((p) => parseNumberField(p));
    const bad = parts.find((_, i) => !(values[i] !== undefined && Number.isFinite(values[i]) && (values[i] as number) > 0));
    if (bad !== undefined) {
      setError(`“${bad}” is not a temperature above 0 K`);
      return;
    }
    setError(null);
    onAtChange(values as number[]);
  };
  const rows = table.rows;
  return (
    <div className="space-y-3">
      <form
        className="flex flex-wrap items-end gap-2"
        onSubmit={(e) => {
          e.preventDefault();
          apply();
        }}
      >
        <label className="space-y-1 text-sm">
          <span className="block font-medium">Temperatures (K)</span>
          <input
            className="h-8 w-64 rounded-lg border border-line-strong bg-surface px-2 font-mono text-sm"
            value={text}
            placeholder="default: round temperatures and 298.15"
            onChange={(e) => setText(e.target.value)}
            aria-invalid={error ? true : undefined}
          />
        </label>
        <button type="submit" className={buttonClasses("secondary", "sm")}>
          Tabulate
        </button>
        <a className={buttonClasses("secondary", "sm")} href={csvUrl} download>
          Download CSV
        </a>
        {error ? <p className="w-full text-xs text-danger">{error}</p> : null}
      </form>
      <p className="text-xs text-ink-muted">
        Data from {fmt(table.dataStartK, 4)} K to {fmt(table.dataEndK, 4)} K; below {fmt(table.dataStartK, 4)} K the fitted model is integrated (
        {fmt(table.modelShareOfEntropy * 100, 3)} % of the entropy at the last row). Research data, not certified property values.
      </p>
      <div className="grid gap-4 lg:grid-cols-2">
        <div className="max-h-80 overflow-auto">
          <table className="w-full text-sm" aria-label="Thermodynamic functions">
            <thead className="sticky top-0 bg-sunken text-left text-xs text-ink-muted">
              <tr>
                <th scope="col" className="px-2 py-1 font-medium">
                  T (K)
                </th>
                <th scope="col" className="px-2 py-1 font-medium">
                  Cp (J/(mol·K))
                </th>
                <th scope="col" className="px-2 py-1 font-medium">
                  S (J/(mol·K))
                </th>
                <th scope="col" className="px-2 py-1 font-medium">
                  H − H(0) (J/mol)
                </th>
              </tr>
            </thead>
            <tbody className="font-mono tabular-nums">
              {rows.map((r) => (
                <tr key={r.temperatureK} className={`border-t border-line ${r.temperatureK === 298.15 ? "bg-ember-soft" : ""}`}>
                  <td className="px-2 py-0.5">{fmt(r.temperatureK, 6)}</td>
                  <td className="px-2 py-0.5">{fmt(r.cp)}</td>
                  <td className="px-2 py-0.5">{fmt(r.entropy)}</td>
                  <td className="px-2 py-0.5">{fmt(r.enthalpy)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <div className="h-72" data-testid="thermo-chart">
          <ResponsiveContainer width="100%" height="100%">
            <LineChart data={rows.map((r) => ({ T: r.temperatureK, S: r.entropy, H: r.enthalpy / 1000 }))} margin={{ top: 12, right: 8, bottom: 8, left: 8 }}>
              <CartesianGrid {...CHART_GRID} />
              <XAxis type="number" dataKey="T" domain={[0, "auto"]} tickFormatter={(v) => fmt(v, 3)} {...CHART_AXIS} />
              <YAxis yAxisId="S" width={56} {...CHART_AXIS} stroke="var(--color-series-1)" tickFormatter={(v) => fmt(v, 3)} />
              <YAxis yAxisId="H" orientation="right" width={56} {...CHART_AXIS} stroke="var(--color-series-2)" tickFormatter={(v) => fmt(v, 3)} />
              <Line yAxisId="S" dataKey="S" name="S (J/(mol·K))" stroke="var(--color-series-1)" dot={{ r: 2 }} isAnimationActive={false} />
              <Line yAxisId="H" dataKey="H" name="H − H(0) (kJ/mol)" stroke="var(--color-series-2)" strokeDasharray="6 3" dot={{ r: 2 }} isAnimationActive={false} />
              <Legend wrapperStyle={{ fontSize: 12 }} />
              <Tooltip isAnimationActive={false} formatter={(v) => (typeof v === "number" ? fmt(v) : String(v))} labelFormatter={(l) => `T = ${l} K`} />
            </LineChart>
          </ResponsiveContainer>
        </div>
      </div>
    </div>
  );
}
