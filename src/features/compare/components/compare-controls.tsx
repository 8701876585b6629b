import { useId, type ReactNode } from "react";
import type { AvailableParameter, Comparison } from "@shared/schemas/compare";
import type { Batch, Sample } from "@shared/schemas/samples";
import { SelectField } from "@/components/ui/field";
import type { CompareSelection } from "../api";
import { parameterLabel } from "../utils";

/** The quantities a lab compares most; always offered, even before any fit has them. */
const COMMON_PARAMETERS = ["thetaD", "thetaE", "gamma", "beta"];

interface CompareControlsProps {
  selection: CompareSelection;
  onChange: (next: CompareSelection) => void;
  batches: readonly Batch[];
  samples: readonly Sample[];
  saved: readonly Comparison[];
  /** The saved comparison the page started from, if any. */
  savedId: string | null;
  onLoadSaved: (c: Comparison | null) => void;
  available: readonly AvailableParameter[];
}

interface TickListProps {
  legend: string;
  /** Said instead of the list when there is nothing to tick. */
  empty: string;
  /** Height cap of the scrolling list. */
  listClassName: string;
  items: { id: string; name: ReactNode; detail: string }[];
  ticked: readonly string[];
  onToggle: (id: string) => void;
  /** Shown under the list. */
  children?: ReactNode;
}

/** A fieldset of checkboxes, one per item, with a name and a muted detail. */
function TickList({ legend, empty, listClassName, items, ticked, onToggle, children }: TickListProps) {
  return (
    <fieldset className="space-y-1.5">
      <legend className="text-sm font-medium text-ink">{legend}</legend>
      {items.length === 0 ? (
        <p className="text-xs text-ink-muted">{empty}</p>
      ) : (
        <ul className={`${listClassName} space-y-1 overflow-y-auto text-sm text-ink`}>
          {items.map((item) => (
            <li key={item.id}>
              <label className="inline-flex items-center gap-2">
                <input type="checkbox" checked={ticked.includes(item.id)} onChange={() => onToggle(item.id)} />
                {item.name}
                <span className="text-xs text-ink-muted">{item.detail}</span>
              </label>
            </li>
          ))}
        </ul>
      )}
      {children}
    </fieldset>
  );
}

function toggle(list: readonly string[], id: string): string[] {
  return list.includes(id) ? list.filter((x) => x !== id) : [...list, id];
}

/** What to compare: a saved comparison, the parameter, the grouping, and the batches and samples. */
export function CompareControls({ selection, onChange, batches, samples, saved, savedId, onLoadSaved, available }: CompareControlsProps) {
  const groupName = useId();
  const names = [...new Set([...COMMON_PARAMETERS, ...available.map((a) => a.name)])];
  const countOf = new Map(available.map((a) => [a.name, a.fits]));
  const parameterOptions = names.map((n) => ({
    value: n,
    label: `${parameterLabel(n)}${countOf.has(n) ? ` · ${countOf.get(n)} fit${countOf.get(n) === 1 ? "" : "s"}` : " · none yet"}`,
  }));
  const batchCode = new Map(batches.map((b) => [b.id, b.code]));

  return (
    <div className="space-y-5">
      {saved.length > 0 && (
        <SelectField
          label="Start from a saved comparison"
          name="saved"
          value={savedId ?? ""}
          onChange={(e) => onLoadSaved(saved.find((c) => c.id === e.target.value) ?? null)}
          options={[{ value: "", label: "None (choose below)" }, ...saved.map((c) => ({ value: c.id, label: c.name }))]}
        />
      )}
      <SelectField
        label="Parameter"
        name="parameter"
        value={selection.parameter}
        onChange={(e) => onChange({ ...selection, parameter: e.target.value })}
        options={parameterOptions}
        hint="θ_D also comes from β where a run was fitted with γT + βT³."
      />
      <fieldset className="space-y-1.5">
        <legend className="text-sm font-medium text-ink">Group by</legend>
        <div className="flex gap-4 text-sm text-ink">
          {(
            [
              ["batch", "Synthesis batch"],
              ["x", "Composition x"],
            ] as const
          ).map(([value, label]) => (
            <label key={value} className="inline-flex items-center gap-2">
              <input
                type="radio"
                name={groupName}
                value={value}
                checked={selection.groupBy === value}
                onChange={() => onChange({ ...selection, groupBy: value })}
              />
              {label}
            </label>
          ))}
        </div>
      </fieldset>
      <TickList
        legend="Batches"
        empty="No batches in this lab yet."
        listClassName="max-h-44"
        items={batches.map((b) => ({
          id: b.id,
          name: <span className="font-mono">{b.code}</span>,
          detail: `${b.sampleCount} sample${b.sampleCount === 1 ? "" : "s"}`,
        }))}
        ticked={selection.batchIds}
        onToggle={(id) => onChange({ ...selection, batchIds: toggle(selection.batchIds, id) })}
      />
      <TickList
        legend="Samples"
        empty="No samples in this lab yet."
        listClassName="max-h-56"
        items={samples.map((s) => ({
          id: s.id,
          name: <span>{s.label}</span>,
          detail: `${s.batchId ? (batchCode.get(s.batchId) ?? s.batchCode) : "no batch"}${s.compositionX != null ? ` · ${s.compositionName || "x"} = ${s.compositionX}` : ""}`,
        }))}
        ticked={selection.sampleIds}
        onToggle={(id) => onChange({ ...selection, sampleIds: toggle(selection.sampleIds, id) })}
      >
        <p className="text-xs text-ink-muted">
          Nothing ticked compares every approved fit of the lab. Ticked batches and samples add up.
        </p>
      </TickList>
    </div>
  );
}
