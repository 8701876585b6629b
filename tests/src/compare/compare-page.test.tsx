// @vitest-environment jsdom
import { afterEach, beforeAll, describe, expect, it } from "vitest";
import { cleanup, screen, waitFor, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import type { Role } from "@shared/schemas/auth";
import type { ComparisonResult } from "@shared/schemas/compare";
import { errorReply, reply, stubFetch, type StubHandler } from "../../helpers/fetch-stub";
import { meFixture, renderApp, TEST_LAB } from "../../helpers/render-app";

const PAGE = `/labs/${TEST_LAB.labId}/compare`;

const row = (over: Partial<ComparisonResult["rows"][number]>): ComparisonResult["rows"][number] => ({
  fitId: "f",
  runId: "r",
  runLabel: "run 1",
  sampleId: "s",
  sampleLabel: "S",
  batchId: "b-a",
  batchCode: "A-01",
  x: 0,
  xName: "x",
  model: "γT + Debye (3D)",
  modelKey: "debye3+electronic",
  windowMinK: 2,
  windowMaxK: 20,
  parameter: "thetaD",
  value: 300,
  unit: "K",
  sigmaStat: 0.8,
  sigmaSys: 0.6,
  sigmaTotal: 1,
  derivedFrom: null,
  groupKey: "batch:b-a",
  deviationSigma: 1.25,
  flagged: false,
  approvedAt: "2026-11-20T10:00:00.000Z",
  ...over,
});

/** A synthetic comparison: batch A-01 with a planted outlier A4, batch B-02 with two fits. */
const RESULT: ComparisonResult = {
  parameter: "thetaD",
  unit: "K",
  groupBy: "batch",
  thresholdSigma: 3,
  rows: [
    row({ fitId: "f1", sampleLabel: "A1", value: 300 }),
    row({ fitId: "f2", sampleLabel: "A2", value: 301, deviationSigma: 0.25 }),
    row({ fitId: "f3", sampleLabel: "A3", value: 299, deviationSigma: 2.25 }),
    row({ fitId: "f4", sampleLabel: "A4", value: 305, deviationSigma: 3.75, flagged: true }),
    row({ fitId: "f5", sampleLabel: "B1", value: 320, batchId: "b-b", batchCode: "B-02", groupKey: "batch:b-b", deviationSigma: 1 }),
    row({ fitId: "f6", sampleLabel: "B2", value: 322, batchId: "b-b", batchCode: "B-02", groupKey: "batch:b-b", deviationSigma: 1, windowMaxK: 35 }),
  ],
  groups: [
    { key: "batch:b-a", label: "A-01", batchId: "b-a", x: null, n: 4, nWeighted: 4, weightedMean: 301.25, weightedSigma: 0.5, reducedChiSquare: 6.9, unweightedMean: 301.25, spread: 2.63, standardError: 1.3, flaggedCount: 1, modelsDiffer: false, windowsDiffer: false },
    { key: "batch:b-b", label: "B-02", batchId: "b-b", x: null, n: 2, nWeighted: 2, weightedMean: 321, weightedSigma: 0.71, reducedChiSquare: 2, unweightedMean: 321, spread: 1.41, standardError: 1, flaggedCount: 0, modelsDiffer: false, windowsDiffer: true },
  ],
  notes: [{ groupKey: "batch:b-b", kind: "windows", message: "B-02: the fit windows differ (2.00–20.0 K; 2.00–35.0 K), so their values are not comparable as such." }],
  availableParameters: [
    { name: "gamma", unit: "J/(mol·K²)", fits: 6 },
    { name: "thetaD", unit: "K", fits: 6 },
  ],
};

const EMPTY: ComparisonResult = { ...RESULT, rows: [], groups: [], notes: [] };

function api(role: Role, extra: Record<string, StubHandler> = {}) {
  return stubFetch({
    "GET /api/setup": reply(200, { needsSetup: false, fakeMail: true }),
    "GET /api/me": reply(200, meFixture(role)),
    "GET /api/labs/:labId/batches": reply(200, [
      { id: "b-a", code: "A-01", synthesisDate: null, method: "", notes: "", sampleCount: 4, createdAt: "2026-11-01T00:00:00.000Z" },
      { id: "b-b", code: "B-02", synthesisDate: null, method: "", notes: "", sampleCount: 2, createdAt: "2026-11-01T00:00:00.000Z" },
    ]),
    "GET /api/labs/:labId/samples": reply(200, []),
    "GET /api/labs/:labId/comparisons": reply(200, [
      { id: "c-1", name: "Only batch B", selection: { batchIds: ["b-b"], sampleIds: [] }, parameter: "gamma", groupBy: "batch", createdByName: "Test lead", createdAt: "2026-11-21T00:00:00.000Z" },
    ]),
    "GET /api/labs/:labId/compare": reply(200, RESULT),
    "GET /api/labs/:labId/compare/curves": reply(200, [
      { fitId: "f1", runId: "r", label: "A1 · run 1", groupKey: "batch:b-a", atomsPerFormulaUnit: 54, thetaD: 300, gamma: 0.01, decimated: false, points: [{ t: 10, cp: 5 }] },
    ]),
    ...extra,
  });
}

/** The query strings of the compare reads made so far. */
function compareQueries(): URLSearchParams[] {
  return (fetch as unknown as { mock: { calls: [RequestInfo | URL][] } }).mock.calls
    .map(([input]) => new URL(String(input), "http://localhost"))
    .filter((u) => u.pathname.endsWith("/compare"))
    .map((u) => u.searchParams);
}

let stub: ReturnType<typeof stubFetch>;
// The page module and recharts take a few seconds to transform on first import; do it before the clock starts.
beforeAll(async () => {
  await import("@/app/routes/compare");
}, 60_000);
afterEach(() => {
  cleanup();
  stub.restore();
});

describe("compare page", () => {
  it("shows the weighted mean per batch, the flagged outlier, the note and the charts", async () => {
    stub = api("lead");
    renderApp(PAGE);
    const groups = await screen.findByRole("table", { name: "θ_D per batch" });
    const a = within(groups).getByRole("row", { name: /A-01/ });
    expect(within(a).getByText("301.25(50) K")).toBeTruthy();
    const rows = screen.getByRole("table", { name: "θ_D of each approved fit" });
    const a4 = within(rows).getByRole("row", { name: /A4/ });
    expect(a4.getAttribute("data-flagged")).toBe("true");
    expect(within(a4).getByText(/more than 3σ from A-01/)).toBeTruthy();
    expect(within(a4).getByText("3.75σ")).toBeTruthy();
    // Statistical σ with the value, systematic σ in its own column.
    expect(within(a4).getByText("305.00(80) K")).toBeTruthy();
    // Testing Library folds the no-break space before the unit into a plain space.
    expect(within(a4).getByText("0.6 K")).toBeTruthy();
    expect(screen.getByText(/the fit windows differ/)).toBeTruthy();
    expect(within(groups).getByText("not comparable as such")).toBeTruthy();
    expect(screen.getByTestId("parameter-chart")).toBeTruthy();
    expect(await screen.findByTestId("collapse-chart")).toBeTruthy();
    expect(screen.getByTestId("ct3-chart")).toBeTruthy();
    const csv = screen.getByRole("link", { name: "Export CSV" });
    expect(csv.getAttribute("href")).toBe(`/api/labs/${TEST_LAB.labId}/compare.csv?parameter=thetaD&groupBy=batch`);
    expect(screen.getByRole("form", { name: "Save this comparison" })).toBeTruthy();
  });

  it("asks again when a batch is ticked or a saved comparison is chosen", async () => {
    stub = api("researcher");
    const user = userEvent.setup();
    renderApp(PAGE);
    await screen.findByRole("table", { name: "θ_D per batch" });
    await user.click(screen.getByRole("checkbox", { name: /A-01/ }));
    await waitFor(() => expect(compareQueries().some((q) => q.get("batchIds") === "b-a")).toBe(true));
    await user.selectOptions(screen.getByRole("combobox", { name: "Start from a saved comparison" }), "c-1");
    await waitFor(() => expect(compareQueries().some((q) => q.get("batchIds") === "b-b" && q.get("parameter") === "gamma")).toBe(true));
  });

  it("saves the selection with the shared schema and shows a name clash from the server", async () => {
    stub = api("lead", { "POST /api/labs/:labId/comparisons": errorReply(409, "CONFLICT", "name taken") });
    const user = userEvent.setup();
    renderApp(PAGE);
    const form = await screen.findByRole("form", { name: "Save this comparison" });
    await user.click(within(form).getByRole("button", { name: "Save comparison" }));
    expect(await within(form).findByText("Name the comparison")).toBeTruthy();
    expect(stub.callsTo("POST /api/labs/:labId/comparisons")).toHaveLength(0);
    await user.type(within(form).getByLabelText("Save as"), "Batches A and B");
    await user.click(within(form).getByRole("button", { name: "Save comparison" }));
    expect(await within(form).findByText(/already has that name/)).toBeTruthy();
    expect(stub.callsTo("POST /api/labs/:labId/comparisons")[0].body).toEqual({
      name: "Batches A and B",
      selection: { batchIds: [], sampleIds: [] },
      parameter: "thetaD",
      groupBy: "batch",
    });
  });

  it("gives a guest the table but no save form", async () => {
    stub = api("guest");
    renderApp(PAGE);
    await screen.findByRole("table", { name: "θ_D per batch" });
    expect(screen.queryByRole("form", { name: "Save this comparison" })).toBeNull();
  });

  it("says what to do when there is nothing approved yet", async () => {
    stub = api("researcher", { "GET /api/labs/:labId/compare": reply(200, EMPTY) });
    renderApp(PAGE);
    expect(await screen.findByText(/No approved fits with θ_D/)).toBeTruthy();
    expect(screen.getByText(/ask the lab lead to approve the fits/)).toBeTruthy();
    expect(screen.queryByRole("link", { name: "Export CSV" })).toBeNull();
  });

  it("shows a failed read inline with a retry", async () => {
    stub = api("lead", { "GET /api/labs/:labId/compare": errorReply(404, "NOT_FOUND", "No such batch in this lab: b-x") });
    renderApp(PAGE);
    expect(await screen.findByText("No such batch in this lab: b-x")).toBeTruthy();
    expect(screen.getByRole("button", { name: "Try again" })).toBeTruthy();
  });
});
