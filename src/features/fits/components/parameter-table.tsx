import type { FitParameter } from "@shared/schemas/fits";
import { MeasuredValue } from "@/components/ui/measured-value";
import { parameterSymbol } from "../utils";

/** Units the API gives in plain SI text; shown as they come except the dimensionless "1". */
const unitShown = (u: string) => (u === "1" ? "" : u);

/** An uncertainty on its own, to two significant digits (GUM §7.2.6), in the parameter's unit. */
const sigmaText = (x: number) => (Math.abs(x) < 1e-3 || Math.abs(x) >= 1e5 ? x.toExponential(1) : String(Number(x.toPrecision(2))));

/**
 * Fitted parameters with the statistical uncertainty (scaled by √χ²_red) and the systematic part from
 * the sample mass in separate columns, so neither hides in the other.
 */
export function ParameterTable({ parameters, caption }: { parameters: readonly FitParameter[]; caption?: string }) {
  const anyMass = parameters.some((p) => p.stderrMass !== null);
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-sm" aria-label={caption ?? "Fitted parameters"}>
        <caption className="sr-only">Uncertainties are standard uncertainties in the unit of each value.</caption>
        <thead className="bg-sunken text-left text-xs text-ink-muted">
          <tr>
            <th scope="col" className="px-2 py-1 font-medium">
              Parameter
            </th>
            <th scope="col" className="px-2 py-1 font-medium">
              Value ± statistical
            </th>
            <th scope="col" className="px-2 py-1 font-medium">
              Systematic from mass
            </th>
            <th scope="col" className="px-2 py-1 font-medium" title="Standard error from the stated σ alone, not scaled by χ²/dof">
              From stated σ
            </th>
          </tr>
        </thead>
        <tbody>
          {parameters.map((p) => (
            <tr key={p.name} className="border-t border-line" data-parameter={p.name}>
              <th scope="row" className="px-2 py-1 text-left font-mono font-normal">
                {parameterSymbol(p.name)}
                {p.fixed ? <span className="ml-2 rounded bg-sunken px-1 font-sans text-xs text-ink-muted">fixed</span> : null}
              </th>
              <td className="px-2 py-1">
                <MeasuredValue value={p.value} sigma={p.stderr ?? undefined} unit={unitShown(p.unit)} />
              </td>
              <td className="px-2 py-1 font-mono text-xs whitespace-nowrap">
                {p.stderrMass === null ? <span className="text-ink-muted">{anyMass ? "—" : "n/a"}</span> : `± ${sigmaText(p.stderrMass)}`}
              </td>
              <td className="px-2 py-1 font-mono text-xs whitespace-nowrap text-ink-muted">{p.stderrUnscaled === null ? "—" : `± ${sigmaText(p.stderrUnscaled)}`}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {!anyMass ? (
        <p className="mt-1 text-xs text-ink-muted">
          No mass systematic: the run was reduced without a sample mass, or its mass uncertainty is zero.
        </p>
      ) : null}
    </div>
  );
}
