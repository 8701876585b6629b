import { beforeAll, describe, expect, it } from "vitest";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { CompareCurvesSchema, ComparisonResultSchema, ComparisonSchema } from "@shared/schemas/compare";
import { csvCell } from "../../server/services/compare";
import { makeTestApp, seedRoles, type TestApp } from "../helpers/app";
import { expectClose } from "../helpers/expect-close";
import { addBatch, addSampleWithFits, debyeParams, seedSeries } from "./compare-fixtures";

let t: TestApp;
let cast: Awaited<ReturnType<typeof seedRoles>>;
let series: ReturnType<typeof seedSeries>;
let base: string;

beforeAll(async () => {
  t = makeTestApp();
  cast = await seedRoles(t);
  series = seedSeries(t.db, t.dataDir, cast.lab.id, cast.users.lead.id);
  // A batch of the other lab, to be refused by id.
  addBatch(t.db, cast.otherLab.id, "OTHER-1");
  base = `/api/labs/${cast.lab.id}`;
});

describe("GET /api/labs/:labId/compare", () => {
  it("groups approved θ_D by batch with the weighted mean of Taylor §7.2 and flags the planted outlier", async () => {
    const res = await cast.agents.guest.get(`${base}/compare?parameter=thetaD&groupBy=batch`);
    expect(res.status).toBe(200);
    const r = ComparisonResultSchema.parse(res.body);
    expect(r.groups.map((g) => g.label)).toEqual(["A-01", "B-02", "C-03"]);
    const a = r.groups[0];
    // Four rows, σ = 0.8 ⊕ 0.6 = 1 K each: weighted mean (300+301+299+305)/4 = 301.25 K, σ = 1/√4 = 0.5 K.
    expect(a.n).toBe(4);
    expectClose(a.weightedMean!, 301.25, { rel: 1e-14 });
    expectClose(a.weightedSigma!, 0.5, { rel: 1e-14 });
    expectClose(a.unweightedMean, 301.25, { rel: 1e-14 });
    // Sample standard deviation (Taylor eq. 4.9): deviations −1.25, −0.25, −2.25, 3.75 → Σd² = 20.75, s = √(20.75/3).
    expectClose(a.spread!, Math.sqrt(20.75 / 3), { rel: 1e-14 });
    const rowsA = r.rows.filter((x) => x.groupKey === a.key);
    expect(rowsA.map((x) => [x.sampleLabel, x.flagged])).toEqual([
      ["A1", false],
      ["A2", false],
      ["A3", false],
      ["A4", true],
    ]);
    expectClose(rowsA[3].deviationSigma!, 3.75, { rel: 1e-12 });
    expect(a.flaggedCount).toBe(1);
    expect(rowsA[0].sigmaStat).toBe(0.8);
    expect(rowsA[0].sigmaSys).toBe(0.6);
    expect(rowsA[0].model).toBe("γT + Debye (3D)");
  });

  it("leaves out fits that are not approved", async () => {
    const r = ComparisonResultSchema.parse((await cast.agents.lead.get(`${base}/compare?parameter=thetaD`)).body);
    const b = r.rows.filter((x) => x.batchCode === "B-02");
    expect(b.map((x) => x.value)).toEqual([320, 322]);
    expect(r.rows.some((x) => x.value === 400)).toBe(false);
    expect(r.rows.some((x) => x.fitId === series.b2.fitIds[1])).toBe(false);
  });

  it("derives θ_D from β of γT + βT³ as (12π⁴nR/5β)^(1/3) and says so", async () => {
    const r = ComparisonResultSchema.parse((await cast.agents.lead.get(`${base}/compare?parameter=thetaD`)).body);
    const c = r.rows.find((x) => x.sampleLabel === "C1")!;
    // mpmath 1.3.0, 30 digits, R = k_B·N_A = 8.31446261815324 J/(mol·K) (CODATA 2018 exact):
    // cbrt(12π⁴R / (5 · 4.8e-5)) = 343.400740024472307266831892311 K,
    // σ_stat = θ/3 · 3e-7/4.8e-5 = 0.715418208384317 K, σ_sys = θ/3 · 1e-7/4.8e-5 = 0.238472736128106 K.
    expectClose(c.value, 343.400740024472307266831892311, { rel: 1e-13 });
    expectClose(c.sigmaStat!, 0.715418208384317306805899775648, { rel: 1e-12 });
    expectClose(c.sigmaSys!, 0.238472736128105768935299925216, { rel: 1e-12 });
    expect(c.derivedFrom).toBe("beta");
    expect(r.notes.some((n) => n.kind === "derived")).toBe(true);
    // The table mixes two models and two windows: a note says the rows are not comparable as such.
    expect(r.notes.some((n) => n.kind === "models" && n.groupKey === null)).toBe(true);
    expect(r.notes.some((n) => n.kind === "windows" && n.groupKey === null)).toBe(true);
  });

  it("groups by composition x and filters by batch and sample (union)", async () => {
    const byX = ComparisonResultSchema.parse((await cast.agents.guest.get(`${base}/compare?parameter=thetaD&groupBy=x`)).body);
    expect(byX.groups.map((g) => g.x)).toEqual([0, 0.5, 1]);
    const sel = ComparisonResultSchema.parse(
      (await cast.agents.guest.get(`${base}/compare?parameter=thetaD&batchIds=${series.batchB}&sampleIds=${series.a[0].sampleId}`)).body,
    );
    expect(sel.rows.map((x) => x.sampleLabel).sort()).toEqual(["A1", "B1", "B2"]);
    const repeated = ComparisonResultSchema.parse(
      (await cast.agents.guest.get(`${base}/compare?parameter=thetaD&sampleIds=${series.a[0].sampleId}&sampleIds=${series.a[1].sampleId}`)).body,
    );
    expect(repeated.rows.map((x) => x.sampleLabel)).toEqual(["A1", "A2"]);
  });

  it("compares any fitted parameter and lists the parameters available", async () => {
    const r = ComparisonResultSchema.parse((await cast.agents.guest.get(`${base}/compare?parameter=gamma`)).body);
    expect(r.unit).toBe("J/(mol·K²)");
    expect(r.rows).toHaveLength(7);
    expect(r.availableParameters.map((p) => p.name)).toEqual(["beta", "gamma", "thetaD"]);
    const none = ComparisonResultSchema.parse((await cast.agents.guest.get(`${base}/compare?parameter=thetaE`)).body);
    expect(none.rows).toEqual([]);
    expect(none.groups).toEqual([]);
  });

  it("notes differing models and windows inside one group", async () => {
    const t2 = makeTestApp();
    const lab2 = await seedRoles(t2);
    const batch = addBatch(t2.db, lab2.lab.id, "MIX");
    addSampleWithFits(t2.db, t2.dataDir, lab2.lab.id, lab2.users.lead.id, { label: "M1", batchId: batch, fits: [{ parameters: debyeParams(250) }] });
    addSampleWithFits(t2.db, t2.dataDir, lab2.lab.id, lab2.users.lead.id, {
      label: "M2",
      batchId: batch,
      fits: [{ parameters: debyeParams(252), window: [2, 40], model: { components: [{ kind: "debye" }, { kind: "einstein" }] } }],
    });
    const r = ComparisonResultSchema.parse((await lab2.agents.guest.get(`/api/labs/${lab2.lab.id}/compare`)).body);
    expect(r.groups[0].modelsDiffer).toBe(true);
    expect(r.groups[0].windowsDiffer).toBe(true);
    expect(r.notes.filter((n) => n.groupKey === r.groups[0].key).map((n) => n.kind).sort()).toEqual(["models", "windows"]);
  });

  it("flags both fits of a group of two that disagree, and says the rule cannot tell which is off", async () => {
    const t2 = makeTestApp();
    const c2 = await seedRoles(t2);
    const batch = addBatch(t2.db, c2.lab.id, "PAIR");
    // 250 ± 1 and 260 ± 1 K: weighted mean 255 K, each 5σ away (direct arithmetic).
    addSampleWithFits(t2.db, t2.dataDir, c2.lab.id, c2.users.lead.id, { label: "P1", batchId: batch, fits: [{ parameters: debyeParams(250) }] });
    addSampleWithFits(t2.db, t2.dataDir, c2.lab.id, c2.users.lead.id, { label: "P2", batchId: batch, fits: [{ parameters: debyeParams(260) }] });
    const r = ComparisonResultSchema.parse((await c2.agents.guest.get(`/api/labs/${c2.lab.id}/compare`)).body);
    expect(r.rows.map((x) => x.flagged)).toEqual([true, true]);
    expectClose(r.rows[0].deviationSigma!, 5, { rel: 1e-12 });
    expect(r.notes.map((n) => n.kind)).toContain("pair");
  });

  it("refuses a batch of another lab with 404 and a bad parameter name with 400", async () => {
    const other = (await cast.agents.outsider.get(`/api/labs/${cast.otherLab.id}/compare`)).body;
    expect(ComparisonResultSchema.parse(other).rows).toEqual([]);
    const res = await cast.agents.lead.get(`${base}/compare?batchIds=${series.batchA},no-such-batch`);
    expect(res.status).toBe(404);
    expect(ApiErrorSchema.parse(res.body).error.code).toBe("NOT_FOUND");
    const bad = await cast.agents.lead.get(`${base}/compare?parameter=${encodeURIComponent("=cmd()")}`);
    expect(bad.status).toBe(400);
    expect(ApiErrorSchema.parse(bad.body).error.code).toBe("VALIDATION_FAILED");
    const badGroup = await cast.agents.lead.get(`${base}/compare?groupBy=colour`);
    expect(badGroup.status).toBe(400);
  });
});

