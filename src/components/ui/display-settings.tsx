import { useId } from "react";
import { THEME_CHOICES, UNCERTAINTY_STYLES, useSettings } from "@/lib/settings";
import { cn } from "@/lib/cn";

function RadioRow<T extends string>({
  legend,
  name,
  options,
  value,
  onChange,
  compact,
}: {
  legend: string;
  name: string;
  options: readonly { value: T; label: string; example?: string }[];
  value: T;
  onChange(value: T): void;
  compact?: boolean;
}) {
  return (
    <fieldset className="space-y-1.5">
      <legend className={cn("font-medium text-ink", compact ? "mb-1 text-xs tracking-wide text-ink-muted uppercase" : "mb-2 text-sm")}>
        {legend}
      </legend>
      {options.map((option) => (
        <label
          key={option.value}
          className="flex cursor-pointer items-center gap-2.5 rounded-md px-2 py-1.5 text-sm text-ink hover:bg-sunken has-checked:bg-sunken"
        >
          <input
            type="radio"
            name={name}
            value={option.value}
            checked={value === option.value}
            onChange={() => onChange(option.value)}
            className="size-4 accent-(--color-ember)"
          />
          <span className="flex-1">{option.label}</span>
          {option.example && <span className="font-mono text-xs text-ink-muted">{option.example}</span>}
        </label>
      ))}
    </fieldset>
  );
}

/** Theme and uncertainty-notation pickers; the choice is kept in this browser. */
export function DisplaySettings({ compact = false }: { compact?: boolean }) {
  const { theme, setTheme, uncertaintyStyle, setUncertaintyStyle } = useSettings();
  const id = useId();
  return (
    <div className={cn("grid gap-4", compact ? "" : "sm:grid-cols-2")}>
      <RadioRow legend="Theme" name={`${id}-theme`} options={THEME_CHOICES} value={theme} onChange={setTheme} compact={compact} />
      <RadioRow
        legend="Uncertainty notation"
        name={`${id}-uncertainty`}
        options={UNCERTAINTY_STYLES}
        value={uncertaintyStyle}
        onChange={setUncertaintyStyle}
        compact={compact}
      />
    </div>
  );
}
