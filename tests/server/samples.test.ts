import { describe, expect, it } from "vitest";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { SampleDetailSchema, SampleSchema, type Sample } from "@shared/schemas/samples";
import { makeTestApp, seedRoles } from "../helpers/app";
import { expectClose } from "../helpers/expect-close";
import { footprint } from "./runs-helpers";

async function setup() {
  const t = makeTestApp();
  const cast = await seedRoles(t);
  const base = `/api/labs/${cast.lab.id}`;
  return { t, ...cast, base, url: `${base}/samples` };
}

describe("samples API: create, read, change, delete", () => {
  it("derives molar mass and atoms per formula unit from the formula", async () => {
    const { agents, url } = await setup();
    const res = await agents.researcher.post(url).send({ label: "BGG-1", formula: "Ba8Ga16Ge30", massMg: 8.4, massSigmaMg: 0.02 });
    expect(res.status).toBe(201);
    const s = SampleSchema.parse(res.body);
    // IUPAC standard atomic weights (CIAAW, from memory): Ba 137.327, Ga 69.723, Ge 72.630;
    // 8·137.327 + 16·69.723 + 30·72.630 = 4393.084 g/mol. mf-parser's own table gives 4393.01
    // (TOOLCHAIN.md; an older Ge weight), so the check is to 1e-4 relative.
    expectClose(s.molarMassGPerMol, 4393.084, { rel: 1e-4 }, "M(Ba8Ga16Ge30)");
    expect(s.atomsPerFormulaUnit).toBe(54);
    expect(s.molarMassOverrideReason).toBeNull();
    expect(s).toMatchObject({ label: "BGG-1", massMg: 8.4, massSigmaMg: 0.02, runCount: 0, batchId: null });
  });

  it("keeps an override with its reason, and refuses one without", async () => {
    const { t, agents, url } = await setup();
    const noReason = await agents.researcher.post(url).send({ label: "X", formula: "Cu", massMg: 1, molarMassGPerMol: 63.9 });
    expect(noReason.status).toBe(400);
    expect(ApiErrorSchema.parse(noReason.body).error.details?.map((d) => d.path)).toContain("molarMassOverrideReason");
    expect(footprint(t).samples).toBe(0);
    const ok = await agents.researcher
      .post(url)
      .send({ label: "X", formula: "Cu", massMg: 1, molarMassGPerMol: 63.9, molarMassOverrideReason: "isotope-enriched 65Cu piece", atomsPerFormulaUnit: 1.02, atomsOverrideReason: "vacancies" });
    expect(ok.status).toBe(201);
    const s = SampleSchema.parse(ok.body);
    expect(s).toMatchObject({ molarMassGPerMol: 63.9, atomsPerFormulaUnit: 1.02, molarMassOverrideReason: "isotope-enriched 65Cu piece" });
  });

  it("refuses an unknown element, an empty formula, a mass of zero and σ ≥ mass with 400 naming the field, writing nothing", async () => {
    const { t, agents, url } = await setup();
    const cases: [Record<string, unknown>, string][] = [
      [{ label: "A", formula: "Xx2", massMg: 1 }, "formula"],
      [{ label: "A", formula: "", massMg: 1 }, "formula"],
      [{ label: "A", formula: "cu", massMg: 1 }, "formula"],
      [{ label: "A", formula: "Cu", massMg: 0 }, "massMg"],
      [{ label: "A", formula: "Cu", massMg: -2 }, "massMg"],
      [{ label: "A", formula: "Cu", massMg: 2, massSigmaMg: 2 }, "massSigmaMg"],
      [{ label: "", formula: "Cu", massMg: 2 }, "label"],
      [{ label: "A", formula: "Cu", massMg: "ten" }, "massMg"],
    ];
    for (const [body, path] of cases) {
      const res = await agents.researcher.post(url).send(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      const err = ApiErrorSchema.parse(res.body).error;
      expect(err.code).toBe("VALIDATION_FAILED");
      expect(err.details?.map((d) => d.path)).toContain(path);
    }
    const unknownBatch = await agents.researcher.post(url).send({ label: "A", formula: "Cu", massMg: 1, batchId: "nope" });
    expect(unknownBatch.status).toBe(404);
    expect(footprint(t).samples).toBe(0);
  });

  it("reads one sample with what its formula alone gives and an empty run list", async () => {
    const { agents, url } = await setup();
    const created = SampleSchema.parse(
      (await agents.researcher.post(url).send({ label: "Al2O3-1", formula: "Al2O3", massMg: 12, molarMassGPerMol: 102, molarMassOverrideReason: "hydrated surface" })).body,
    );
    const res = await agents.guest.get(`${url}/${created.id}`);
    expect(res.status).toBe(200);
    const d = SampleDetailSchema.parse(res.body);
    // Al2O3: 2·26.9815385 + 3·15.999 = 101.961 g/mol (IUPAC standard atomic weights, abridged), 5 atoms.
    expectClose(d.derived.molarMassGPerMol, 101.961, { rel: 1e-5 }, "M(Al2O3)");
    expect(d.derived.atomsPerFormulaUnit).toBe(5);
    expect(d.molarMassGPerMol).toBe(102);
    expect(d.runs).toEqual([]);
    expect((await agents.guest.get(`${url}/no-such-sample`)).status).toBe(404);
  });

  it("changes fields with PATCH, re-derives on a new formula, and returns to the formula value when an override is cleared", async () => {
    const { agents, url, base } = await setup();
    const batch = (await agents.researcher.post(`${base}/batches`).send({ code: "B1" })).body;
    const s = SampleSchema.parse(
      (await agents.researcher.post(url).send({ label: "S", formula: "Cu", massMg: 5, molarMassGPerMol: 64, molarMassOverrideReason: "r" })).body,
    );
    const p1 = await agents.researcher.patch(`${url}/${s.id}`).send({ formula: "Ag", batchId: batch.id, compositionX: 0.25, compositionName: "x(Ag)" });
    expect(p1.status).toBe(200);
    const a = SampleSchema.parse(p1.body);
    expect(a).toMatchObject({ formula: "Ag", molarMassGPerMol: 64, batchCode: "B1", compositionX: 0.25 });
    const p2 = await agents.researcher.patch(`${url}/${s.id}`).send({ molarMassGPerMol: null });
    const b = SampleSchema.parse(p2.body);
    // Ag 107.8682 g/mol (IUPAC standard atomic weight).
    expectClose(b.molarMassGPerMol, 107.8682, { rel: 1e-5 }, "M(Ag)");
    expect(b.molarMassOverrideReason).toBeNull();
    const bad = await agents.researcher.patch(`${url}/${s.id}`).send({ massMg: 0 });
    expect(bad.status).toBe(400);
    expect((await agents.researcher.patch(`${url}/${s.id}`).send({})).status).toBe(400);
    expect((await agents.researcher.patch(`${url}/${s.id}`).send({ formula: "Qq" })).status).toBe(400);
  });

  it("deletes for a lead only: researcher and guest 403, lead 204, then 404", async () => {
    const { t, agents, url } = await setup();
    const s = SampleSchema.parse((await agents.researcher.post(url).send({ label: "S", formula: "Cu", massMg: 5 })).body);
    expect((await agents.researcher.delete(`${url}/${s.id}`)).status).toBe(403);
    expect((await agents.guest.delete(`${url}/${s.id}`)).status).toBe(403);
    expect((await agents.outsider.delete(`${url}/${s.id}`)).status).toBe(404);
    expect(footprint(t).samples).toBe(1);
    expect((await agents.lead.delete(`${url}/${s.id}`)).status).toBe(204);
    expect((await agents.lead.get(`${url}/${s.id}`)).status).toBe(404);
    expect(footprint(t).samples).toBe(0);
  });
});

describe("sample list: search, sort, batch filter", () => {
  async function withSamples() {
    const ctx = await setup();
    const { agents, base, url } = ctx;
    const b1 = (await agents.researcher.post(`${base}/batches`).send({ code: "B1" })).body;
    const b2 = (await agents.researcher.post(`${base}/batches`).send({ code: "B2" })).body;
    const make = (body: Record<string, unknown>) => agents.researcher.post(url).send(body).expect(201);
    await make({ label: "gamma", formula: "Cu", massMg: 3, batchId: b1.id, compositionX: 0.2 });
    await make({ label: "alpha", formula: "Ag", massMg: 9, batchId: b2.id, compositionX: 0.1, notes: "cracked corner" });
    await make({ label: "beta", formula: "Au", massMg: 1 });
    return { ...ctx, b1, b2 };
  }
  const labels = (body: Sample[]) => body.map((s) => SampleSchema.parse(s).label);

  it("sorts by label by default, and by mass or x on request (samples without x last)", async () => {
    const { agents, url } = await withSamples();
    expect(labels((await agents.guest.get(url)).body)).toEqual(["alpha", "beta", "gamma"]);
    expect(labels((await agents.guest.get(url).query({ sort: "massMg", order: "desc" })).body)).toEqual(["alpha", "gamma", "beta"]);
    expect(labels((await agents.guest.get(url).query({ sort: "compositionX" })).body)).toEqual(["alpha", "gamma", "beta"]);
    expect(labels((await agents.guest.get(url).query({ sort: "compositionX", order: "desc" })).body)).toEqual(["gamma", "alpha", "beta"]);
    expect((await agents.guest.get(url).query({ sort: "shoe-size" })).status).toBe(400);
  });

  it("searches label, formula, notes and batch code, case-insensitively, with % taken literally", async () => {
    const { agents, url } = await withSamples();
    expect(labels((await agents.guest.get(url).query({ q: "CRACKED" })).body)).toEqual(["alpha"]);
    expect(labels((await agents.guest.get(url).query({ q: "au" })).body)).toEqual(["beta"]);
    expect(labels((await agents.guest.get(url).query({ q: "b1" })).body)).toEqual(["gamma"]);
    expect((await agents.guest.get(url).query({ q: "%" })).body).toEqual([]);
  });

  it("filters by batch, and 'none' keeps the samples without one", async () => {
    const { agents, url, b2 } = await withSamples();
    expect(labels((await agents.guest.get(url).query({ batchId: b2.id })).body)).toEqual(["alpha"]);
    expect(labels((await agents.guest.get(url).query({ batchId: "none" })).body)).toEqual(["beta"]);
  });
});

describe("samples role matrix", () => {
  it("anonymous 401; guest reads, 403 on every write; outsider and admin-not-member 404; researcher writes", async () => {
    const { t, agents, url } = await setup();
    const s = SampleSchema.parse((await agents.lead.post(url).send({ label: "S", formula: "Cu", massMg: 5 })).body);
    const one = `${url}/${s.id}`;
    const body = { label: "T", formula: "Cu", massMg: 2 };
    const calls = {
      list: (a: typeof agents.lead) => a.get(url),
      create: (a: typeof agents.lead) => a.post(url).send(body),
      read: (a: typeof agents.lead) => a.get(one),
      update: (a: typeof agents.lead) => a.patch(one).send({ notes: "n" }),
      remove: (a: typeof agents.lead) => a.delete(one),
    };
    for (const [name, call] of Object.entries(calls)) {
      expect((await call(agents.anonymous)).status, `anonymous ${name}`).toBe(401);
      expect((await call(agents.outsider)).status, `outsider ${name}`).toBe(404);
      expect((await call(agents.admin)).status, `admin ${name}`).toBe(404);
      const guest = await call(agents.guest);
      expect(guest.status, `guest ${name}`).toBe(name === "list" || name === "read" ? 200 : 403);
    }
    expect(footprint(t).samples).toBe(1);
    expect((await calls.create(agents.researcher)).status).toBe(201);
    expect((await calls.update(agents.researcher)).status).toBe(200);
    expect((await calls.remove(agents.researcher)).status).toBe(403);
    expect((await calls.remove(agents.lead)).status).toBe(204);
  });
});
