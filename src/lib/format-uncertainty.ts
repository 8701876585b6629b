/**
 * Writing a measured value with its standard uncertainty, the way results are quoted.
 *
 * Convention: the uncertainty is rounded to two significant digits (JCGM 100:2008, GUM §7.2.6: "it usually
 * suffices to quote u_c ... to at most two significant digits") and the value is rounded to the same last digit.
 * The concise form puts the uncertainty in parentheses, "referred to the corresponding last digits of the quoted
 * result" (GUM §7.2.2, example 2: m_S = 100.021 47(35) g). When the uncertainty reaches past the decimal point the
 * parenthesis keeps the point, as in 342.8(1.2), so the digits still line up with the value's last digits.
 * Rounding is to the nearest digit, halves away from zero (GUM §7.2.6 allows rounding up; nearest is what people
 * reading a table expect). Very large or small magnitudes switch to a power of ten: 6.67430(15)×10⁻¹¹.
 */

export type UncertaintyStyle = "parenthesis" | "plus-minus";

export interface FormatUncertaintyOptions {
  /** Significant digits kept in the uncertainty: 1 or 2 (GUM §7.2.6: at most two). */
  significantDigits?: 1 | 2;
}

export interface FormattedMeasurement {
  /** The value's digits as shown (mantissa when `exponent` is set). */
  value: string;
  /** The uncertainty as written in the chosen style, or null when there is none to show. */
  uncertainty: string | null;
  /** Power of ten the value and uncertainty are scaled by, or null for plain notation. */
  exponent: number | null;
  /** The whole thing, e.g. "342.8(1.2)" or "342.8 ± 1.2". */
  text: string;
}

const SUPERSCRIPT: Record<string, string> = {
  "-": "⁻",
  "0": "⁰",
  "1": "¹",
  "2": "²",
  "3": "³",
  "4": "⁴",
  "5": "⁵",
  "6": "⁶",
  "7": "⁷",
  "8": "⁸",
  "9": "⁹",
};

/** Plain notation for magnitudes from 1e-3 up to (but not including) 1e6; a power of ten outside that. */
const PLAIN_MIN_EXPONENT = -3;
const PLAIN_MAX_EXPONENT = 5;

/** x·10ⁿ through the decimal exponent, so shifting does not add binary rounding error (0.6951·10⁴ is 6951, not 6950.999…). */
function shiftDecimal(x: number, n: number): number {
  const [mantissa, exp] = x.toExponential().split("e");
  return Number(`${mantissa}e${Number(exp) + n}`);
}

/** Nearest integer, halves away from zero (Math.round sends −2.5 to −2). */
function roundHalfAway(x: number): number {
  const r = Math.sign(x) * Math.round(Math.abs(x));
  return r === 0 ? 0 : r;
}

/** The integer `digits` read as a decimal with `decimals` places; negative `decimals` appends zeros. */
function placeDecimal(digits: number, decimals: number): string {
  const negative = digits < 0;
  let body = Math.abs(digits).toFixed(0);
  if (decimals <= 0) {
    body = digits === 0 ? "0" : body + "0".repeat(-decimals);
  } else {
    body = body.padStart(decimals + 1, "0");
    body = `${body.slice(0, body.length - decimals)}.${body.slice(body.length - decimals)}`;
  }
  return negative ? `-${body}` : body;
}

function superscript(n: number): string {
  return String(n)
    .split("")
    .map((c) => SUPERSCRIPT[c] ?? c)
    .join("");
}

function formatAlone(value: number): FormattedMeasurement {
  const text = Number.isFinite(value) ? String(Number(value.toPrecision(6))) : "—";
  return { value: text, uncertainty: null, exponent: null, text };
}

/**
 * Formats `value ± sigma` with the uncertainty rounded to two significant digits.
 * @param value the measured value, any unit
 * @param sigma its standard uncertainty, same unit; zero, negative or non-finite shows the value alone
 * @param style "parenthesis" → 342.8(1.2); "plus-minus" → 342.8 ± 1.2
 * @returns the pieces and the joined text (no unit: callers append it)
 * @see JCGM 100:2008 (GUM) §7.2.2 and §7.2.6
 */
export function formatUncertainty(
  value: number,
  sigma: number,
  style: UncertaintyStyle,
  options: FormatUncertaintyOptions = {},
): FormattedMeasurement {
  if (!Number.isFinite(value) || !Number.isFinite(sigma) || sigma <= 0) return formatAlone(value);
  const significantDigits = options.significantDigits ?? 2;

  // Decimal places that keep `significantDigits` digits of sigma; redo once if rounding carried into a new decade
  // (0.0996 → 0.10, not 0.100).
  let sigmaExponent = Math.floor(Math.log10(sigma));
  let decimals = significantDigits - 1 - sigmaExponent;
  let sigmaDigits = roundHalfAway(shiftDecimal(sigma, decimals));
  if (sigmaDigits >= 10 ** significantDigits) {
    sigmaExponent += 1;
    decimals -= 1;
    sigmaDigits = roundHalfAway(shiftDecimal(sigma, decimals));
  }
  const valueDigits = roundHalfAway(shiftDecimal(value, decimals));

  const largest = Math.max(Math.abs(shiftDecimal(valueDigits || 0, -decimals)), shiftDecimal(sigmaDigits, -decimals));
  const magnitude = Math.floor(Math.log10(largest));
  const exponent = magnitude < PLAIN_MIN_EXPONENT || magnitude > PLAIN_MAX_EXPONENT ? magnitude : null;
  // Places shown after the point once the power of ten is taken out; at least 1 when scaled, since sigma ≤ largest.
  const shownDecimals = exponent === null ? decimals : decimals + exponent;

  const valueText = placeDecimal(valueDigits, shownDecimals);
  const sigmaWithPoint = placeDecimal(sigmaDigits, shownDecimals);
  let uncertainty: string;
  let text: string;
  const power = exponent === null ? "" : `×10${superscript(exponent)}`;
  if (style === "parenthesis") {
    // Digits only when the uncertainty sits wholly in the last places; keep the point when it reaches past it.
    const reachesPastPoint = shownDecimals > 0 && sigmaDigits >= 10 ** shownDecimals;
    uncertainty = shownDecimals > 0 && !reachesPastPoint ? String(sigmaDigits) : sigmaWithPoint;
    text = `${valueText}(${uncertainty})${power}`;
  } else {
    uncertainty = sigmaWithPoint;
    text = exponent === null ? `${valueText} ± ${uncertainty}` : `(${valueText} ± ${uncertainty})${power}`;
  }
  return { value: valueText, uncertainty, exponent, text };
}
