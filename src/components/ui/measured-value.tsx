import { formatUncertainty, type UncertaintyStyle } from "@/lib/format-uncertainty";
import { useSettings } from "@/lib/settings";
import { cn } from "@/lib/cn";

interface MeasuredValueProps {
  value: number;
  /** Standard uncertainty in the same unit; omit for a value without one. */
  sigma?: number;
  /** Unit symbol written after the number, e.g. "K" or "J/(mol·K)". */
  unit?: string;
  /** Overrides the user's chosen notation (for examples that show both). */
  style?: UncertaintyStyle;
  className?: string;
}

/**
 * A value with its uncertainty in the monospaced face, in the notation the user picked:
 * `342.8(1.2) K` or `342.8 ± 1.2 K`. Screen readers hear "342.8 plus or minus 1.2 K".
 */
export function MeasuredValue({ value, sigma, unit, style, className }: MeasuredValueProps) {
  const { uncertaintyStyle } = useSettings();
  const shown = formatUncertainty(value, sigma ?? Number.NaN, style ?? uncertaintyStyle);
  const spokenParts = formatUncertainty(value, sigma ?? Number.NaN, "plus-minus");
  const power = spokenParts.exponent === null ? "" : ` times ten to the ${spokenParts.exponent}`;
  const spoken = spokenParts.uncertainty
    ? `${spokenParts.value} plus or minus ${spokenParts.uncertainty}${power}`
    : spokenParts.text;
  const unitText = unit ? `\u00a0${unit}` : "";
  return (
    <span className={cn("font-mono whitespace-nowrap", className)}>
      <span aria-hidden="true">
        {shown.text}
        {unitText}
      </span>
      <span className="sr-only">
        {spoken}
        {unitText}
      </span>
    </span>
  );
}