describe("GET /api/labs/:labId/compare/curves", () => {
  it("returns each row's unmasked points with its θ_D and γ", async () => {
    const res = await cast.agents.guest.get(`${base}/compare/curves?parameter=thetaD&batchIds=${series.batchA}`);
    expect(res.status).toBe(200);
    const curves = CompareCurvesSchema.parse(res.body);
    expect(curves).toHaveLength(4);
    expect(curves[0].points).toHaveLength(11); // 12 points, one masked
    expect(curves[0].thetaD).toBe(300);
    expect(curves[0].gamma).toBe(0.012);
    expect(curves[0].atomsPerFormulaUnit).toBe(54);
  });
});

describe("GET /api/labs/:labId/compare.csv", () => {
  it("exports the table with its group statistics", async () => {
    const res = await cast.agents.guest.get(`${base}/compare.csv?parameter=thetaD`);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^text\/csv/);
    expect(res.headers["content-disposition"]).toMatch(/attachment; filename="comparison-thetaD-by-batch.csv"/);
    const lines = res.text.trimEnd().split("\n");
    expect(lines[0].split(",").slice(0, 3)).toEqual(["group", "batch", "sample"]);
    expect(lines).toHaveLength(1 + 7);
    const a4 = lines.find((l) => l.split(",")[2] === "A4")!.split(",");
    const header = lines[0].split(",");
    expect(a4[header.indexOf("flagged")]).toBe("true");
    expect(Number(a4[header.indexOf("group_weighted_mean")])).toBe(301.25);
  });

  it("neutralises cells a spreadsheet would run as formulas (OWASP CSV injection)", async () => {
    expect(csvCell("=HYPERLINK(\"x\")")).toBe(`"'=HYPERLINK(""x"")"`);
    expect(csvCell("+1")).toBe("'+1");
    expect(csvCell("-2+3")).toBe("'-2+3");
    expect(csvCell("@SUM(A1)")).toBe("'@SUM(A1)");
    expect(csvCell("\tx")).toBe("'\tx");
    expect(csvCell(-5.5)).toBe("-5.5");
    expect(csvCell("a,b")).toBe('"a,b"');
    const batch = addBatch(t.db, cast.lab.id, "=1+2");
    addSampleWithFits(t.db, t.dataDir, cast.lab.id, cast.users.lead.id, { label: "@evil", batchId: batch, fits: [{ parameters: debyeParams(310) }] });
    const res = await cast.agents.guest.get(`${base}/compare.csv?batchIds=${batch}`);
    const row = res.text.trimEnd().split("\n")[1].split(",");
    expect(row[0]).toBe("'=1+2");
    expect(row[1]).toBe("'=1+2");
    expect(row[2]).toBe("'@evil");
  });
});

