// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from "vitest";
import { cleanup, screen, waitFor, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import type { RunDetail } from "@shared/schemas/runs";
import { decimateForDisplay, plotPoints } from "@/features/runs/utils";
import { reply, stubFetch } from "../../helpers/fetch-stub";
import { meFixture, renderApp, TEST_LAB } from "../../helpers/render-app";
import { expectClose } from "../../helpers/expect-close";

/** A synthetic run: 150 points, C = T³ µ-ish numbers, point 3 masked. */
function runFixture(n = 150): RunDetail {
  return {
    id: "r1",
    kind: "sample",
    sampleId: "s1",
    platform: "",
    label: "Zero-field scan",
    fileName: "scan.csv",
    fileSha256: "b".repeat(64),
    fieldT: null,
    addendaRunId: null,
    pointCount: n,
    maskedCount: 1,
    tMinK: 2,
    tMaxK: 2 + n - 1,
    warnings: [],
    notes: "",
    createdAt: "2026-12-01T10:00:00.000Z",
    createdByName: "Test researcher",
    mapping: { columns: { temperature: "T (K)", heatCapacity: "C (J/K)" }, units: { temperature: "K", heatCapacity: "J/K" } },
    massMg: 10,
    molarMassGPerMol: 63.546,
    atomsPerFormulaUnit: 2,
    cpUnit: "J/(mol*K)",
    sample: { id: "s1", label: "T-1", formula: "CuZn" },
    addendaRun: null,
    siblings: [],
    points: Array.from({ length: n }, (_, i) => ({
      index: i,
      temperatureK: 2 + i,
      cp: 1e-3 * (2 + i) ** 2,
      cpSigma: 1e-5,
      cpPerAtom: (1e-3 * (2 + i) ** 2) / 2,
      fieldT: null,
      rowsAveraged: 1,
      sourceLine: 9 + i,
      masked: i === 3,
    })),
  };
}

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

describe("run page", { timeout: 60_000 }, () => {
  it("lists the points 100 to a page with their mask flags, and offers both downloads", async () => {
    stubFetch({ "GET /api/me": reply(200, meFixture("guest")), "GET /api/labs/:labId/runs/:runId": reply(200, runFixture()) });
    renderApp(`/labs/${TEST_LAB.labId}/runs/r1`);
    // The first visit imports the lazy route module (recharts and all): on a loaded machine that takes a while.
    expect(await screen.findByRole("heading", { name: "Zero-field scan" }, { timeout: 30_000 })).toBeTruthy();
    const table = screen.getByRole("table", { name: /Reduced points of the run/ });
    expect(within(table).getAllByRole("row")).toHaveLength(101);
    const masked = within(table).getByRole("checkbox", { name: "Mask point 3 at 5 K" }) as HTMLInputElement;
    expect(masked.checked).toBe(true);
    // A guest sees the flags but cannot change them.
    expect(masked.disabled).toBe(true);
    expect(screen.getByRole("link", { name: "Raw file" }).getAttribute("href")).toBe(`/api/labs/${TEST_LAB.labId}/runs/r1/raw`);
    expect(screen.getByRole("link", { name: "Reduced CSV" }).getAttribute("href")).toBe(`/api/labs/${TEST_LAB.labId}/runs/r1/reduced.csv`);
    await userEvent.click(screen.getByRole("button", { name: "Next" }));
    expect(within(screen.getByRole("table", { name: /Reduced points/ })).getAllByRole("row")).toHaveLength(51);
  });

  it("masks a point from the keyboard (Space on its checkbox) and sends its index", async () => {
    const stub = stubFetch({
      "GET /api/me": reply(200, meFixture("researcher")),
      "GET /api/labs/:labId/runs/:runId": reply(200, runFixture()),
      "PATCH /api/labs/:labId/runs/:runId/mask": reply(200, { runId: "r1", maskedCount: 2, changed: 1 }),
      "GET /api/labs/:labId/samples": reply(200, []),
    });
    renderApp(`/labs/${TEST_LAB.labId}/runs/r1`);
    const box = (await screen.findByRole("checkbox", { name: "Mask point 7 at 9 K" }, { timeout: 30_000 })) as HTMLInputElement;
    box.focus();
    await userEvent.keyboard(" ");
    await waitFor(() => expect(stub.calls.filter((c) => c.method === "PATCH")).toHaveLength(1));
    expect(stub.calls.find((c) => c.method === "PATCH")!.body).toEqual({ indices: [7], masked: true });
  });

  it("masks every point in a temperature range at once", async () => {
    const stub = stubFetch({
      "GET /api/me": reply(200, meFixture("lead")),
      "GET /api/labs/:labId/runs/:runId": reply(200, runFixture()),
      "PATCH /api/labs/:labId/runs/:runId/mask": reply(200, { runId: "r1", maskedCount: 4, changed: 3 }),
    });
    renderApp(`/labs/${TEST_LAB.labId}/runs/r1`);
    await userEvent.type(await screen.findByRole("textbox", { name: "From T (K)" }, { timeout: 30_000 }), "10");
    await userEvent.type(screen.getByRole("textbox", { name: "to T (K)" }), "12");
    await userEvent.click(screen.getByRole("button", { name: "Mask 3 in range" }));
    await waitFor(() => expect(stub.calls.filter((c) => c.method === "PATCH")).toHaveLength(1));
    expect(stub.calls.find((c) => c.method === "PATCH")!.body).toEqual({ indices: [8, 9, 10], masked: true });
  });
});

describe("display helpers", () => {
  it("thins above the display limit but keeps the ends and every masked point", () => {
    const pts = Array.from({ length: 5000 }, (_, i) => ({ i, masked: i === 4321 }));
    const shown = decimateForDisplay(pts, 2000);
    expect(shown.length).toBeLessThanOrEqual(2002);
    expect(shown.length).toBeGreaterThan(1500);
    expect(shown[0].i).toBe(0);
    expect(shown.at(-1)!.i).toBe(4999);
    expect(shown.some((p) => p.i === 4321)).toBe(true);
    expect(decimateForDisplay(pts.slice(0, 10), 2000)).toHaveLength(10);
  });

  it("draws C/T against T² and C/(3nR) from their definitions", () => {
    const run = runFixture(3);
    const p = run.points[1]; // T = 3 K, C = 9e-3 J/(mol·K), σ = 1e-5
    const ct = plotPoints(run.points, "ct", 2)[1];
    expect(ct.x).toBe(9);
    expectClose(ct.y, 3e-3, { rel: 1e-14 }, "C/T");
    expectClose(ct.err!, 1e-5 / 3, { rel: 1e-14 }, "σ/T");
    // 3nR with n = 2 and R = 8.314462618 J/(mol·K) (CODATA 2018).
    const reduced = plotPoints(run.points, "reduced", 2)[1];
    expectClose(reduced.y, p.cp / (6 * 8.314462618), { rel: 1e-14 }, "C/(3nR)");
  });
});
