// @vitest-environment jsdom
import { afterEach, beforeAll, describe, expect, it } from "vitest";
import { cleanup, screen, waitFor, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import type { Role } from "@shared/schemas/auth";
import type { Bundle } from "@shared/schemas/bundles";
import { errorReply, reply, stubFetch, type StubHandler } from "../../helpers/fetch-stub";
import { meFixture, renderApp, TEST_LAB } from "../../helpers/render-app";

const PAGE = `/labs/${TEST_LAB.labId}/bundles`;

const sample = (id: string, label: string, batchId: string, batchCode: string) => ({
  id,
  label,
  batchId,
  batchCode,
  formula: "Ba8Ga16Ge30",
  molarMassGPerMol: 4393.01,
  molarMassOverrideReason: null,
  atomsPerFormulaUnit: 54,
  atomsOverrideReason: null,
  massMg: 12,
  massSigmaMg: 0.05,
  compositionX: null,
  compositionName: null,
  notes: "synthetic",
  runCount: 1,
  createdAt: "2026-11-01T00:00:00.000Z",
  updatedAt: "2026-11-01T00:00:00.000Z",
});

const BUNDLE: Bundle = {
  id: "bu-1",
  name: "Series for the phonon paper",
  fileSha256: "ab".repeat(32),
  sizeBytes: 48_200,
  payloadManifestSha256: "cd".repeat(32),
  selection: { sampleIds: ["s-1"], runIds: [], fitIds: [], comparisonId: null, comparisonName: null },
  counts: { samples: 1, runs: 1, fits: 1 },
  contents: [
    { path: "data/README.txt", bytes: 6000 },
    { path: "data/datapackage.json", bytes: 4000 },
  ],
  createdBy: { id: "u-lead", displayName: "Test lead" },
  createdAt: "2026-11-25T10:00:00.000Z",
  downloadUrl: `/api/labs/${TEST_LAB.labId}/bundles/bu-1/download`,
  links: [
    {
      id: "l-1",
      bundleId: "bu-1",
      status: "active",
      createdAt: "2026-11-25T10:05:00.000Z",
      expiresAt: "2026-12-09T10:05:00.000Z",
      maxDownloads: 3,
      downloadCount: 1,
      emailTo: null,
      revokedAt: null,
      createdByName: "Test lead",
    },
  ],
};

function api(role: Role, bundles: Bundle[], extra: Record<string, StubHandler> = {}) {
  return stubFetch({
    "GET /api/setup": reply(200, { needsSetup: false, fakeMail: true }),
    "GET /api/me": reply(200, meFixture(role)),
    "GET /api/labs/:labId/batches": reply(200, [
      { id: "b-a", code: "A-01", synthesisDate: null, method: "", notes: "", sampleCount: 2, createdAt: "2026-11-01T00:00:00.000Z" },
    ]),
    "GET /api/labs/:labId/samples": reply(200, [sample("s-1", "A1", "b-a", "A-01"), sample("s-2", "A2", "b-a", "A-01")]),
    "GET /api/labs/:labId/comparisons": reply(200, []),
    "GET /api/labs/:labId/bundles": reply(200, bundles),
    ...extra,
  });
}

let stub: ReturnType<typeof stubFetch>;
beforeAll(async () => {
  await import("@/app/routes/bundles");
}, 60_000);
afterEach(() => {
  cleanup();
  stub.restore();
});

describe("bundles page", () => {
  it("says what to do when the lab has no bundles, and builds one from a whole batch", async () => {
    stub = api("researcher", [], { "POST /api/labs/:labId/bundles": reply(201, BUNDLE) });
    const user = userEvent.setup();
    renderApp(PAGE);
    expect(await screen.findByText("No bundles yet")).toBeTruthy();
    const form = screen.getByRole("form", { name: "Build a bundle" });
    await user.click(within(form).getByRole("button", { name: "Build bundle" }));
    expect(await within(form).findByText("Name the bundle")).toBeTruthy();
    await user.type(within(form).getByLabelText("Bundle name"), "Series for the phonon paper");
    await user.click(within(form).getByRole("button", { name: "Build bundle" }));
    expect(await within(form).findByText("Tick at least one sample")).toBeTruthy();
    expect(stub.callsTo("POST /api/labs/:labId/bundles")).toHaveLength(0);
    await user.click(within(form).getByRole("checkbox", { name: "Whole batch A-01" }));
    await user.click(within(form).getByRole("button", { name: "Build bundle" }));
    expect(await within(form).findByText(/Built “Series for the phonon paper”: 2 files, 48.2 kB/)).toBeTruthy();
    expect(stub.callsTo("POST /api/labs/:labId/bundles")[0].body).toEqual({ name: "Series for the phonon paper", sampleIds: ["s-1", "s-2"] });
    await waitFor(() => expect(stub.callsTo("GET /api/labs/:labId/bundles").length).toBeGreaterThan(1));
  });

  it("shows a refusal from the server, such as fits that are not approved", async () => {
    stub = api("lead", [], { "POST /api/labs/:labId/bundles": errorReply(422, "UNPROCESSABLE", "Only approved fits go into a bundle; not approved: f-9 (draft)") });
    const user = userEvent.setup();
    renderApp(PAGE);
    const form = await screen.findByRole("form", { name: "Build a bundle" });
    await user.type(within(form).getByLabelText("Bundle name"), "x");
    await user.click(within(form).getByRole("checkbox", { name: /A1/ }));
    await user.click(within(form).getByRole("button", { name: "Build bundle" }));
    expect(await within(form).findByText(/not approved: f-9 \(draft\)/)).toBeTruthy();
  });

  it("lists a bundle with its contents and download, makes a share link shown once, and revokes one", async () => {
    stub = api("lead", [BUNDLE], {
      "POST /api/labs/:labId/bundles/:bundleId/links": (call) =>
        reply(201, {
          ...BUNDLE.links[0],
          id: "l-2",
          maxDownloads: (call.body as { maxDownloads: number | null }).maxDownloads,
          emailTo: (call.body as { emailTo: string | null }).emailTo,
          url: "http://localhost:3000/api/shared/Q2VydGFpbmx5LW5vdC1hLXJlYWwtdG9rZW4tMDAwMDAwMA",
          emailed: true,
          emailError: null,
        }),
      "DELETE /api/labs/:labId/bundles/:bundleId/links/:linkId": reply(204),
    });
    const user = userEvent.setup();
    renderApp(PAGE);
    const card = (await screen.findByRole("heading", { name: "Series for the phonon paper" })).closest("section")!;
    const download = within(card).getByRole("link", { name: "Download Series for the phonon paper" });
    expect(download.getAttribute("href")).toBe(`/api/labs/${TEST_LAB.labId}/bundles/bu-1/download`);
    expect(within(card).getByText("data/README.txt")).toBeTruthy();
    expect(within(card).getByText(/1 download of 3/)).toBeTruthy();

    const form = within(card).getByRole("form", { name: "New share link for Series for the phonon paper" });
    expect((within(form).getByLabelText("Expires after (days)") as HTMLInputElement).value).toBe("14");
    await user.type(within(form).getByLabelText("Download limit"), "5");
    await user.type(within(form).getByLabelText("E-mail it to (optional)"), "theorist@example.net");
    await user.click(within(form).getByRole("button", { name: "Make share link" }));
    const address = (await within(card).findByLabelText("Share link address")) as HTMLInputElement;
    expect(address.value).toMatch(/\/api\/shared\//);
    expect(within(card).getByText(/shown only now/)).toBeTruthy();
    expect(within(card).getByText("Sent by e-mail to theorist@example.net.")).toBeTruthy();
    expect(stub.callsTo("POST /api/labs/:labId/bundles/:bundleId/links")[0].body).toEqual({ expiresInDays: 14, maxDownloads: 5, emailTo: "theorist@example.net" });

    await user.click(within(card).getByRole("button", { name: "Revoke" }));
    await waitFor(() => expect(stub.callsTo("DELETE /api/labs/:labId/bundles/:bundleId/links/:linkId")[0]?.params.linkId).toBe("l-1"));
  });

  it("checks share-link settings before sending", async () => {
    stub = api("researcher", [BUNDLE]);
    const user = userEvent.setup();
    renderApp(PAGE);
    const form = await screen.findByRole("form", { name: "New share link for Series for the phonon paper" });
    const days = within(form).getByLabelText("Expires after (days)");
    await user.clear(days);
    await user.type(days, "400");
    await user.click(within(form).getByRole("button", { name: "Make share link" }));
    expect(await within(form).findByText("At most 365 days")).toBeTruthy();
    expect(stub.callsTo("POST /api/labs/:labId/bundles/:bundleId/links")).toHaveLength(0);
  });

  it("lets a guest download but not build or share", async () => {
    stub = api("guest", [{ ...BUNDLE, links: [] }]);
    renderApp(PAGE);
    expect(await screen.findByRole("link", { name: "Download Series for the phonon paper" })).toBeTruthy();
    expect(screen.queryByRole("form", { name: "Build a bundle" })).toBeNull();
    expect(screen.queryByRole("form", { name: /New share link/ })).toBeNull();
    expect(screen.queryByText("Share links")).toBeNull();
  });
});
