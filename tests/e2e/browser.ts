import { mkdirSync } from "node:fs";
import path from "node:path";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { inject, test as base } from "vitest";
import { launchBrowser, RESULTS_DIR } from "./browser-launch";

export { launchBrowser, RESULTS_DIR };

function fileSafe(name: string): string {
  return name.replace(/[^a-z0-9]+/gi, "-").replace(/^-|-$/g, "").slice(0, 100);
}

export interface E2eFixtures {
  /** Base URL of the server started by global-setup. */
  baseUrl: string;
  /** The demo accounts' password. */
  demoPassword: string;
  /** One browser per test file. */
  browser: Browser;
  /** A fresh context (cookies, storage) per test, light colour scheme unless the test opens its own. */
  context: BrowserContext;
  page: Page;
  /** Console errors and uncaught exceptions seen by `page` (minus the signed-out 401 of GET /api/me), for tests that assert a clean page. */
  pageErrors: string[];
}

/**
 * `test` with a browser page. When a test fails, a full-page screenshot of its page goes to
 * test-results/<file>--<test>.png (fixture teardown runs after the result is known).
 */
export const test = base.extend<E2eFixtures>({
  baseUrl: [async ({}, use) => use(inject("baseUrl")), { scope: "file" }],
  demoPassword: [async ({}, use) => use(inject("demoPassword")), { scope: "file" }],
  browser: [
    async ({}, use) => {
      const browser = await launchBrowser();
      await use(browser);
      await browser.close();
    },
    { scope: "file" },
  ],
  context: async ({ browser, baseUrl }, use) => {
    const context = await browser.newContext({ baseURL: baseUrl, colorScheme: "light", viewport: { width: 1280, height: 860 } });
    await use(context);
    await context.close();
  },
  pageErrors: async ({}, use) => use([]),
  page: async ({ context, pageErrors, task }, use) => {
    const page = await context.newPage();
    page.on("console", (message) => {
      if (message.type() !== "error") return;
      // Signed-out pages ask GET /api/me, which answers 401 by contract; chromium logs that as a failed resource.
      if (/\/api\/me$/.test(message.location().url) && message.text().includes("401")) return;
      pageErrors.push(message.text());
    });
    page.on("pageerror", (error) => pageErrors.push(error.message));
    await use(page);
    if (task.result?.state === "fail") {
      mkdirSync(RESULTS_DIR, { recursive: true });
      const file = path.join(RESULTS_DIR, `${fileSafe(path.basename(task.file.name))}--${fileSafe(task.name)}.png`);
      await page.screenshot({ path: file, fullPage: true }).catch(() => undefined);
      console.error(`screenshot of the failed test: ${file}`);
    }
  },
});

/** Signs in through the form, as a person would. */
export async function signIn(page: Page, email: string, password: string): Promise<void> {
  await page.goto("/sign-in");
  await page.getByLabel("E-mail address").fill(email);
  await page.getByLabel("Password", { exact: true }).fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(/\/labs\/[^/]+\/samples$/);
}
