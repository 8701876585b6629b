import type { ReactNode } from "react";
import type { Sample } from "@shared/schemas/samples";
import { formatPlain } from "../utils";

/** The lab's samples as a table; each label links to the sample page. */
export function SampleTable({ samples, renderLink }: { samples: readonly Sample[]; renderLink: (sample: Sample) => ReactNode }) {
  return (
    <div className="overflow-x-auto rounded-lg border border-line">
      <table className="w-full text-sm">
        <caption className="sr-only">Samples of the lab</caption>
        <thead className="bg-sunken text-left text-xs text-ink-muted">
          <tr>
            <th scope="col" className="px-3 py-2">Sample</th>
            <th scope="col" className="px-3 py-2">Batch</th>
            <th scope="col" className="px-3 py-2">Formula</th>
            <th scope="col" className="px-3 py-2">x</th>
            <th scope="col" className="px-3 py-2">Mass (mg)</th>
            <th scope="col" className="px-3 py-2">M (g/mol)</th>
            <th scope="col" className="px-3 py-2">Runs</th>
          </tr>
        </thead>
        <tbody>
          {samples.map((s) => (
            <tr key={s.id} className="border-t border-line">
              <th scope="row" className="px-3 py-2 text-left font-medium">
                {renderLink(s)}
              </th>
              <td className="px-3 py-2">{s.batchCode ?? <span className="text-ink-muted">none</span>}</td>
              <td className="px-3 py-2 font-mono">{s.formula}</td>
              <td className="px-3 py-2 font-mono">{s.compositionX === null ? "—" : formatPlain(s.compositionX)}</td>
              <td className="px-3 py-2 font-mono">
                {formatPlain(s.massMg)}
                {s.massSigmaMg > 0 ? <span className="text-ink-muted"> ± {formatPlain(s.massSigmaMg)}</span> : null}
              </td>
              <td className="px-3 py-2 font-mono">
                {formatPlain(s.molarMassGPerMol)}
                {s.molarMassOverrideReason ? <span title={s.molarMassOverrideReason} className="text-ember-ink"> *</span> : null}
              </td>
              <td className="px-3 py-2 font-mono">{s.runCount}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
