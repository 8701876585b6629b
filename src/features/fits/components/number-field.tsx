import { useEffect, useId, useState } from "react";
import { parseNumberField } from "../utils";

interface NumberFieldProps {
  label: string;
  /** Hide the label visually (it stays for screen readers). */
  hideLabel?: boolean;
  value: number | undefined;
  placeholder?: string;
  /** Called with the parsed number (undefined when emptied) on Enter, blur, or arrow keys. */
  onCommit: (value: number | undefined) => void;
  /** Arrow-key step; Shift multiplies it by 10. Omit for no stepping. */
  step?: number;
  min?: number;
  max?: number;
  disabled?: boolean;
  className?: string;
  unit?: string;
}

function formatForInput(v: number | undefined): string {
  if (v === undefined || !Number.isFinite(v)) return "";
  return String(Number(v.toPrecision(10)));
}

/** A text box for one number: typing stays free (1e-3, −0.5) and commits on Enter or leaving the box. */
export function NumberField({ label, hideLabel, value, placeholder, onCommit, step, min, max, disabled, className, unit }: NumberFieldProps) {
  const id = useId();
  const [text, setText] = useState(formatForInput(value));
  useEffect(() => setText(formatForInput(value)), [value]);
  const parsed = parseNumberField(text);
  const invalid = parsed !== undefined && !Number.isFinite(parsed);

  const commit = (t: string) => {
    const v = parseNumberField(t);
    if (v !== undefined && !Number.isFinite(v)) return;
    if (v !== value) onCommit(v);
  };
  const clamp = (v: number) => Math.min(max ?? Infinity, Math.max(min ?? -Infinity, v));

  return (
    <span className={`flex items-center gap-1 ${className ?? ""}`}>
      <label htmlFor={id} className={hideLabel ? "sr-only" : "text-xs text-ink-muted"}>
        {label}
      </label>
      <input
        id={id}
        type="text"
        inputMode="decimal"
        autoComplete="off"
        spellCheck={false}
        disabled={disabled}
        value={text}
        placeholder={placeholder}
        aria-invalid={invalid || undefined}
        onChange={(e) => setText(e.target.value)}
        onBlur={() => commit(text)}
        onKeyDown={(e) => {
          if (e.key === "Enter") {
            e.preventDefault();
            commit(text);
          } else if (step !== undefined && (e.key === "ArrowUp" || e.key === "ArrowDown")) {
            e.preventDefault();
            const base = parsed !== undefined && Number.isFinite(parsed) ? parsed : (value ?? 0);
            const delta = (e.key === "ArrowUp" ? 1 : -1) * step * (e.shiftKey ? 10 : 1);
            const next = clamp(Number((base + delta).toPrecision(12)));
            setText(formatForInput(next));
            onCommit(next);
          }
        }}
        className={`w-24 rounded border bg-surface px-1.5 py-0.5 font-mono text-sm tabular-nums outline-none focus-visible:outline-2 focus-visible:outline-offset-1 disabled:opacity-50 ${
          invalid ? "border-danger" : "border-line-strong"
        }`}
      />
      {unit ? <span className="text-xs text-ink-muted">{unit}</span> : null}
    </span>
  );
}