describe("saved comparisons", () => {
  it("saves a selection and lists it for guests; refuses a guest's save with 403", async () => {
    const body = { name: "Batches A and B", selection: { batchIds: [series.batchA, series.batchB], sampleIds: [] }, parameter: "thetaD", groupBy: "batch" };
    const created = await cast.agents.researcher.post(`${base}/comparisons`).send(body);
    expect(created.status).toBe(201);
    const c = ComparisonSchema.parse(created.body);
    expect(c.selection.batchIds).toEqual([series.batchA, series.batchB]);
    expect(c.createdByName).toBe(cast.users.researcher.displayName);
    const list = await cast.agents.guest.get(`${base}/comparisons`);
    expect(list.status).toBe(200);
    expect(list.body.map((x: { id: string }) => x.id)).toContain(c.id);
    const dup = await cast.agents.lead.post(`${base}/comparisons`).send(body);
    expect(dup.status).toBe(409);
    const guest = await cast.agents.guest.post(`${base}/comparisons`).send({ ...body, name: "guest try" });
    expect(guest.status).toBe(403);
    expect(ApiErrorSchema.parse(guest.body).error.code).toBe("FORBIDDEN");
  });

  it("refuses a selection naming another lab's batch (404) and a missing name (400)", async () => {
    const foreign = await cast.agents.lead
      .post(`${base}/comparisons`)
      .send({ name: "x", selection: { batchIds: ["nope"], sampleIds: [] }, parameter: "thetaD" });
    expect(foreign.status).toBe(404);
    const noName = await cast.agents.lead.post(`${base}/comparisons`).send({ selection: { batchIds: [] }, parameter: "thetaD" });
    expect(noName.status).toBe(400);
  });
});

