import AxeBuilder from "@axe-core/playwright";
import type { Page } from "playwright-core";
import { describe, expect } from "vitest";
import { signIn, test } from "./browser";

/*
 * axe-core scans of the work pages that accessibility.e2e.ts (sign-in, Samples, Lab, account, outbox)
 * does not reach: a sample, its upload dialog, a run, the fit workspace, Compare and Bundles, in both
 * themes, one test per page. The sample SIG-B1-a and its run come from the demo seed (invented, labelled
 * synthetic).
 */

/** Serious and critical axe findings (all of axe's rules, WCAG 2.1 A/AA and best practice). */
async function seriousViolations(page: Page): Promise<string[]> {
  await page.evaluate(() => document.fonts.ready);
  const result = await new AxeBuilder({ page }).analyze();
  return result.violations
    .filter((v) => v.impact === "serious" || v.impact === "critical")
    .map((v) => `${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(" ")).slice(0, 3).join(", ")})`);
}

async function openSample(page: Page) {
  await page.getByRole("table", { name: "Samples of the lab" }).getByRole("link", { name: "SIG-B1-a" }).click();
  await page.waitForURL(/\/samples\/[^/]+$/);
  await page.getByRole("heading", { level: 1, name: "SIG-B1-a" }).waitFor();
}

async function openRun(page: Page) {
  await openSample(page);
  await page.getByRole("link", { name: "Zero-field scan 1.9-300 K" }).first().click();
  await page.waitForURL(/\/runs\/[^/]+$/);
  await page.locator(".recharts-wrapper").first().waitFor();
}

const PAGES: [string, (page: Page, lab: string) => Promise<void>][] = [
  ["a sample", openSample],
  [
    "the upload dialog",
    async (page) => {
      await openSample(page);
      await page.getByRole("button", { name: "Upload a run" }).click();
      await page.getByRole("dialog", { name: /Upload a run of SIG-B1-a/ }).getByRole("button", { name: /Choose a file/ }).waitFor();
    },
  ],
  ["a run", openRun],
  [
    "the fit workspace",
    async (page) => {
      await openRun(page);
      await page.getByRole("link", { name: "Fit a model" }).click();
      await page.waitForURL(/\/runs\/[^/]+\/fit$/);
      await page.getByRole("heading", { level: 1, name: /Fit · SIG-B1-a/ }).waitFor();
      await page.getByRole("slider", { name: "Window end (K)" }).waitFor();
    },
  ],
  [
    "Compare",
    async (page, lab) => {
      await page.goto(`${lab}/compare`);
      await page.getByRole("heading", { level: 1, name: "Compare" }).waitFor();
      await page.locator(".recharts-wrapper").first().waitFor();
    },
  ],
  [
    "Bundles",
    async (page, lab) => {
      await page.goto(`${lab}/bundles`);
      await page.getByRole("heading", { level: 1, name: "Bundles" }).waitFor();
    },
  ],
];

describe.each(["light", "dark"] as const)("%s theme", (theme) => {
  test.for(PAGES)(`%s has no serious or critical axe findings (${theme})`, { timeout: 300_000 }, async ([, open], { page, demoPassword }) => {
    await page.emulateMedia({ colorScheme: theme });
    await signIn(page, "lead@example.org", demoPassword);
    const lab = new URL(page.url()).pathname.replace(/\/samples$/, "");
    await open(page, lab);
    expect(await page.evaluate(() => document.documentElement.dataset.theme)).toBe(theme);
    expect(await seriousViolations(page)).toEqual([]);
  });
});
