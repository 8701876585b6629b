/*
 * Screenshots of every page in the light and dark theme, for looking at the design (not a test):
 *   node --import tsx tests/e2e/capture.ts  →  test-results/screens/<theme>-<page>.png
 */
import { mkdirSync } from "node:fs";
import path from "node:path";
import type { Browser, Page } from "playwright-core";
import { launchBrowser, RESULTS_DIR } from "./browser-launch";
import { startE2eServer } from "./server";

const OUT = path.join(RESULTS_DIR, "screens");

async function shot(page: Page, name: string) {
  await page.evaluate(() => document.fonts.ready);
  await page.waitForLoadState("networkidle");
  await page.screenshot({ path: path.join(OUT, `${name}.png`), fullPage: true });
  console.log(`  ${name}.png`);
}

async function signIn(page: Page, email: string, password: string) {
  await page.goto("/sign-in");
  await page.getByLabel("E-mail address").fill(email);
  await page.getByLabel("Password", { exact: true }).fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(/\/samples$/);
}

async function captureTheme(browser: Browser, baseUrl: string, password: string, theme: "light" | "dark") {
  const context = await browser.newContext({ baseURL: baseUrl, colorScheme: theme, viewport: { width: 1280, height: 820 } });
  const page = await context.newPage();
  await page.goto("/sign-in");
  await page.getByRole("button", { name: "Sign in" }).click(); // empty form: field errors
  await shot(page, `${theme}-sign-in-errors`);
  await page.goto("/forgot-password");
  await shot(page, `${theme}-forgot-password`);
  await page.goto("/reset-password/not-a-real-token-but-long-enough");
  await shot(page, `${theme}-reset-password`);

  await signIn(page, "lead@example.org", password);
  const labPath = new URL(page.url()).pathname.replace(/\/samples$/, "");
  await shot(page, `${theme}-samples`);
  await page.goto(`${labPath}/compare`);
  await shot(page, `${theme}-compare`);
  await page.goto(`${labPath}/bundles`);
  await shot(page, `${theme}-bundles`);
  await page.goto(`${labPath}/lab`);
  const form = page.getByRole("form", { name: "Invite someone" });
  await form.getByLabel("E-mail address").fill(`capture.${theme}@example.org`);
  await form.getByRole("button", { name: "Send invitation" }).click();
  await form.getByText("Invitation sent").waitFor();
  await page.getByRole("combobox", { name: /Role of Dr\. Ilse Marrow/ }).selectOption("guest");
  await page.getByRole("button", { name: /Save role of Dr\. Ilse Marrow/ }).click();
  await page.getByRole("alert").first().waitFor();
  await shot(page, `${theme}-lab-lead`);
  await page.getByRole("button", { name: /Dr\. Ilse Marrow/ }).first().click();
  await page.screenshot({ path: path.join(OUT, `${theme}-user-menu.png`) });
  await page.keyboard.press("Escape");
  await page.goto("/account");
  await shot(page, `${theme}-account`);
  await page.goto("/outbox");
  await page.getByRole("list", { name: "Received messages" }).getByRole("link").first().click();
  await page.getByRole("article").waitFor();
  await shot(page, `${theme}-outbox`);
  const href = await page.getByRole("article").getByRole("link", { name: /\/invite\// }).getAttribute("href");
  await page.goto(`${labPath}/nowhere`);
  await shot(page, `${theme}-not-found-in-lab`);

  const invitee = await browser.newContext({ baseURL: baseUrl, colorScheme: theme, viewport: { width: 1280, height: 820 } });
  const invitePage = await invitee.newPage();
  await invitePage.goto(href!);
  await invitePage.getByRole("heading", { level: 1 }).waitFor();
  await shot(invitePage, `${theme}-accept-invitation`);
  await invitee.close();

  const phone = await browser.newContext({ baseURL: baseUrl, colorScheme: theme, viewport: { width: 390, height: 800 } });
  const phonePage = await phone.newPage();
  await signIn(phonePage, "guest@example.org", password);
  await phonePage.goto(`${labPath}/lab`);
  await phonePage.getByRole("table").waitFor();
  await shot(phonePage, `${theme}-phone-lab-guest`);
  await phone.close();
  await context.close();
}

const server = await startE2eServer();
const browser = await launchBrowser();
try {
  mkdirSync(OUT, { recursive: true });
  for (const theme of ["light", "dark"] as const) {
    console.log(theme);
    await captureTheme(browser, server.url, server.demoPassword, theme);
  }
} finally {
  await browser.close();
  await server.close();
}
