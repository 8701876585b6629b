import { useId, useState } from "react";
import type { ComponentKind, ParamSpec } from "@shared/physics/model-types";
import type { ModelDefinitionInput } from "@shared/schemas/fits";
import {
  ADDABLE_KINDS,
  COMPONENT_INFO,
  addComponent,
  componentParameterNames,
  parameterSymbol,
  removeComponent,
  replaceComponent,
  updateParameter,
} from "../utils";
import { NumberField } from "./number-field";

interface ModelComposerProps {
  definition: ModelDefinitionInput;
  onChange: (next: ModelDefinitionInput) => void;
  /** Parameter specs of the composite (names, units, bounds), or null when the model cannot be built. */
  specs: readonly ParamSpec[] | null;
  /** Why the model cannot be built, shown under the terms. */
  buildError?: string | null;
  /** Start values the engine would pick from the data, shown as placeholders. */
  suggested?: Readonly<Record<string, number>> | null;
  /** Fills every free start value from the data. */
  onUseSuggested?: () => void;
  atomsPerFormulaUnit: number;
  disabled?: boolean;
}

const DIMENSION_LABEL: Record<1 | 2 | 3, string> = { 3: "3D solid", 2: "2D layers", 1: "1D chains" };

function boundText(x: number): string {
  if (x === Infinity) return "∞";
  if (x === -Infinity) return "−∞";
  return String(x);
}

/**
 * The model composer: a stack of terms, each with its parameters (start value, fixed or free, bounds),
 * a row of buttons to add terms, and the atom-count constraint.
 */
