import type { SampleDetail } from "@shared/schemas/samples";
import { formatPlain } from "../utils";

/** What reduction uses for this sample, with where each number came from. */
export function SampleFacts({ sample }: { sample: SampleDetail }) {
  const rows: { term: string; value: string; note?: string }[] = [
    { term: "Formula", value: sample.formula },
    {
      term: "Molar mass",
      value: `${formatPlain(sample.molarMassGPerMol)} g/mol`,
      note: sample.molarMassOverrideReason
        ? `set by hand (${sample.molarMassOverrideReason}); the formula gives ${formatPlain(sample.derived.molarMassGPerMol)}`
        : "from the formula",
    },
    {
      term: "Atoms per formula unit",
      value: formatPlain(sample.atomsPerFormulaUnit),
      note: sample.atomsOverrideReason ? `set by hand (${sample.atomsOverrideReason}); the formula gives ${formatPlain(sample.derived.atomsPerFormulaUnit)}` : "from the formula",
    },
    { term: "Mass", value: `${formatPlain(sample.massMg)} ± ${formatPlain(sample.massSigmaMg)} mg` },
    { term: "Batch", value: sample.batchCode ?? "none" },
    ...(sample.compositionX !== null ? [{ term: sample.compositionName || "Composition x", value: formatPlain(sample.compositionX) }] : []),
  ];
  return (
    <div className="space-y-3">
      <dl className="grid gap-x-6 gap-y-3 sm:grid-cols-2">
        {rows.map((r) => (
          <div key={r.term}>
            <dt className="text-xs text-ink-muted">{r.term}</dt>
            <dd className="font-mono text-sm text-ink">{r.value}</dd>
            {r.note ? <dd className="text-xs text-ink-muted">{r.note}</dd> : null}
          </div>
        ))}
      </dl>
      {sample.notes ? <p className="text-sm whitespace-pre-line text-ink">{sample.notes}</p> : null}
      <p className="text-xs text-ink-muted">Runs already stored keep the mass and molar mass they were reduced with; a change here applies to new uploads.</p>
    </div>
  );
}
