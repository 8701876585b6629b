import { memo, useId } from "react";
import type { TableSummary } from "@shared/schemas/ingest";
import { cn } from "@/lib/cn";
import {
  assignRole,
  COLUMN_ROLES,
  FIELD_UNIT_OPTIONS,
  HEAT_CAPACITY_UNIT_OPTIONS,
  roleOfColumn,
  SIGMA_SCALE_OPTIONS,
  TEMPERATURE_UNIT_OPTIONS,
  type ColumnRole,
  type MappingDraft,
} from "../utils";

const SELECT = "h-9 w-full rounded-md border border-line-strong bg-surface px-2 text-sm text-ink focus-visible:outline-2 focus-visible:outline-offset-1";

interface ColumnMappingProps {
  table: TableSummary;
  draft: MappingDraft;
  onChange: (draft: MappingDraft) => void;
  /** How many data rows to show under the header. */
  rows?: number;
}

function UnitSelect<T extends string>({
  label,
  value,
  options,
  onChange,
  hint,
}: {
  label: string;
  value: T | undefined;
  options: readonly { value: T; label: string }[];
  onChange: (v: T) => void;
  hint?: string;
}) {
  const id = useId();
  return (
    <div className="space-y-1">
      <label htmlFor={id} className="block text-xs font-medium text-ink">
        {label}
      </label>
      <select id={id} className={SELECT} value={value ?? ""} onChange={(e) => onChange(e.target.value as T)} aria-describedby={hint ? `${id}-hint` : undefined}>
        {value === undefined ? <option value="">Choose…</option> : null}
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      {hint ? (
        <p id={`${id}-hint`} className="text-xs text-ink-muted">
          {hint}
        </p>
      ) : null}
    </div>
  );
}

/**
 * The first rows of the file as read, with one control per column (what it holds) and one per unit.
 * A role belongs to one column: giving it to another column frees the first.
 */
export const ColumnMapping = memo(function ColumnMapping({ table, draft, onChange, rows = 8 }: ColumnMappingProps) {
  const unitText = (name: string | undefined) => {
    if (!name) return undefined;
    const i = table.header.indexOf(name);
    const t = i >= 0 ? table.unitTexts[i] : null;
    return t ? `The header says “${t}”.` : "The header names no unit.";
  };
  const delimiter = table.delimiter === "\t" ? "tab" : table.delimiter === "whitespace" ? "spaces" : `“${table.delimiter}”`;

  return (
    <div className="space-y-4">
      <p className="text-xs text-ink-muted">
        Read {table.rowCount} data rows, columns separated by {delimiter}, decimal {table.decimalMark === "," ? "comma" : "point"}
        {table.headerLine !== null ? `, names on line ${table.headerLine}` : ", no header line"}
        {table.preamble.filter((l) => l.trim() !== "").length > 0 ? `, ${table.preamble.filter((l) => l.trim() !== "").length} line(s) of notes above` : ""}.
      </p>
      <div className="overflow-x-auto rounded-lg border border-line">
        <table className="w-full text-sm">
          <caption className="sr-only">First rows of the file, with what each column holds</caption>
          <thead className="bg-sunken align-top">
            <tr>
              <th scope="col" className="px-2 py-2 text-left text-xs font-medium text-ink-muted">
                line
              </th>
              {table.header.map((name, i) => {
                const role = roleOfColumn(draft, name);
                return (
                  <th key={name} scope="col" className="min-w-40 px-2 py-2 text-left">
                    <span className="block truncate font-mono text-xs text-ink" title={name}>
                      {name}
                    </span>
                    <label className="sr-only" htmlFor={`column-role-${i}`}>
                      Use of column {name}
                    </label>
                    <select
                      id={`column-role-${i}`}
                      className={cn(SELECT, "mt-1", role !== "ignore" && "border-ember font-medium")}
                      value={role}
                      onChange={(e) => onChange(assignRole(draft, name, e.target.value as ColumnRole))}
                    >
                      {COLUMN_ROLES.map((r) => (
                        <option key={r.value} value={r.value} disabled={r.value !== "ignore" && table.columnKinds[i] === "text"}>
                          {r.label}
                        </option>
                      ))}
                    </select>
                    {table.columnKinds[i] === "text" ? <span className="mt-1 block text-xs font-normal text-ink-muted">text, not numbers</span> : null}
                  </th>
                );
              })}
            </tr>
          </thead>
          <tbody className="font-mono text-xs">
            {table.firstRows.slice(0, rows).map((r) => (
              <tr key={r.line} className="border-t border-line">
                <td className="px-2 py-1 text-ink-muted">{r.line}</td>
                {r.cells.map((c, i) => (
                  <td key={i} className={cn("px-2 py-1", roleOfColumn(draft, table.header[i]) === "ignore" && "text-ink-muted")}>
                    {c}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <fieldset className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
        <legend className="mb-2 text-sm font-medium text-ink">Units</legend>
        <UnitSelect
          label="Temperature unit"
          value={draft.units.temperature}
          options={TEMPERATURE_UNIT_OPTIONS}
          onChange={(v) => onChange({ ...draft, units: { ...draft.units, temperature: v } })}
          hint={unitText(draft.columns.temperature)}
        />
        <UnitSelect
          label="Heat-capacity unit"
          value={draft.units.heatCapacity}
          options={HEAT_CAPACITY_UNIT_OPTIONS}
          onChange={(v) => onChange({ ...draft, units: { ...draft.units, heatCapacity: v } })}
          hint={unitText(draft.columns.heatCapacity)}
        />
        {draft.columns.field ? (
          <UnitSelect
            label="Field unit"
            value={draft.units.field}
            options={FIELD_UNIT_OPTIONS}
            onChange={(v) => onChange({ ...draft, units: { ...draft.units, field: v } })}
            hint={unitText(draft.columns.field)}
          />
        ) : null}
        {draft.columns.sigma ? (
          <UnitSelect
            label="Uncertainty given"
            value={draft.sigmaScale ?? "absolute"}
            options={SIGMA_SCALE_OPTIONS}
            onChange={(v) => onChange({ ...draft, sigmaScale: v })}
          />
        ) : null}
      </fieldset>
    </div>
  );
});
