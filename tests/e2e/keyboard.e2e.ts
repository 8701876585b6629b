import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import type { Page } from "playwright-core";
import { expect } from "vitest";
import { test } from "./browser";

/*
 * Keyboard only: sign in and upload a run with Tab, Shift+Tab, Enter and Space, never the mouse and never
 * a locator's click() or fill(). Each stop on the way must show a visible focus indicator. The uploaded
 * file is synthetic (a copper-like γT + βT³ curve invented for this test); the sample CU-REF-1 comes from
 * the demo seed.
 */

interface Focused {
  tag: string;
  type: string | null;
  name: string;
  /** A visible focus indicator: an outline or a box shadow (Tailwind's ring) while focused. */
  indicated: boolean;
}

async function focused(page: Page): Promise<Focused> {
  return page.evaluate(() => {
    const el = document.activeElement as HTMLElement | null;
    if (!el || el === document.body) return { tag: "body", type: null, name: "", indicated: false };
    const input = el as HTMLInputElement;
    const label = input.labels?.[0]?.textContent ?? "";
    const name = (el.getAttribute("aria-label") ?? label ?? "") || (el.textContent ?? "");
    const style = getComputedStyle(el);
    const outline = style.outlineStyle !== "none" && parseFloat(style.outlineWidth) > 0;
    const shadow = style.boxShadow !== "none" && style.boxShadow !== "";
    // A visually hidden file input shows its focus on the visible control next to it, not on itself.
    return { tag: el.tagName.toLowerCase(), type: input.type ?? null, name: name.trim().replace(/\s+/g, " "), indicated: outline || shadow };
  });
}

/** Presses Tab until the focused element's accessible name matches, at most `max` times. */
async function tabTo(page: Page, name: RegExp, { max = 80, backwards = false } = {}): Promise<Focused> {
  const seen: string[] = [];
  for (let i = 0; i < max; i++) {
    await page.keyboard.press(backwards ? "Shift+Tab" : "Tab");
    const f = await focused(page);
    seen.push(`${f.tag}:${f.name.slice(0, 40)}`);
    if (name.test(f.name)) return f;
  }
  throw new Error(`Tab never reached ${name}; focus went through: ${seen.join(" → ")}`);
}

function syntheticExport(): string {
  const dir = mkdtempSync(path.join(tmpdir(), "thetafold-kbd-"));
  const file = path.join(dir, "keyboard-upload.csv");
  const moles = 25e-3 / 63.546;
  const rows = Array.from({ length: 40 }, (_, i) => {
    const t = 2 + i * 0.7;
    const c = (0.000695 * t + 4.8e-5 * t ** 3) * moles;
    return `${t.toFixed(3)},${c.toExponential(6)},${(c * 0.005).toExponential(3)}`;
  });
  writeFileSync(
    file,
    `# SYNTHETIC DATA: invented for a keyboard test (${Date.now()})\nTemperature (K),Heat capacity (J/K),Uncertainty (J/K)\n${rows.join("\n")}\n`,
  );
  return file;
}

test("sign-in and a run upload work with the keyboard alone, with a visible focus at every stop", { timeout: 300_000 }, async ({ page, demoPassword }) => {
  const stops: Focused[] = [];
  await page.goto("/sign-in");
  await page.getByRole("button", { name: "Sign in" }).waitFor();

  stops.push(await tabTo(page, /^E-mail address/));
  await page.keyboard.type("researcher@example.org");
  stops.push(await tabTo(page, /^Password/));
  await page.keyboard.type(demoPassword);
  await page.keyboard.press("Enter");
  await page.waitForURL(/\/labs\/[^/]+\/samples$/);

  stops.push(await tabTo(page, /CU-REF-1 copper reference/));
  await page.keyboard.press("Enter");
  await page.waitForURL(/\/samples\/[^/]+$/);
  await page.getByRole("heading", { level: 1, name: "CU-REF-1 copper reference" }).waitFor();

  stops.push(await tabTo(page, /^Upload a run$/));
  await page.keyboard.press("Space");
  const dialog = page.getByRole("dialog", { name: /Upload a run of CU-REF-1/ });
  await dialog.waitFor();

  const file = syntheticExport();
  // Listen first: Playwright turns on file-chooser interception asynchronously, and a key press that
  // wins that race opens the (headless, invisible) native chooser instead.
  const chooserOpened = page.waitForEvent("filechooser");
  await new Promise((r) => setTimeout(r, 200));
  stops.push(await tabTo(page, /^Choose a file/));
  await page.keyboard.press("Enter");
  await (await chooserOpened).setFiles(file);
  await dialog.getByRole("table", { name: /First rows of the file/ }).waitFor();
  // The header names its columns and units, so the proposal maps them; the preview shows the curve.
  await dialog.getByText(/Reduced curve \(40 points\)/).waitFor();

  const commit = await tabTo(page, /^Commit/);
  stops.push(commit);
  await page.keyboard.press("Enter");
  await dialog.getByText("Run stored").waitFor();
  stops.push(await tabTo(page, /keyboard-upload\.csv/));
  await page.keyboard.press("Enter");
  await page.waitForURL(/\/runs\/[^/]+$/);
  await page.getByRole("heading", { level: 1, name: "keyboard-upload.csv" }).waitFor();

  const hidden = stops.filter((s) => !s.indicated && !(s.tag === "input" && s.type === "file"));
  expect(hidden.map((s) => `${s.tag} "${s.name}"`), "stops without a visible focus indicator").toEqual([]);
});