export function ModelComposer({
  definition,
  onChange,
  specs,
  buildError,
  suggested,
  onUseSuggested,
  atomsPerFormulaUnit,
  disabled,
}: ModelComposerProps) {
  const groups = componentParameterNames(definition);
  const specByName = new Map((specs ?? []).map((s) => [s.name, s]));
  const hasDebye = definition.components.some((c) => c.kind === "debye");
  const constraintId = useId();
  const [addOpen, setAddOpen] = useState(false);

  const add = (kind: ComponentKind) => {
    onChange(addComponent(definition, kind === "debye" ? { kind: "debye", dimension: 3 } : ({ kind } as never)));
    setAddOpen(false);
  };

  return (
    <section aria-labelledby="composer-title" className="space-y-3">
      <div className="flex items-baseline justify-between gap-2">
        <h2 id="composer-title" className="text-base font-semibold">
          Model
        </h2>
        {onUseSuggested ? (
          <button type="button" className="text-sm underline decoration-dotted underline-offset-2" onClick={onUseSuggested} disabled={disabled}>
            Start values from the data
          </button>
        ) : null}
      </div>

      {definition.components.length === 0 ? (
        <p className="rounded border border-dashed border-line-strong p-3 text-sm">
          No terms yet. Add an electronic term and a Debye lattice term to begin; most metals need no more.
        </p>
      ) : (
        <ol className="space-y-2" aria-label="Model terms">
          {definition.components.map((component, index) => {
            const info = COMPONENT_INFO[component.kind];
            const sameKindBefore = definition.components.slice(0, index).filter((c) => c.kind === component.kind).length;
            const title = sameKindBefore > 0 ? `${info.title} ${sameKindBefore + 1}` : info.title;
            return (
              <li key={index} className="rounded-md border border-line-strong p-2" aria-label={title}>
                <div className="flex flex-wrap items-center gap-2">
                  <span className="font-medium">{title}</span>
                  <span className="font-mono text-xs text-ink-muted" title={info.note}>
                    {info.formula}
                  </span>
                  {component.kind === "debye" ? (
                    <label className="ml-auto flex items-center gap-1 text-xs">
                      <span>Dimension</span>
                      <select
                        value={component.dimension ?? 3}
                        disabled={disabled}
                        onChange={(e) => onChange(replaceComponent(definition, index, { kind: "debye", dimension: Number(e.target.value) as 1 | 2 | 3 }))}
                        className="rounded border border-line-strong bg-surface px-1 py-0.5"
                      >
                        {([3, 2, 1] as const).map((d) => (
                          <option key={d} value={d}>
                            {DIMENSION_LABEL[d]}
                          </option>
                        ))}
                      </select>
                    </label>
                  ) : null}
                  <button
                    type="button"
                    className={`${component.kind === "debye" ? "" : "ml-auto"} rounded px-1.5 text-sm hover:bg-sunken`}
                    aria-label={`Remove ${title}`}
                    disabled={disabled}
                    onClick={() => onChange(removeComponent(definition, index))}
                  >
                    ✕
                  </button>
                </div>
                <table className="mt-1 w-full text-sm">
                  <tbody>
                    {groups[index].map((name) => {
                      const spec = specByName.get(name);
                      const setting = definition.parameters?.[name] ?? {};
                      const symbol = parameterSymbol(name);
                      const auto = suggested?.[name];
                      return (
                        <tr key={name} data-parameter={name}>
                          <th scope="row" className="w-16 py-0.5 pr-2 text-left font-mono font-normal">
                            {symbol}
                          </th>
                          <td className="py-0.5">
                            <NumberField
                              label={`${symbol} ${setting.fixed ? "value" : "start value"}`}
                              hideLabel
                              value={setting.value}
                              placeholder={auto !== undefined ? `auto ${Number(auto.toPrecision(4))}` : "auto"}
                              unit={spec?.unit === "1" ? "" : spec?.unit}
                              disabled={disabled}
                              onCommit={(v) => onChange(updateParameter(definition, name, { value: v }))}
                            />
                          </td>
                          <td className="py-0.5">
                            <label className="flex items-center gap-1 text-xs">
                              <input
                                type="checkbox"
                                checked={setting.fixed === true}
                                disabled={disabled}
                                onChange={(e) => {
                                  const fixed = e.target.checked;
                                  const value = fixed ? (setting.value ?? auto) : setting.value;
                                  onChange(updateParameter(definition, name, { fixed, value }));
                                }}
                              />
                              <span>fixed</span>
                              <span className="sr-only">{symbol}</span>
                            </label>
                          </td>
                          <td className="py-0.5">
                            <div className="flex items-center gap-1">
                              <NumberField
                                label={`${symbol} lower bound`}
                                hideLabel
                                value={setting.lower}
                                placeholder={spec ? boundText(spec.lower) : "min"}
                                disabled={disabled || setting.fixed === true}
                                className="[&_input]:w-16"
                                onCommit={(v) => onChange(updateParameter(definition, name, { lower: v }))}
                              />
                              <span aria-hidden="true">…</span>
                              <NumberField
                                label={`${symbol} upper bound`}
                                hideLabel
                                value={setting.upper}
                                placeholder={spec ? boundText(spec.upper) : "max"}
                                disabled={disabled || setting.fixed === true}
                                className="[&_input]:w-16"
                                onCommit={(v) => onChange(updateParameter(definition, name, { upper: v }))}
                              />
                            </div>
                          </td>
                        </tr>
                      );
                    })}
                  </tbody>
                </table>
              </li>
            );
          })}
        </ol>
      )}

      {buildError ? (
        <p role="alert" className="text-sm text-danger">
          {buildError}
        </p>
      ) : null}

      <div>
        <button
          type="button"
          aria-expanded={addOpen}
          aria-controls="composer-add"
          disabled={disabled}
          onClick={() => setAddOpen((o) => !o)}
          className="rounded border border-line-strong px-2 py-1 text-sm hover:bg-sunken"
        >
          + Add a term
        </button>
        {addOpen ? (
          <div id="composer-add" role="group" aria-label="Terms to add" className="mt-2 grid grid-cols-2 gap-1">
            {ADDABLE_KINDS.map((kind) => (
              <button
                key={kind}
                type="button"
                onClick={() => add(kind)}
                className="rounded border border-line-strong px-2 py-1 text-left text-sm hover:bg-sunken"
              >
                <span className="block font-medium">{COMPONENT_INFO[kind].title}</span>
                <span className="block text-xs text-ink-muted">{COMPONENT_INFO[kind].note}</span>
              </button>
            ))}
          </div>
        ) : null}
      </div>

      <div className="flex items-start gap-2 text-sm">
        <input
          id={constraintId}
          type="checkbox"
          className="mt-1"
          checked={definition.constrainAtoms === true}
          disabled={disabled || !hasDebye}
          onChange={(e) => onChange({ ...definition, constrainAtoms: e.target.checked || undefined })}
        />
        <label htmlFor={constraintId}>
          Oscillator atoms add up to n = {Number.isFinite(atomsPerFormulaUnit) ? atomsPerFormulaUnit : "?"}
          <span className="block text-xs text-ink-muted">
            n_D = n − Σ n_E, so the Debye atom count is not fitted{hasDebye ? "" : " (needs a Debye term)"}.
          </span>
        </label>
      </div>
    </section>
  );
}
