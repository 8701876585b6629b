/**
 * Colour arithmetic for checking theme tokens against WCAG 2.1.
 * OKLCH → OKLab → linear sRGB with the matrices of B. Ottosson, "A perceptual color space for image processing"
 * (2020, bottosson.github.io/posts/oklab), as adopted by CSS Color Module Level 4 §9. Out-of-gamut channels are
 * clipped (browsers map the gamut more gently; the difference for these near-gamut tokens is small).
 * Relative luminance and contrast ratio: WCAG 2.1, definitions "relative luminance" and "contrast ratio".
 */

export interface LinearRgb {
  r: number;
  g: number;
  b: number;
}

const clip = (x: number) => Math.min(1, Math.max(0, x));

/** Linear-light sRGB of oklch(L C h), L in 0..1, h in degrees. */
export function oklchToLinearSrgb(lightness: number, chroma: number, hueDeg: number): LinearRgb {
  const hue = (hueDeg * Math.PI) / 180;
  const a = chroma * Math.cos(hue);
  const b = chroma * Math.sin(hue);
  const l = (lightness + 0.3963377774 * a + 0.2158037573 * b) ** 3;
  const m = (lightness - 0.1055613458 * a - 0.0638541728 * b) ** 3;
  const s = (lightness - 0.0894841775 * a - 1.291485548 * b) ** 3;
  return {
    r: clip(4.0767416621 * l - 3.3077115913 * m + 0.2309699292 * s),
    g: clip(-1.2684380046 * l + 2.6097574011 * m - 0.3413193965 * s),
    b: clip(-0.0041960863 * l - 0.7034186147 * m + 1.707614701 * s),
  };
}

/** sRGB transfer function inverse (IEC 61966-2-1), for #rrggbb inputs. */
function decode(channel: number): number {
  const c = channel / 255;
  return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
}

/** Parses "oklch(0.5 0.1 240)" or "#rrggbb" into linear sRGB. */
export function parseColor(css: string): LinearRgb {
  const ok = /^oklch\(\s*([\d.]+)(%?)\s+([\d.]+)\s+([\d.]+)\s*\)$/.exec(css.trim());
  if (ok) {
    const lightness = Number(ok[1]) / (ok[2] === "%" ? 100 : 1);
    return oklchToLinearSrgb(lightness, Number(ok[3]), Number(ok[4]));
  }
  const hex = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(css.trim());
  if (hex) return { r: decode(parseInt(hex[1], 16)), g: decode(parseInt(hex[2], 16)), b: decode(parseInt(hex[3], 16)) };
  throw new Error(`cannot parse colour ${css}`);
}

/** WCAG 2.1 relative luminance of a linear-light sRGB colour. */
export function relativeLuminance({ r, g, b }: LinearRgb): number {
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

/** WCAG 2.1 contrast ratio, 1..21. */
export function contrastRatio(a: LinearRgb, b: LinearRgb): number {
  const [hi, lo] = [relativeLuminance(a), relativeLuminance(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
}

/** The --color-* custom properties declared in one CSS block (the text between its braces). */
export function readColorTokens(block: string): Record<string, string> {
  const tokens: Record<string, string> = {};
  for (const match of block.matchAll(/--color-([a-z0-9-]+):\s*([^;]+);/g)) tokens[match[1]] = match[2].trim();
  return tokens;
}
