import { expect } from "vitest";
import { signIn, test } from "./browser";

// The demo lab, its three batches of a substitution series, the copper reference and the approved fits come
// from the server's demo seed (server/db/seed*.ts): invented and labelled synthetic, with one deliberate outlier.
const LEAD = "lead@example.org";

test("the demo lead compares the demo batches: θ_D by batch with error bars, weighted means, a flagged outlier and the collapse plot", async ({ page, demoPassword, pageErrors }) => {
  const failed: string[] = [];
  page.on("response", (r) => {
    if (r.status() >= 400) failed.push(`${r.status()} ${r.url()}`);
  });
  await signIn(page, LEAD, demoPassword);
  await page.getByRole("navigation", { name: "Lab sections" }).getByRole("link", { name: "Compare" }).click();
  await page.waitForURL(/\/labs\/[^/]+\/compare/);

  const groups = page.getByRole("table", { name: "θ_D per batch" });
  await groups.waitFor();
  // Three batches of the series (the reference piece may sit in a group of its own).
  expect(await groups.getByRole("row").count()).toBeGreaterThanOrEqual(1 + 3);
  // Every batch with σ shows a weighted mean as value(σ) with its unit.
  const means = await groups.locator("tbody tr td:nth-child(3)").allInnerTexts();
  expect(means.filter((m) => /\d\(\d+(\.\d+)?\)[\s\u00a0]K/.test(m)).length).toBeGreaterThanOrEqual(3);

  const rows = page.getByRole("table", { name: "θ_D of each approved fit" });
  expect(await rows.locator("tr[data-flagged]").count()).toBeGreaterThanOrEqual(1);
  await rows.getByText(/more than 3σ from/).first().waitFor();

  // The chart: one point per fit with its error bar, and the weighted means.
  const chart = page.getByTestId("parameter-chart");
  await chart.locator(".recharts-wrapper > svg").waitFor();
  expect(await chart.locator(".recharts-errorBar").count()).toBeGreaterThan(0);
  expect(await chart.locator(".recharts-scatter-symbol").count()).toBeGreaterThanOrEqual(6);

  // The collapse plot over the universal Debye curve.
  const collapse = page.getByTestId("collapse-chart");
  await collapse.locator(".recharts-wrapper > svg").waitFor();
  await collapse.locator(".recharts-line-curve").first().waitFor();
  expect(await collapse.locator(".recharts-scatter-symbol").count()).toBeGreaterThan(10);
  await page.getByTestId("ct3-chart").locator(".recharts-line-curve").first().waitFor();

  // Grouping along x works too, and the export link carries the same choice.
  await page.getByRole("radio", { name: "Composition x" }).click();
  await page.getByRole("table", { name: "θ_D per composition" }).waitFor({ timeout: 60_000 });
  expect(await page.getByRole("link", { name: "Export CSV" }).getAttribute("href")).toMatch(/compare\.csv\?parameter=thetaD&groupBy=x$/);
  // Before sign-in the app asks /api/me and gets 401: expected; anything else that failed is not.
  expect(failed.filter((f) => !/^401 .*\/api\/me$/.test(f))).toEqual([]);
  expect(pageErrors.filter((e) => !/401|Unauthorized/i.test(e))).toEqual([]);
});
