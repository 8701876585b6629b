// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from "vitest";
import { cleanup, screen, waitFor, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import type { Role } from "@shared/schemas/auth";
import type { Batch, Sample } from "@shared/schemas/samples";
import { errorReply, reply, stubFetch, type StubHandler } from "../../helpers/fetch-stub";
import { meFixture, renderApp, TEST_LAB } from "../../helpers/render-app";

const PAGE = `/labs/${TEST_LAB.labId}/samples`;
const API = `/api/labs/:labId`;

const batch: Batch = { id: "b1", code: "SIG-B1", synthesisDate: "2026-08-18", method: "arc melting", notes: "", sampleCount: 1, createdAt: "2026-11-01T10:00:00.000Z" };
const sample = (over: Partial<Sample> = {}): Sample => ({
  id: "s1",
  label: "SIG-B1-a",
  batchId: "b1",
  batchCode: "SIG-B1",
  formula: "Sc2Ir3Sn4",
  molarMassGPerMol: 1141.35,
  molarMassOverrideReason: null,
  atomsPerFormulaUnit: 9,
  atomsOverrideReason: null,
  massMg: 12.48,
  massSigmaMg: 0.01,
  compositionX: 0,
  compositionName: "x (Ge)",
  notes: "SYNTHETIC test sample",
  runCount: 2,
  createdAt: "2026-11-01T10:00:00.000Z",
  updatedAt: "2026-11-01T10:00:00.000Z",
  ...over,
});

function setup(role: Role, samples: Sample[], extra: Record<string, StubHandler> = {}) {
  return stubFetch({
    "GET /api/me": reply(200, meFixture(role)),
    [`GET ${API}/samples`]: reply(200, samples),
    [`GET ${API}/batches`]: reply(200, [batch]),
    [`GET ${API}/addenda-runs`]: reply(200, []),
    ...extra,
  });
}

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

describe("samples page", { timeout: 60_000 }, () => {
  it("lists the lab's samples with a link to each", async () => {
    setup("guest", [sample(), sample({ id: "s2", label: "SIG-B1-b", runCount: 0 })]);
    renderApp(PAGE);
    // The first visit imports the lazy route module: on a loaded machine that takes a while.
    const table = await screen.findByRole("table", { name: "Samples of the lab" }, { timeout: 30_000 });
    expect(within(table).getByRole("link", { name: "SIG-B1-a" })).toHaveProperty("href", expect.stringContaining(`${PAGE}/s1`));
    expect(within(table).getAllByRole("row")).toHaveLength(3);
    // A guest gets no create buttons.
    expect(screen.queryByRole("button", { name: "New sample" })).toBeNull();
  });

  it("says what to do next when the lab has no samples", async () => {
    setup("researcher", []);
    renderApp(PAGE);
    expect(await screen.findByText("No samples in this lab yet", {}, { timeout: 30_000 })).toBeTruthy();
    expect(screen.getByRole("button", { name: "add a sample" })).toBeTruthy();
  });

  it("sends the search and batch filter to the server", async () => {
    setup("guest", [sample()]);
    renderApp(PAGE);
    await screen.findByRole("table", { name: "Samples of the lab" }, { timeout: 30_000 });
    await userEvent.selectOptions(screen.getByRole("combobox", { name: "Batch" }), "b1");
    await userEvent.type(screen.getByRole("searchbox", { name: "Search" }), "Ge");
    await waitFor(() => {
      const urls = (globalThis.fetch as unknown as { mock: { calls: [string][] } }).mock.calls.map((c) => String(c[0]));
      expect(urls.some((u) => u.includes("batchId=b1") && u.includes("q=Ge"))).toBe(true);
    });
  });
});

describe("new sample form", { timeout: 60_000 }, () => {
  it("shows the shared schema's field errors without calling the server", async () => {
    const stub = setup("researcher", [sample()]);
    renderApp(PAGE);
    await userEvent.click(await screen.findByRole("button", { name: "New sample" }, { timeout: 30_000 }));
    const form = screen.getByRole("form", { name: "New sample" });
    await userEvent.click(within(form).getByRole("button", { name: "Add sample" }));
    expect(await within(form).findByText("Enter a label")).toBeTruthy();
    expect(within(form).getByText("Enter a formula")).toBeTruthy();
    expect(within(form).getByText("Mass must be a number")).toBeTruthy();
    await userEvent.type(within(form).getByLabelText("Label"), "S-new");
    await userEvent.type(within(form).getByLabelText("Formula"), "Xx2");
    await userEvent.type(within(form).getByLabelText("Mass (mg)"), "0");
    await userEvent.click(within(form).getByRole("button", { name: "Add sample" }));
    expect(await within(form).findByText(/unknown element Xx/)).toBeTruthy();
    expect(within(form).getByText("The mass must be above 0 mg")).toBeTruthy();
    expect(stub.calls.filter((c) => c.method === "POST")).toHaveLength(0);
  });

  it("shows molar mass and atom count from the formula as it is typed, and asks for a reason when they are overridden", async () => {
    const stub = setup("researcher", [sample()]);
    renderApp(PAGE);
    await userEvent.click(await screen.findByRole("button", { name: "New sample" }, { timeout: 30_000 }));
    const form = screen.getByRole("form", { name: "New sample" });
    await userEvent.type(within(form).getByLabelText("Formula"), "Al2O3");
    // Al2O3: 101.961 g/mol, 5 atoms (IUPAC standard atomic weights, abridged).
    expect(await within(form).findByText("M = 101.961 g/mol")).toBeTruthy();
    expect(within(form).getByText("n = 5")).toBeTruthy();
    await userEvent.type(within(form).getByLabelText("Label"), "Sapphire chip");
    await userEvent.type(within(form).getByLabelText("Mass (mg)"), "4,25");
    await userEvent.click(within(form).getByRole("checkbox", { name: /Override the molar mass/ }));
    await userEvent.type(within(form).getByLabelText("Molar mass (g/mol)"), "102.5");
    await userEvent.click(within(form).getByRole("button", { name: "Add sample" }));
    expect(await within(form).findByText("Say why the molar mass differs from the formula")).toBeTruthy();
    expect(stub.calls.filter((c) => c.method === "POST")).toHaveLength(0);
  });

  it("posts a valid sample (decimal comma read as a point) and shows a server refusal beside its field", async () => {
    const stub = setup("researcher", [sample()], {
      [`POST ${API}/samples`]: errorReply(404, "NOT_FOUND", "No such batch in this lab", [{ path: "batchId", message: "no such batch" }]),
    });
    renderApp(PAGE);
    await userEvent.click(await screen.findByRole("button", { name: "New sample" }, { timeout: 30_000 }));
    const form = screen.getByRole("form", { name: "New sample" });
    await userEvent.type(within(form).getByLabelText("Label"), "SIG-B1-c");
    await userEvent.selectOptions(within(form).getByLabelText("Batch"), "b1");
    await userEvent.type(within(form).getByLabelText("Formula"), "Sc2Ir3Sn4");
    await userEvent.type(within(form).getByLabelText("Mass (mg)"), "10,5");
    await userEvent.click(within(form).getByRole("button", { name: "Add sample" }));
    await waitFor(() => expect(stub.calls.filter((c) => c.method === "POST")).toHaveLength(1));
    const post = stub.calls.find((c) => c.method === "POST")!;
    expect(post.body).toMatchObject({ label: "SIG-B1-c", batchId: "b1", formula: "Sc2Ir3Sn4", massMg: 10.5, molarMassGPerMol: null });
    expect(await within(form).findByText("no such batch")).toBeTruthy();
    expect(within(form).getByText("No such batch in this lab")).toBeTruthy();
  });
});
