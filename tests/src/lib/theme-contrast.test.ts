// @vitest-environment jsdom
import { readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { contrastRatio, parseColor, readColorTokens } from "../../helpers/oklch-contrast";

// vitest runs from the repository root (jsdom gives import.meta.url an http: scheme, so no URL arithmetic here).
const css = readFileSync(path.resolve(process.cwd(), "src/index.css"), "utf8");
const lightBlock = /@theme \{([\s\S]*?)\n\}/.exec(css)?.[1] ?? "";
const darkBlock = /\[data-theme="dark"\] \{([\s\S]*?)\n\}/.exec(css)?.[1] ?? "";
const themes = {
  light: readColorTokens(lightBlock),
  dark: { ...readColorTokens(lightBlock), ...readColorTokens(darkBlock) },
};

// Text on its backgrounds: WCAG 2.1 SC 1.4.3 asks 4.5:1. Borders of inputs and the focus ring: SC 1.4.11 asks 3:1.
const TEXT_PAIRS = [
  ["ink", "canvas"], ["ink", "surface"], ["ink", "sunken"],
  ["ink-muted", "canvas"], ["ink-muted", "surface"], ["ink-muted", "sunken"],
  ["on-ember", "ember"], ["on-ember", "ember-strong"],
  ["ember-ink", "ember-soft"], ["ember-ink", "surface"], ["ember-ink", "canvas"],
  ["frost-ink", "frost-soft"], ["frost-ink", "surface"], ["frost-ink", "canvas"],
  ["danger", "surface"], ["danger", "danger-soft"],
  ["ok", "ok-soft"], ["caution", "caution-soft"],
  ["ink", "ember-soft"], ["ink", "frost-soft"], ["ink", "danger-soft"], ["ink", "ok-soft"], ["ink", "caution-soft"],
] as const;
const UI_PAIRS = [
  ["line-strong", "surface"], ["line-strong", "canvas"],
  ["focus", "canvas"], ["focus", "surface"], ["focus", "sunken"],
  ["ember", "surface"], ["danger", "surface"],
] as const;

describe("colour conversion used for the contrast checks", () => {
  it("maps oklch(62.8% 0.2577 29.23) to sRGB red, as CSS Color 4 §9 (OKLab) gives it", () => {
    const red = parseColor("oklch(62.8% 0.2577 29.23)");
    expect(red.r).toBeGreaterThan(0.999);
    expect(red.g).toBeLessThan(0.001);
    expect(red.b).toBeLessThan(0.001);
  });

  it("gives 21:1 for black on white and 4.48:1 for #777 on white (WCAG 2.1 contrast ratio definition)", () => {
    expect(contrastRatio(parseColor("#000000"), parseColor("#ffffff"))).toBeCloseTo(21, 10);
    // #777777 on white is the classic just-failing grey: 4.478 (WebAIM contrast checker, from memory).
    expect(contrastRatio(parseColor("#777777"), parseColor("#ffffff"))).toBeGreaterThan(4.47);
    expect(contrastRatio(parseColor("#777777"), parseColor("#ffffff"))).toBeLessThan(4.49);
  });
});

describe.each(Object.entries(themes))("%s theme tokens meet WCAG 2.1 AA", (_name, tokens) => {
  it.each(TEXT_PAIRS)("text %s on %s reaches 4.5:1 (SC 1.4.3)", (fg, bg) => {
    expect(tokens[fg], fg).toBeDefined();
    expect(tokens[bg], bg).toBeDefined();
    expect(contrastRatio(parseColor(tokens[fg]), parseColor(tokens[bg]))).toBeGreaterThanOrEqual(4.5);
  });

  it.each(UI_PAIRS)("%s against %s reaches 3:1 (SC 1.4.11)", (fg, bg) => {
    expect(contrastRatio(parseColor(tokens[fg]), parseColor(tokens[bg]))).toBeGreaterThanOrEqual(3);
  });
});
