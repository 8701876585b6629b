import { readFileSync } from "node:fs";
import { expect } from "vitest";
import { main } from "../../server/cli/main";
import { verifyBagZip } from "../../server/services/bagit";
import { signIn, test } from "./browser";

// Demo lab and data from the server's demo seed (invented, labelled synthetic).
const LEAD = "lead@example.org";

test("the demo lead builds a bundle of the demo series, makes a share link, and the link opened signed out downloads a valid bag", async ({
  page,
  browser,
  demoPassword,
  pageErrors,
}) => {
  const failed: string[] = [];
  page.on("response", (r) => {
    if (r.status() >= 400) failed.push(`${r.status()} ${r.url()}`);
  });
  await signIn(page, LEAD, demoPassword);
  await page.getByRole("navigation", { name: "Lab sections" }).getByRole("link", { name: "Bundles" }).click();
  await page.waitForURL(/\/labs\/[^/]+\/bundles$/);

  const name = `Demo series ${Date.now()}`;
  const form = page.getByRole("form", { name: "Build a bundle" });
  await form.getByLabel("Bundle name").fill(name);
  const batches = form.getByRole("checkbox", { name: /^Whole batch / });
  expect(await batches.count()).toBeGreaterThanOrEqual(3);
  for (let i = 0; i < (await batches.count()); i++) await batches.nth(i).check();
  await form.getByRole("button", { name: "Build bundle" }).click();
  await form.getByText(`Built “${name}”`).waitFor({ timeout: 30_000 });

  const card = page.locator("section", { has: page.getByRole("heading", { name, exact: true }) });
  await card.getByText(/approved fits?/).waitFor();
  const links = card.getByRole("form", { name: `New share link for ${name}` });
  await links.getByLabel("Download limit").fill("2");
  await links.getByRole("button", { name: "Make share link" }).click();
  const address = card.getByLabel("Share link address");
  await address.waitFor();
  const url = await address.inputValue();
  expect(url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/api\/shared\/[A-Za-z0-9_-]{43}$/);

  // Signed out: a fresh browser context with no cookies opens the link and gets the zip.
  const stranger = await browser.newContext({ acceptDownloads: true });
  const other = await stranger.newPage();
  const [download] = await Promise.all([other.waitForEvent("download"), other.goto(url).catch(() => undefined)]);
  expect(download.suggestedFilename()).toMatch(/^thetafold-demo-series-\d+\.zip$/);
  const file = await download.path();
  const bytes = readFileSync(file);
  const report = verifyBagZip(bytes);
  expect(report.failures).toEqual([]);
  expect(report.valid).toBe(true);
  expect(report.payloadFiles).toBeGreaterThan(10);

  // The same file passes the command-line check.
  let out = "";
  const status = await main(["verify-bundle", file], { stdout: (t) => (out += t), stderr: () => undefined });
  expect(status).toBe(0);
  expect(JSON.parse(out).valid).toBe(true);
  await stranger.close();

  // The lab sees the download counted.
  await page.reload();
  await page.locator("section", { has: page.getByRole("heading", { name, exact: true }) }).getByText("1 download of 2").waitFor();
  // Before sign-in the app asks /api/me and gets 401: expected; anything else that failed is not.
  expect(failed.filter((f) => !/^401 .*\/api\/me$/.test(f))).toEqual([]);
  expect(pageErrors.filter((e) => !/401|Unauthorized/i.test(e))).toEqual([]);
});
