import { expect } from "vitest";
import { signIn, test } from "./browser";

// The demo lab, the sample SIG-B1-a of the invented Sc2Ir3Sn4 series and its run come from the server's demo
// seed (server/db/seed*.ts): invented and labelled synthetic. The seed also approved one fit of the run.
const RESEARCHER = "researcher@example.org";
const LEAD = "lead@example.org";
const NOTE = "browser story: window 2-100 K, γT + Debye + Einstein, atoms constrained";

let fitPage = "";

test("the demo researcher sets a window, composes a model, fits, ranks, reads θ_D(T) and the entropy table, and saves a draft", async ({ page, demoPassword, pageErrors }) => {
  await signIn(page, RESEARCHER, demoPassword);
  await page.getByRole("table", { name: "Samples of the lab" }).getByRole("link", { name: "SIG-B1-a" }).click();
  await page.waitForURL(/\/samples\/[^/]+$/);
  await page.getByRole("link", { name: "Zero-field scan 1.9-300 K" }).first().click();
  await page.waitForURL(/\/runs\/[^/]+$/);
  await page.getByRole("link", { name: "Fit a model" }).click();
  await page.waitForURL(/\/runs\/[^/]+\/fit$/);
  fitPage = new URL(page.url()).pathname;
  await page.getByRole("heading", { level: 1, name: /Fit · SIG-B1-a/ }).waitFor();

  // The window: drag its upper edge with the mouse towards low T, then set both ends exactly by keyboard.
  const end = page.getByRole("slider", { name: "Window end (K)" });
  await end.waitFor();
  const before = Number(await end.getAttribute("aria-valuenow"));
  const box = (await end.locator("rect").first().boundingBox())!;
  await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
  await page.mouse.down();
  await page.mouse.move(box.x - 250, box.y + box.height / 2, { steps: 8 });
  await page.mouse.up();
  await expect.poll(async () => Number(await page.getByRole("textbox", { name: "to" }).inputValue())).toBeLessThan(before - 50);
  const from = page.getByRole("textbox", { name: "Window from" });
  await from.fill("2");
  await from.press("Enter");
  const to = page.getByRole("textbox", { name: "to" });
  await to.fill("100");
  await to.press("Enter");
  await expect.poll(() => end.getAttribute("aria-valuenow")).toBe("100");

  // Compose: γT + Debye is the starting model; add an Einstein mode (the rattling atom of this invented
  // compound), let the oscillator atoms add up to n = 9, and fix n_E at 1 from a start value.
  await page.getByRole("button", { name: "+ Add a term" }).click();
  await page.getByRole("button", { name: /^Einstein mode/ }).click();
  await page.getByRole("listitem", { name: "Einstein mode" }).waitFor();
  await page.getByRole("checkbox", { name: /Oscillator atoms add up to n = 9/ }).check();
  expect(await page.locator('tr[data-parameter="nD"]').count()).toBe(0);
  const nE = page.getByRole("textbox", { name: "n_E start value" });
  await nE.fill("1");
  await nE.press("Enter");
  await page.locator('tr[data-parameter="nE"]').getByRole("checkbox", { name: /fixed/ }).check();
  await page.getByRole("textbox", { name: "n_E value" }).waitFor();

  // Fit: the result with uncertainties, the residual plot and the curve over the data.
  await page.getByRole("button", { name: "Fit", exact: true }).click();
  const params = page.getByRole("table", { name: "Fitted parameters" });
  await params.waitFor();
  // γ, θ_D, θ_E, n_E (n_D follows from the constraint).
  expect(await params.locator("tr[data-parameter]").count()).toBe(4);
  expect(await params.locator('tr[data-parameter="thetaD"]').innerText()).toMatch(/\d\(\d+(\.\d+)?\)[\s\u00a0]K/);
  expect(await params.locator('tr[data-parameter="thetaE"]').innerText()).toMatch(/\d\(\d+(\.\d+)?\)[\s\u00a0]K/);
  await page.getByTestId("residual-plot").locator(".recharts-scatter-symbol").first().waitFor();
  await page.getByTestId("fit-chart").locator(".recharts-line-curve").first().waitFor();
  await page.getByRole("table", { name: "Correlation matrix of the free parameters" }).waitFor();
  // The two other views of the same fit.
  await page.getByRole("button", { name: "C/T against T²" }).click();
  await page.getByText("T² (K²)").waitFor();
  await page.getByRole("button", { name: "C/(3nR) against T" }).click();
  await page.getByText("Dulong–Petit 3nR").waitFor();

  // Rank the default candidates: progress while it runs, then the table ordered by BIC.
  await page.getByRole("button", { name: "Rank candidate models" }).click();
  const ranking = page.getByRole("table", { name: "Candidate models ordered by BIC" });
  await ranking.waitFor({ timeout: 120_000 });
  expect(await ranking.locator("tbody tr").count()).toBe(4);
  // Ranked (converged) candidates come first, by BIC; any that did not converge follow, unranked.
  const rows = await ranking.locator("tbody tr").evaluateAll((trs) =>
    trs.map((tr) => ({ rank: tr.children[0].textContent ?? "", bic: Number(tr.children[2].textContent), notes: tr.children[6].textContent ?? "" })),
  );
  const ranked = rows.filter((r) => r.rank !== "—");
  expect(ranked.length).toBeGreaterThanOrEqual(2);
  expect(ranked.map((r) => r.bic)).toEqual(ranked.map((r) => r.bic).sort((a, b) => a - b));
  expect(rows.slice(0, ranked.length)).toEqual(ranked);
  // An unranked candidate says why (not converged, or the engine's refusal).
  for (const r of rows.slice(ranked.length)) expect(r.notes.trim()).not.toBe("");

  // θ_D(T) and the entropy table of the run (against its approved fit).
  await page.getByRole("tab", { name: "θ_D(T)" }).click();
  await page.getByTestId("theta-d-chart").locator(".recharts-scatter-symbol").first().waitFor();
  await page.getByText(/fitted θ_D = \d+/).waitFor();
  await page.getByRole("tab", { name: "Entropy and enthalpy" }).click();
  const thermo = page.getByRole("table", { name: "Thermodynamic functions" });
  await thermo.getByRole("cell", { name: "298.15", exact: true }).waitFor();
  expect(await page.getByRole("link", { name: "Download CSV" }).getAttribute("href")).toMatch(/\/thermo\.csv/);

  // Save the draft with a note; it appears in the history.
  await page.getByRole("textbox", { name: /Note for the saved fit/ }).fill(NOTE);
  await page.getByRole("button", { name: "Save draft" }).click();
  await page.getByText(/Saved as a draft\. A lead approves/).waitFor();
  const history = page.getByRole("list", { name: "Fits of this run, newest first" });
  const newest = history.getByRole("listitem").first();
  await newest.getByText(NOTE, { exact: false }).waitFor();
  expect(await newest.getByText("draft", { exact: true }).count()).toBe(1);
  expect(await history.getByRole("button", { name: "Approve" }).count()).toBe(0);
  // The sign-in page asks /api/me before anyone is signed in; that 401 is the expected answer, not an error.
  expect(pageErrors.filter((e) => !/401|Unauthorized/i.test(e))).toEqual([]);
}, 300_000); // a long story of a dozen fits; a loaded 2-core machine needs minutes

test("the demo lead approves the researcher's draft; the fit approved before it becomes superseded", async ({ page, demoPassword, pageErrors }) => {
  expect(fitPage).not.toBe("");
  await signIn(page, LEAD, demoPassword);
  await page.goto(fitPage);
  const history = page.getByRole("list", { name: "Fits of this run, newest first" });
  await history.waitFor();
  const draft = history.getByRole("listitem").filter({ hasText: NOTE });
  await draft.getByRole("button", { name: "Approve" }).click();
  await page.getByText(/Approved\. Comparison and bundles now quote this fit/).waitFor();
  await draft.getByText("approved", { exact: true }).waitFor();
  await draft.getByText(/approved by Dr\. Ilse Marrow/).waitFor();
  // The seed's fit of this run was the approved one; it is now superseded, still listed, not approvable.
  const seeded = history.getByRole("listitem").filter({ hasText: "Demo fit made by the seed" });
  await seeded.getByText("superseded", { exact: true }).waitFor();
  expect(await seeded.getByRole("button", { name: "Approve" }).count()).toBe(0);
  expect(pageErrors.filter((e) => !/401|Unauthorized/i.test(e))).toEqual([]);
});
