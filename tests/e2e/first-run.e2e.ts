import { afterAll, beforeAll, expect } from "vitest";
import { test } from "./browser";
import { startE2eServer, type E2eServer } from "./server";

// An install with no accounts at all: its own server and data folder, apart from the seeded one the other stories use.
let empty: E2eServer;
beforeAll(async () => {
  empty = await startE2eServer({ seed: "none" });
});
afterAll(() => empty?.close());

test("an empty install sends every visitor to setup; the first account leads a new lab and can invite at once", async ({ browser }) => {
  const context = await browser.newContext({ baseURL: empty.url });
  try {
    const page = await context.newPage();
    await page.goto("/");
    await page.waitForURL(/\/setup$/);
    await page.goto("/sign-in");
    await page.waitForURL(/\/setup$/);

    await page.getByRole("button", { name: "Create account and lab" }).click();
    for (const message of ["Enter your name", "Enter an e-mail address", "Use at least 10 characters", "Name the lab"]) {
      await page.getByText(message).waitFor();
    }
    await page.getByLabel("Your name").fill("Mira Solberg (synthetic)");
    await page.getByLabel("E-mail address").fill("mira.solberg@example.org");
    await page.getByLabel("Password", { exact: true }).fill("first account passphrase");
    await page.getByLabel("Password again").fill("first account passphrase");
    await page.getByLabel("Name of your lab").fill("Thermal Physics Bench (synthetic)");
    await page.getByRole("button", { name: "Create account and lab" }).click();

    await page.waitForURL(/\/labs\/[^/]+\/lab$/);
    await page.getByRole("heading", { level: 1, name: "Thermal Physics Bench (synthetic)" }).waitFor();
    await page.getByRole("form", { name: "Invite someone" }).waitFor();
    // Setup is done: the page now sends people to sign-in.
    await page.goto("/setup");
    await page.waitForURL(/\/labs\/[^/]+\/samples$/);
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toBe("Samples");
  } finally {
    await context.close();
  }
});
