import path from "node:path";
import { fileURLToPath } from "node:url";
import { expect } from "vitest";
import { signIn, test } from "./browser";

// The demo lab and its samples come from the server's demo seed (server/db/seed-demo-runs.ts): invented, labelled
// synthetic. The upload is the copper fixture of the reader's tests (fixtures/ingest/copper, synthetic too).
const RESEARCHER = "researcher@example.org";
const FILE = fileURLToPath(new URL("../../fixtures/ingest/copper/export-j-per-g-k.dat", import.meta.url));

test("the demo researcher uploads a calorimeter export through the dialog, maps its columns, commits and sees the curve", async ({ page, demoPassword, pageErrors }) => {
  await signIn(page, RESEARCHER, demoPassword);
  await page.getByRole("table", { name: "Samples of the lab" }).getByRole("link", { name: "CU-REF-1 copper reference" }).click();
  await page.waitForURL(/\/samples\/[^/]+$/);
  await page.getByRole("heading", { level: 1, name: "CU-REF-1 copper reference" }).waitFor();

  await page.getByRole("button", { name: "Upload a run" }).click();
  const dialog = page.getByRole("dialog", { name: /Upload a run of CU-REF-1/ });
  await dialog.getByLabel("Export file").setInputFiles(FILE);
  // Upload progress, then the first rows with one control per column.
  const rows = dialog.getByRole("table", { name: /First rows of the file/ });
  await rows.waitFor();
  expect(await rows.locator("tbody tr").count()).toBeGreaterThan(3);

  // Map the columns and units by hand, as for an export the proposal cannot read.
  await dialog.getByLabel("Use of column T (K)").selectOption("temperature");
  await dialog.getByLabel("Use of column c (J/(g K))").selectOption("heatCapacity");
  await dialog.getByLabel("Use of column sigma (J/(g K))").selectOption("sigma");
  await dialog.getByLabel("Temperature unit").selectOption("K");
  await dialog.getByLabel("Heat-capacity unit").selectOption("J/(g*K)");
  await dialog.getByLabel(/Run label/).fill("Reference check, browser upload");

  // The live preview of the reduced curve.
  await dialog.locator("figure .recharts-wrapper svg .recharts-scatter-symbol").first().waitFor();
  await dialog.getByText("Reduced curve (120 points)").waitFor();

  await dialog.getByRole("button", { name: /^Commit/ }).click();
  await dialog.getByText("Run stored").waitFor();
  await dialog.getByRole("link", { name: "Reference check, browser upload" }).click();
  await page.waitForURL(/\/runs\/[^/]+$/);
  await page.getByRole("heading", { level: 1, name: "Reference check, browser upload" }).waitFor();

  // The curve, and the Dulong–Petit view with its line at 1.
  const charts = page.locator(".recharts-wrapper");
  await charts.first().waitFor();
  expect(await page.locator(".recharts-scatter-symbol").count()).toBeGreaterThan(100);
  await page.getByText("Dulong–Petit limit 3nR", { exact: true }).waitFor();
  expect(await page.getByRole("table", { name: /Reduced points of the run/ }).locator("tbody tr").count()).toBe(100);
  expect(path.basename(FILE)).toBe(await page.getByText("export-j-per-g-k.dat", { exact: true }).innerText());
  // The sign-in page asks /api/me before anyone is signed in; that 401 is the expected answer, not an error.
  expect(pageErrors.filter((e) => !/401|Unauthorized/i.test(e))).toEqual([]);
});