describe("role matrix of the comparison routes", () => {
  const reads = ["/compare", "/compare.csv", "/compare/curves", "/comparisons"];
  it.each(reads)("GET %s: anonymous 401, guest/researcher/lead 200, outsider and admin-not-member 404", async (p) => {
    const url = `${base}${p}`;
    expect((await cast.agents.anonymous.get(url)).status).toBe(401);
    for (const who of ["guest", "researcher", "lead"] as const) expect((await cast.agents[who].get(url)).status, who).toBe(200);
    for (const who of ["outsider", "admin"] as const) {
      const res = await cast.agents[who].get(url);
      expect(res.status, who).toBe(404);
      expect(ApiErrorSchema.parse(res.body).error.code).toBe("NOT_FOUND");
    }
  });

  it("POST /comparisons and DELETE /comparisons/:id: anonymous 401, guest 403, researcher and lead allowed, outsider and admin 404", async () => {
    const url = `${base}/comparisons`;
    const body = (name: string) => ({ name, selection: { batchIds: [], sampleIds: [] }, parameter: "thetaD" });
    expect((await cast.agents.anonymous.post(url).send(body("anon"))).status).toBe(401);
    expect((await cast.agents.guest.post(url).send(body("g"))).status).toBe(403);
    expect((await cast.agents.outsider.post(url).send(body("o"))).status).toBe(404);
    expect((await cast.agents.admin.post(url).send(body("ad"))).status).toBe(404);
    const r = await cast.agents.researcher.post(url).send(body("by researcher"));
    const l = await cast.agents.lead.post(url).send(body("by lead"));
    expect([r.status, l.status]).toEqual([201, 201]);
    expect((await cast.agents.guest.delete(`${url}/${r.body.id}`)).status).toBe(403);
    expect((await cast.agents.outsider.delete(`${url}/${r.body.id}`)).status).toBe(404);
    expect((await cast.agents.anonymous.delete(`${url}/${r.body.id}`)).status).toBe(401);
    expect((await cast.agents.researcher.delete(`${url}/${r.body.id}`)).status).toBe(204);
    expect((await cast.agents.lead.delete(`${url}/${r.body.id}`)).status).toBe(404);
    expect((await cast.agents.lead.delete(`${url}/${l.body.id}`)).status).toBe(204);
  });
});
