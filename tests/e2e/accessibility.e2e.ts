import AxeBuilder from "@axe-core/playwright";
import type { Page } from "playwright-core";
import { describe, expect } from "vitest";
import { signIn, test } from "./browser";

/** axe-core's WCAG 2.1 A and AA rules (colour contrast, names, labels, landmarks); serious and critical findings fail. */
async function seriousViolations(page: Page): Promise<string[]> {
  await page.evaluate(() => document.fonts.ready);
  const result = await new AxeBuilder({ page }).withTags(["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"]).analyze();
  return result.violations
    .filter((v) => v.impact === "serious" || v.impact === "critical")
    .map((v) => `${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(" ")).slice(0, 3).join(", ")})`);
}

describe.each(["light", "dark"] as const)("%s theme", (theme) => {
  test(`sign-in, Samples, Lab, account and outbox pass axe WCAG 2.1 AA checks in the ${theme} theme`, async ({ page, demoPassword }) => {
    await page.emulateMedia({ colorScheme: theme });
    await page.goto("/sign-in");
    await page.getByRole("button", { name: "Sign in" }).click(); // with field errors showing
    await page.getByText("Enter your password").waitFor();
    expect(await page.evaluate(() => document.documentElement.dataset.theme)).toBe(theme);
    const findings: Record<string, string[]> = { "sign-in": await seriousViolations(page) };

    await signIn(page, "lead@example.org", demoPassword);
    findings.samples = await seriousViolations(page);
    await page.getByRole("navigation", { name: "Lab sections" }).getByRole("link", { name: "Lab" }).click();
    await page.getByRole("form", { name: "Invite someone" }).waitFor();
    findings.lab = await seriousViolations(page);
    await page.goto("/account");
    await page.getByRole("heading", { name: "Change password" }).waitFor();
    findings.account = await seriousViolations(page);
    await page.goto("/outbox");
    await page.getByRole("heading", { level: 1, name: "Outbox" }).waitFor();
    findings.outbox = await seriousViolations(page);

    expect(findings).toEqual({ "sign-in": [], samples: [], lab: [], account: [], outbox: [] });
  });
});

test("the Lab page works from the keyboard alone: skip link, section links, invite form", async ({ page, demoPassword }) => {
  await signIn(page, "lead@example.org", demoPassword);
  const labPath = new URL(page.url()).pathname.replace(/\/samples$/, "");
  await page.goto(`${labPath}/no-such-page`); // a freshly loaded page (the lab's not-found page) with nothing focused
  await page.getByRole("heading", { level: 1, name: "Nothing at this address" }).waitFor();
  await page.keyboard.press("Tab");
  expect(await page.evaluate(() => document.activeElement?.textContent)).toBe("Skip to content");
  await page.keyboard.press("Enter");
  expect(await page.evaluate(() => document.activeElement?.id)).toBe("main");

  const labLink = page.getByRole("navigation", { name: "Lab sections" }).getByRole("link", { name: "Lab" });
  await labLink.focus();
  await page.keyboard.press("Enter");
  await page.waitForURL(/\/lab$/);
  // Focus moves to the new page's title after navigation.
  await expect.poll(() => page.evaluate(() => document.activeElement?.hasAttribute("data-page-title"))).toBe(true);

  const email = page.getByRole("form", { name: "Invite someone" }).getByLabel("E-mail address");
  await email.focus();
  await page.keyboard.type(`keyboard.${Date.now()}@example.org`);
  await page.keyboard.press("Enter"); // submits the form
  await page.getByText("Invitation sent").waitFor();
});
