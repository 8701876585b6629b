// @vitest-environment jsdom
import { afterEach, beforeAll, describe, expect, it } from "vitest";
import { cleanup, screen, waitFor, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import type { Role } from "@shared/schemas/auth";
import type { Fit, FitOutcome } from "@shared/schemas/fits";
import type { RunDetail } from "@shared/schemas/runs";
import { reply, stubFetch, type StubHandler } from "../../helpers/fetch-stub";
import { meFixture, renderApp, TEST_LAB } from "../../helpers/render-app";

/*
 * The fit workspace page with a stubbed API: compose, fit, read the result, save a draft; leads approve.
 * The run and the fit numbers are synthetic fixtures (not measurements).
 */

const RUN_ID = "run-1";
const PAGE = `/labs/${TEST_LAB.labId}/runs/${RUN_ID}/fit`;

const temps = Array.from({ length: 40 }, (_, i) => 2 * 1.13 ** i);
const RUN: RunDetail = {
  id: RUN_ID,
  kind: "sample",
  sampleId: "s-1",
  platform: "",
  label: "Zero-field scan (synthetic)",
  fileName: "synthetic.csv",
  fileSha256: "a".repeat(64),
  fieldT: null,
  addendaRunId: null,
  pointCount: temps.length,
  maskedCount: 1,
  tMinK: temps[0],
  tMaxK: temps[temps.length - 1],
  warnings: [],
  notes: "",
  createdAt: "2026-11-20T10:00:00.000Z",
  createdByName: "Test researcher",
  mapping: { columns: { temperature: "T", heatCapacity: "C" }, units: { temperature: "K", heatCapacity: "J/(mol*K)" } },
  massMg: 10,
  molarMassGPerMol: 63.546,
  atomsPerFormulaUnit: 1,
  cpUnit: "J/(mol*K)",
  sample: { id: "s-1", label: "CU-TEST", formula: "Cu" },
  addendaRun: null,
  siblings: [],
  points: temps.map((T, index) => ({
    index,
    temperatureK: T,
    cp: 0.0007 * T + 4.8e-5 * T ** 3,
    cpSigma: 0.01 * (0.0007 * T + 4.8e-5 * T ** 3),
    cpPerAtom: 0.0007 * T + 4.8e-5 * T ** 3,
    fieldT: null,
    rowsAveraged: 1,
    sourceLine: index + 5,
    masked: index === 3,
  })),
};

const OUTCOME: FitOutcome = {
  model: { components: [{ kind: "electronic" }, { kind: "debye", dimension: 3 }] },
  window: [RUN.tMinK, RUN.tMaxK],
  pointsUsed: 39,
  maskedExcluded: 1,
  converged: true,
  stopReason: "chi-square-stationary",
  iterations: 7,
  chiSquare: 35.1,
  reducedChiSquare: 0.975,
  dof: 36,
  aic: 41.1,
  bic: 46.2,
  parameters: [
    { name: "gamma", value: 0.000695, stderr: 0.000012, stderrUnscaled: 0.000012, stderrMass: 0.000003, unit: "J/(mol·K²)", fixed: false },
    { name: "thetaD", value: 342.83, stderr: 1.21, stderrUnscaled: 1.2, stderrMass: 0.4, unit: "K", fixed: false },
    { name: "nD", value: 1, stderr: null, stderrUnscaled: null, stderrMass: null, unit: "1", fixed: true },
  ],
  freeParameters: ["gamma", "thetaD"],
  covariance: [
    [1.44e-10, -1.1e-5],
    [-1.1e-5, 1.46],
  ],
  correlation: [
    [1, -0.962],
    [-0.962, 1],
  ],
  warnings: ["gamma and thetaD are strongly correlated (r = -0.962); each is poorly determined on its own even if their combination is well fixed."],
  weighting: "stated σ of each point",
  atomsPerFormulaUnit: 1,
  inputSha256: "b".repeat(64),
  rawFileSha256: "a".repeat(64),
  softwareVersion: "0.1.0",
  residuals: [{ temperatureK: 2, normalized: 0.5 }],
  curve: [{ temperatureK: 2, total: 0.0018, parts: { Electronic: 0.0014, Debye: 0.0004 } }],
  elapsedMs: 3.2,
};

const person = (role: string) => ({ id: `u-${role}`, displayName: `Test ${role}` });
const storedFit = (over: Partial<Fit> = {}): Fit => ({
  ...OUTCOME,
  id: "fit-1",
  labId: TEST_LAB.labId,
  runId: RUN_ID,
  state: "draft",
  notes: "",
  createdBy: person("researcher"),
  createdAt: "2026-11-21T09:00:00.000Z",
  approvedBy: null,
  approvedAt: null,
  supersededBy: null,
  supersededAt: null,
  maskedPointIndices: [3],
  ...over,
});
const summary = (f: Fit) => {
  const { residuals: _r, curve: _c, covariance: _v, ...rest } = f;
  return rest;
};

function api(role: Role, history: Fit[] = [], extra: Record<string, StubHandler> = {}) {
  return stubFetch({
    "GET /api/setup": reply(200, { needsSetup: false, fakeMail: true }),
    "GET /api/me": reply(200, meFixture(role)),
    "GET /api/labs/:labId/runs/:runId": reply(200, RUN),
    "GET /api/labs/:labId/runs/:runId/fits": reply(200, history.map(summary)),
    "POST /api/labs/:labId/runs/:runId/fits/preview": reply(200, OUTCOME),
    "POST /api/labs/:labId/runs/:runId/fits": (call) => reply(201, storedFit({ notes: (call.body as { notes?: string }).notes ?? "" })),
    "POST /api/labs/:labId/fits/:fitId/approve": reply(200, storedFit({ state: "approved", approvedBy: person("lead"), approvedAt: "2026-11-22T09:00:00.000Z" })),
    ...extra,
  });
}

let stub: ReturnType<typeof stubFetch>;
beforeAll(async () => {
  await import("@/app/routes/fit-workspace");
}, 60_000);
afterEach(() => {
  cleanup();
  stub.restore();
});

describe("fit workspace page", () => {
  it("a researcher sets the window, fits, reads values with uncertainties and warnings, and saves a draft", async () => {
    const user = userEvent.setup();
    stub = api("researcher");
    renderApp(PAGE);
    await screen.findByRole("heading", { level: 1, name: /Fit · CU-TEST — Zero-field scan/ });
    expect(screen.getByText("No fit yet")).toBeTruthy();
    expect(screen.getByText(/39 points in the window · 3 free parameters/)).toBeTruthy();

    // Let the page's own reads settle (the history answers) before typing, so no re-render races the keys.
    await screen.findByText("No fits saved yet");
    const from = screen.getByRole("textbox", { name: "Window from" }) as HTMLInputElement;
    await user.tripleClick(from);
    await user.keyboard("3{Enter}");
    expect(from.value).toBe("3");
    await user.click(screen.getByRole("button", { name: "Fit" }));
    await screen.findByRole("table", { name: "Fitted parameters" });
    const [preview] = stub.callsTo("POST /api/labs/:labId/runs/:runId/fits/preview");
    expect(preview.body, JSON.stringify(preview.body)).toEqual({ model: { components: [{ kind: "electronic" }, { kind: "debye", dimension: 3 }] }, window: [3, RUN.tMaxK] });

    const table = screen.getByRole("table", { name: "Fitted parameters" });
    const theta = within(table).getByRole("row", { name: /θ_D/ });
    // Statistical uncertainty with the value, the mass systematic in its own column.
    // (Testing Library folds the no-break space before the unit into a plain space.)
    expect(within(theta).getByText("342.8(1.2) K")).toBeTruthy();
    const [, massCell] = within(theta).getAllByRole("cell");
    expect(massCell.textContent).toBe("± 0.4");
    expect(within(table).getByRole("row", { name: /n_D/ }).textContent).toMatch(/fixed/);
    expect(screen.getByText(/strongly correlated \(r = -0.962\)/)).toBeTruthy();
    const matrix = screen.getByRole("table", { name: "Correlation matrix of the free parameters" });
    expect(within(matrix).getAllByText("-0.962")).toHaveLength(2);
    expect(screen.getByText("Preview — not saved")).toBeTruthy();

    await user.type(screen.getByRole("textbox", { name: /Note for the saved fit/ }), "window from 3 K");
    await user.click(screen.getByRole("button", { name: "Save draft" }));
    await screen.findByText(/A lead approves drafts before they are quoted/);
    const [save] = stub.callsTo("POST /api/labs/:labId/runs/:runId/fits");
    expect(save.body).toMatchObject({ window: [3, RUN.tMaxK], notes: "window from 3 K" });
    expect(screen.queryByRole("button", { name: "Approve" })).toBeNull();
  }, 60_000);

  it("a lead sees the history with state badges and approves a draft", async () => {
    const user = userEvent.setup();
    stub = api("lead", [storedFit(), storedFit({ id: "fit-0", state: "superseded", supersededAt: "2026-11-21T08:00:00.000Z", supersededBy: "fit-x" })]);
    renderApp(PAGE);
    const history = await screen.findByRole("list", { name: "Fits of this run, newest first" });
    const items = within(history).getAllByRole("listitem");
    expect(within(items[0]).getByText("draft")).toBeTruthy();
    expect(within(items[1]).getByText("superseded")).toBeTruthy();
    expect(within(items[1]).queryByRole("button", { name: "Approve" })).toBeNull();
    await user.click(within(items[0]).getByRole("button", { name: "Approve" }));
    await waitFor(() => expect(stub.callsTo("POST /api/labs/:labId/fits/:fitId/approve")).toHaveLength(1));
    expect(stub.callsTo("POST /api/labs/:labId/fits/:fitId/approve")[0].params.fitId).toBe("fit-1");
    await screen.findByText(/Approved\. Comparison and bundles now quote this fit/);
  });

  it("a guest reads but has no Fit, Save or Rank", async () => {
    stub = api("guest");
    renderApp(PAGE);
    await screen.findByText(/fitting and saving need the researcher or lead role/);
    expect(screen.queryByRole("button", { name: "Fit" })).toBeNull();
    expect(screen.queryByRole("button", { name: "Save draft" })).toBeNull();
  });

  it("shows the server's refusal in plain words and keeps the model as it was", async () => {
    const user = userEvent.setup();
    stub = api("researcher", [], {
      "POST /api/labs/:labId/runs/:runId/fits/preview": reply(422, {
        error: { code: "UNPROCESSABLE", message: "The model has 3 free parameter(s) but only 2 unmasked point(s) lie in the window" },
      }),
    });
    renderApp(PAGE);
    await user.click(await screen.findByRole("button", { name: "Fit" }));
    await screen.findByText(/only 2 unmasked point\(s\) lie in the window/);
    expect(screen.getByText("No fit yet")).toBeTruthy();
  });
});
