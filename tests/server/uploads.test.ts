import { createHash } from "node:crypto";
import { existsSync } from "node:fs";
import path from "node:path";
import type request from "supertest";
import { describe, expect, it } from "vitest";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import {
  DUPLICATE_RUN_PATH_PREFIX,
  MaskResultSchema,
  RunCommitResultSchema,
  RunDetailSchema,
  RunUploadPreviewSchema,
} from "@shared/schemas/runs";
import { SampleSchema } from "@shared/schemas/samples";
import { makeTestApp, seedRoles, type TestApp } from "../helpers/app";
import { expectClose } from "../helpers/expect-close";
import { COPPER_MAPPINGS, fixture, footprint, withUpload } from "./runs-helpers";

type Agents = Awaited<ReturnType<typeof seedRoles>>["agents"];
type Agent = Agents["lead"];

const sha256 = (b: Buffer) => createHash("sha256").update(b).digest("hex");
// superagent's parser callback: the response is a readable stream of the body's bytes.
const binaryParser = (res: request.Response, cb: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = [];
  const stream = res as unknown as NodeJS.ReadableStream;
  stream.on("data", (d: Buffer) => chunks.push(d));
  stream.on("end", () => cb(null, Buffer.concat(chunks)));
};

async function setup(sample: Record<string, unknown> = { label: "QI-CU-01", formula: "Cu", massMg: 25, massSigmaMg: 0.01 }) {
  const t = makeTestApp();
  const cast = await seedRoles(t);
  const base = `/api/labs/${cast.lab.id}`;
  const created = await cast.agents.researcher.post(`${base}/samples`).send(sample);
  expect(created.status).toBe(201);
  const s = SampleSchema.parse(created.body);
  return { t, ...cast, base, sample: s, runsUrl: `${base}/samples/${s.id}/runs` };
}

function commit(agent: Agent, url: string, bytes: Buffer, name: string, fields: Record<string, unknown>) {
  return withUpload(agent.post(url), bytes, name, fields);
}

const COPPER_J = "ingest/copper/export-j-per-k.csv";

describe("upload preview", () => {
  it("reads the file, proposes the mapping from the header, reduces, and writes nothing", async () => {
    const { t, agents, runsUrl } = await setup();
    const before = footprint(t);
    const res = await withUpload(agents.researcher.post(`${runsUrl}/preview`), fixture("ingest/copper/export-mj-per-k.csv"), "export-mj-per-k.csv");
    expect(res.status).toBe(200);
    const p = RunUploadPreviewSchema.parse(res.body);
    expect(p.table.delimiter).toBe(";");
    expect(p.table.decimalMark).toBe(",");
    expect(p.table.headerLine).toBe(8);
    expect(p.table.rowCount).toBe(120);
    expect(p.mapping).toEqual(COPPER_MAPPINGS["export-mj-per-k.csv"]);
    expect(p.runs).toHaveLength(1);
    expect(p.runs[0].points).toHaveLength(120);
    expect(p.file).toMatchObject({ fileName: "export-mj-per-k.csv", sha256: sha256(fixture("ingest/copper/export-mj-per-k.csv")), duplicateOfRunId: null });
    expect(footprint(t)).toEqual(before);
    expect(before.files).toEqual([]);
    expect(existsSync(path.join(t.dataDir, "files"))).toBe(false);
  });

  it("reduces with the mapping sent, and reports a bad one with 400 naming line and column, still writing nothing", async () => {
    const { t, agents, runsUrl } = await setup();
    const mapping = { ...COPPER_MAPPINGS["export-j-per-k.csv"], columns: { temperature: "Temperature (K)", heatCapacity: "Heat capacity (J/K)", sigma: "Sigma" } };
    const res = await withUpload(agents.researcher.post(`${runsUrl}/preview`), fixture(COPPER_J), "c.csv", { mapping });
    expect(res.status).toBe(400);
    const err = ApiErrorSchema.parse(res.body).error;
    expect(err.details?.[0]).toMatchObject({ line: 8, column: "Sigma" });
    expect(footprint(t).files).toEqual([]);
  });
});

describe("upload commit", () => {
  it("stores the raw file under files/<2 hex>/<sha256>, the run and every point in one go", async () => {
    const { t, agents, runsUrl, sample, base } = await setup();
    const bytes = fixture(COPPER_J);
    const res = await commit(agents.researcher, runsUrl, bytes, "export-j-per-k.csv", { mapping: COPPER_MAPPINGS["export-j-per-k.csv"], label: "Cu reference, run 1" });
    expect(res.status).toBe(201);
    const result = RunCommitResultSchema.parse(res.body);
    const digest = sha256(bytes);
    expect(result.file.sha256).toBe(digest);
    expect(result.runs).toHaveLength(1);
    expect(result.runs[0]).toMatchObject({ kind: "sample", sampleId: sample.id, label: "Cu reference, run 1", pointCount: 120, fileName: "export-j-per-k.csv" });
    const fp = footprint(t);
    expect(fp).toMatchObject({ runs: 1, points: 120, storedFiles: 1 });
    expect(fp.files).toEqual([`${digest.slice(0, 2)}/${digest}`]);
    const detail = RunDetailSchema.parse((await agents.guest.get(`${base}/runs/${result.runs[0].id}`)).body);
    expect(detail.points).toHaveLength(120);
    expect(detail.cpUnit).toBe("J/(mol*K)");
    // Points in temperature order with consecutive indices.
    detail.points.forEach((p, i) => expect(p.index).toBe(i));
    for (let i = 1; i < detail.points.length; i++) expect(detail.points[i].temperatureK).toBeGreaterThan(detail.points[i - 1].temperatureK);
  });

  it("refuses a commit without a mapping with 400, writing nothing", async () => {
    const { t, agents, runsUrl } = await setup();
    const res = await commit(agents.researcher, runsUrl, fixture(COPPER_J), "c.csv", {});
    expect(res.status).toBe(400);
    expect(ApiErrorSchema.parse(res.body).error.details?.[0].path).toBe("mapping");
    expect(footprint(t)).toMatchObject({ runs: 0, points: 0, storedFiles: 0, files: [] });
  });

  it("answers the same bytes uploaded twice to one sample with 409 naming the first run; another sample may use them", async () => {
    const { t, agents, runsUrl, base } = await setup();
    const bytes = fixture(COPPER_J);
    const fields = { mapping: COPPER_MAPPINGS["export-j-per-k.csv"] };
    const first = RunCommitResultSchema.parse((await commit(agents.researcher, runsUrl, bytes, "a.csv", fields)).body);
    const before = footprint(t);
    const again = await commit(agents.lead, runsUrl, bytes, "renamed.csv", fields);
    expect(again.status).toBe(409);
    const err = ApiErrorSchema.parse(again.body).error;
    expect(err.code).toBe("CONFLICT");
    expect(err.details?.[0].path).toBe(`${DUPLICATE_RUN_PATH_PREFIX}${first.runs[0].id}`);
    expect(footprint(t)).toEqual(before);
    // The preview says so before anyone commits.
    const preview = RunUploadPreviewSchema.parse((await withUpload(agents.researcher.post(`${runsUrl}/preview`), bytes, "a.csv", fields)).body);
    expect(preview.file.duplicateOfRunId).toBe(first.runs[0].id);
    const other = SampleSchema.parse((await agents.researcher.post(`${base}/samples`).send({ label: "Cu-2", formula: "Cu", massMg: 25 })).body);
    const elsewhere = await commit(agents.researcher, `${base}/samples/${other.id}/runs`, bytes, "a.csv", fields);
    expect(elsewhere.status).toBe(201);
    // One stored file serves both runs.
    expect(footprint(t)).toMatchObject({ runs: 2, storedFiles: 1 });
    expect(footprint(t).files).toHaveLength(1);
  });

  it("gives the raw file back byte for byte under its original name (SHA-256 of the download equals the upload's)", async () => {
    const { agents, runsUrl, base } = await setup();
    const bytes = fixture("ingest/copper/export-uj-per-k.txt"); // UTF-8 BOM, CRLF, µ: all must survive
    const result = RunCommitResultSchema.parse(
      (await commit(agents.researcher, runsUrl, bytes, "Cu µJ export.txt", { mapping: COPPER_MAPPINGS["export-uj-per-k.txt"] })).body,
    );
    const raw = await agents.guest.get(`${base}/runs/${result.runs[0].id}/raw`).buffer(true).parse(binaryParser);
    expect(raw.status).toBe(200);
    expect(sha256(raw.body as Buffer)).toBe(sha256(bytes));
    expect((raw.body as Buffer).equals(bytes)).toBe(true);
    expect(raw.headers["content-disposition"]).toContain("attachment");
    expect(raw.headers["content-disposition"]).toContain("filename*=UTF-8''Cu%20%C2%B5J%20export.txt");
    expect(raw.headers["repr-digest"]).toBe(`sha-256=:${createHash("sha256").update(bytes).digest("base64")}:`);
  });
});

describe("masking and the reduced CSV", () => {
  async function committed() {
    const ctx = await setup({ label: "=HYPERLINK(\"http://x\")", formula: "Cu", massMg: 25 });
    const result = RunCommitResultSchema.parse(
      (await commit(ctx.agents.researcher, ctx.runsUrl, fixture(COPPER_J), "@cmd.csv", { mapping: COPPER_MAPPINGS["export-j-per-k.csv"], label: "+run one" })).body,
    );
    return { ...ctx, runUrl: `${ctx.base}/runs/${result.runs[0].id}` };
  }

  it("masks and unmasks points by index, never deleting them", async () => {
    const { t, agents, runUrl } = await committed();
    const m = await agents.researcher.patch(`${runUrl}/mask`).send({ indices: [0, 3, 3, 7], masked: true });
    expect(m.status).toBe(200);
    expect(MaskResultSchema.parse(m.body)).toMatchObject({ maskedCount: 3, changed: 3 });
    const d = RunDetailSchema.parse((await agents.guest.get(runUrl)).body);
    expect(d.points.filter((p) => p.masked).map((p) => p.index)).toEqual([0, 3, 7]);
    expect(d.maskedCount).toBe(3);
    expect(footprint(t).points).toBe(120);
    const u = MaskResultSchema.parse((await agents.lead.patch(`${runUrl}/mask`).send({ indices: [3], masked: false })).body);
    expect(u).toMatchObject({ maskedCount: 2, changed: 1 });
    const beyond = await agents.researcher.patch(`${runUrl}/mask`).send({ indices: [1, 120], masked: true });
    expect(beyond.status).toBe(400);
    expect(ApiErrorSchema.parse(beyond.body).error.details?.[0].path).toBe("indices.1");
    expect((await agents.researcher.patch(`${runUrl}/mask`).send({ indices: [], masked: true })).status).toBe(400);
    expect((await agents.researcher.patch(`${runUrl}/mask`).send({ indices: [1.5], masked: true })).status).toBe(400);
    expect((await agents.guest.patch(`${runUrl}/mask`).send({ indices: [1], masked: true })).status).toBe(403);
    expect(RunDetailSchema.parse((await agents.guest.get(runUrl)).body).maskedCount).toBe(2);
  });

  it("exports every point with its mask flag, per formula unit and per atom, with formula-like text cells neutralised", async () => {
    const { agents, runUrl } = await committed();
    await agents.researcher.patch(`${runUrl}/mask`).send({ indices: [5], masked: true }).expect(200);
    const res = await agents.guest.get(`${runUrl}/reduced.csv`);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toBe("text/csv; charset=utf-8");
    expect(res.headers["content-disposition"]).toContain("attachment");
    const lines = res.text.trimEnd().split("\n");
    const meta = lines.filter((l) => l.startsWith("#"));
    const rows = lines.filter((l) => !l.startsWith("#"));
    expect(rows[0]).toBe("index,temperature_K,cp_J_per_mol_K,cp_sigma_J_per_mol_K,cp_per_atom_J_per_mol_K,field_T,rows_averaged,source_line,masked");
    expect(rows).toHaveLength(121);
    expect(rows.filter((r) => r.endsWith(",true")).map((r) => r.split(",")[0])).toEqual(["5"]);
    // OWASP CSV injection: text cells starting with = + - @ get a leading apostrophe.
    expect(meta).toContain(`# sample,"'=HYPERLINK(""http://x"")"`);
    expect(meta).toContain("# run,'+run one");
    expect(meta).toContain("# raw file,'@cmd.csv");
    // Cu: n = 1, so per atom equals per formula unit; the first point of the file (line 9).
    const first = rows[1].split(",");
    expect(first[0]).toBe("0");
    expect(Number(first[1])).toBe(1.99918);
    expect(first[2]).toBe(first[4]);
    expect(first[7]).toBe("9");
  });
});

describe("field split", () => {
  it("splits a file with a field column into one run per field value, every row in exactly one point", async () => {
    const data = JSON.parse(fixture("ingest/clathrate-fields/data.json").toString("utf8"));
    const { t, agents, runsUrl, base } = await setup({ label: data.sample.label, formula: data.sample.formula, massMg: data.sample.massMg });
    const mapping = {
      columns: {
        temperature: "Temperature (K)",
        heatCapacity: "Total heat capacity (µJ/K)",
        sigma: "Total HC error (µJ/K)",
        field: "Field (Oe)",
        addenda: "Addenda (µJ/K)",
      },
      units: { temperature: "K", heatCapacity: "uJ/K", field: "Oe" },
    };
    const res = await commit(agents.researcher, runsUrl, fixture("ingest/clathrate-fields/fields-export.csv"), "fields-export.csv", { mapping, label: "BGG-07" });
    expect(res.status).toBe(201);
    const result = RunCommitResultSchema.parse(res.body);
    expect(result.runs.map((r) => Math.round(r.fieldT! * 10) / 10)).toEqual(data.files["fields-export.csv"].fieldsT);
    expect(result.runs.map((r) => r.label)).toEqual(["BGG-07 · 0 T", "BGG-07 · 3 T", "BGG-07 · 9 T"]);
    const fp = footprint(t);
    expect(fp).toMatchObject({ runs: 3, storedFiles: 1 });
    expect(fp.files).toHaveLength(1);
    const rowsPerField = data.files["fields-export.csv"].rowsPerField as Record<string, number>;
    for (const r of result.runs) {
      const d = RunDetailSchema.parse((await agents.guest.get(`${base}/runs/${r.id}`)).body);
      const rows = d.points.reduce((s, p) => s + p.rowsAveraged, 0);
      expect(rows).toBe(rowsPerField[String(Math.round(r.fieldT!))]);
      expect(d.siblings).toHaveLength(2);
    }
  });
});

describe("the same copper piece in four units", () => {
  it("reduces J/K, mJ/K, µJ/K and J/(g·K) exports to the same molar curve through the API", async () => {
    const { agents, runsUrl, base } = await setup();
    const curves: Record<string, { t: number; c: number }[]> = {};
    for (const name of Object.keys(COPPER_MAPPINGS) as (keyof typeof COPPER_MAPPINGS)[]) {
      const res = await commit(agents.researcher, runsUrl, fixture(`ingest/copper/${name}`), name, { mapping: COPPER_MAPPINGS[name] });
      expect(res.status, name).toBe(201);
      const run = RunCommitResultSchema.parse(res.body).runs[0];
      const d = RunDetailSchema.parse((await agents.guest.get(`${base}/runs/${run.id}`)).body);
      curves[name] = d.points.map((p) => ({ t: p.temperatureK, c: p.cp }));
    }
    const reference = curves["export-j-per-k.csv"];
    expect(reference).toHaveLength(120);
    for (const [name, curve] of Object.entries(curves)) {
      expect(curve).toHaveLength(reference.length);
      curve.forEach((p, i) => {
        expect(p.t).toBe(reference[i].t);
        // Each file's numbers are rounded to 7 significant digits on their own (fixtures/ingest/copper/data.json,
        // "digits": 7), so two files agree to within two half-units of the 7th digit: 1e-6 relative.
        expectClose(p.c, reference[i].c, { rel: 1e-6 }, `${name} at ${p.t} K`);
      });
    }
  });
});

describe("addenda runs", () => {
  // Worked example. Addenda linear in T: A(T) = (0.1·T − 0.1) µJ/K with σ_A(T) = 0.001·T µJ/K. With equal
  // secants, the monotone cubic (Fritsch & Carlson 1980) has every slope equal to the secant and reproduces
  // a straight line exactly, so the interpolated addenda at 3, 5, 7, 9 K are 0.2, 0.4, 0.6, 0.8 µJ/K.
  const addendaCsv = "Temperature (K),Heat capacity (uJ/K),Uncertainty (uJ/K)\n2,0.10,0.002\n4,0.30,0.004\n6,0.50,0.006\n8,0.70,0.008\n10,0.90,0.010\n";
  const sampleCsv = "T (K),C (uJ/K),dC (uJ/K)\n5,2.40,0.040\n3,1.20,0.030\n7,3.60,0.050\n9,5.00,0.060\n12,8.00,0.080\n";
  const addendaMapping = {
    columns: { temperature: "Temperature (K)", heatCapacity: "Heat capacity (uJ/K)", sigma: "Uncertainty (uJ/K)" },
    units: { temperature: "K", heatCapacity: "uJ/K" },
  };
  const sampleMapping = {
    columns: { temperature: "T (K)", heatCapacity: "C (uJ/K)", sigma: "dC (uJ/K)" },
    units: { temperature: "K", heatCapacity: "uJ/K" },
  };

  it("subtracts an attached addenda run after interpolation, combines σ in quadrature, masks points outside its range", async () => {
    // M = 63.546 g/mol (set by hand so the example is exact), m = 25 mg: 1 µJ/K is 1e-6 · 63.546 / 0.025 = 2.54184e-3 J/(mol·K).
    const { t, agents, base, runsUrl } = await setup({
      label: "Cu-worked",
      formula: "Cu",
      massMg: 25,
      molarMassGPerMol: 63.546,
      molarMassOverrideReason: "IUPAC abridged value, for a worked example",
    });
    const a = await commit(agents.researcher, `${base}/addenda-runs`, Buffer.from(addendaCsv), "platform-P1.csv", { mapping: addendaMapping, platform: "P-1" });
    expect(a.status).toBe(201);
    const addenda = RunCommitResultSchema.parse(a.body).runs[0];
    expect(addenda).toMatchObject({ kind: "addenda", platform: "P-1", sampleId: null, pointCount: 5 });
    const addendaDetail = RunDetailSchema.parse((await agents.guest.get(`${base}/runs/${addenda.id}`)).body);
    expect(addendaDetail.cpUnit).toBe("J/K");
    expectClose(addendaDetail.points[2].cp, 0.5e-6, { rel: 1e-12 }, "addenda at 6 K in J/K");
    const listed = await agents.guest.get(`${base}/addenda-runs`).query({ platform: "P-1" });
    expect(listed.body.map((r: { id: string }) => r.id)).toEqual([addenda.id]);

    const res = await commit(agents.researcher, runsUrl, Buffer.from(sampleCsv), "worked.csv", { mapping: sampleMapping, addendaRunId: addenda.id });
    expect(res.status).toBe(201);
    const run = RunCommitResultSchema.parse(res.body).runs[0];
    expect(run.addendaRunId).toBe(addenda.id);
    const d = RunDetailSchema.parse((await agents.guest.get(`${base}/runs/${run.id}`)).body);
    const f = 2.54184e-3;
    // (C − A) · f and hypot(σ_C, σ_A) · f, by hand:
    const expected = [
      { t: 3, c: (1.2 - 0.2) * f, s: Math.hypot(0.03, 0.003) * f, masked: false },
      { t: 5, c: (2.4 - 0.4) * f, s: Math.hypot(0.04, 0.005) * f, masked: false },
      { t: 7, c: (3.6 - 0.6) * f, s: Math.hypot(0.05, 0.007) * f, masked: false },
      { t: 9, c: (5.0 - 0.8) * f, s: Math.hypot(0.06, 0.009) * f, masked: false },
      // 12 K lies beyond the addenda's 10 K: kept uncorrected and masked, never dropped.
      { t: 12, c: 8.0 * f, s: 0.08 * f, masked: true },
    ];
    expect(d.points).toHaveLength(5);
    d.points.forEach((p, i) => {
      expect(p.temperatureK).toBe(expected[i].t);
      expectClose(p.cp, expected[i].c, { rel: 1e-12 }, `C at ${p.temperatureK} K`);
      expectClose(p.cpSigma!, expected[i].s, { rel: 1e-12 }, `σ at ${p.temperatureK} K`);
      expect(p.masked).toBe(expected[i].masked);
    });
    // 2.00 µJ/K · 2.54184e-3 = 5.08368e-3 J/(mol·K) at 5 K, written out once as a plain number.
    expectClose(d.points[1].cp, 5.08368e-3, { rel: 1e-12 }, "5 K");
    expect(d.maskedCount).toBe(1);
    expect(d.warnings.some((w) => /addenda/i.test(w))).toBe(true);
    expect(footprint(t)).toMatchObject({ runs: 2, points: 10, storedFiles: 2 });
  });

  it("refuses an addenda run in a specific unit (422) and an unknown addenda id (404), writing nothing", async () => {
    const { t, agents, base, runsUrl } = await setup();
    const specific = await commit(agents.researcher, `${base}/addenda-runs`, Buffer.from(addendaCsv), "a.csv", {
      mapping: { ...addendaMapping, units: { temperature: "K", heatCapacity: "J/(g*K)" } },
      platform: "P-1",
    });
    expect(specific.status).toBe(422);
    expect(ApiErrorSchema.parse(specific.body).error.code).toBe("UNPROCESSABLE");
    const noPlatform = await commit(agents.researcher, `${base}/addenda-runs`, Buffer.from(addendaCsv), "a.csv", { mapping: addendaMapping });
    expect(noPlatform.status).toBe(400);
    expect(ApiErrorSchema.parse(noPlatform.body).error.details?.[0].path).toBe("platform");
    const unknown = await commit(agents.researcher, runsUrl, Buffer.from(sampleCsv), "s.csv", { mapping: sampleMapping, addendaRunId: "no-such-run" });
    expect(unknown.status).toBe(404);
    expect(ApiErrorSchema.parse(unknown.body).error.details?.[0].path).toBe("addendaRunId");
    expect(footprint(t)).toMatchObject({ runs: 0, points: 0, storedFiles: 0, files: [] });
  });

  it("refuses subtracting an addenda run from a specific-unit run with 422", async () => {
    const { t, agents, base, runsUrl } = await setup();
    const addenda = RunCommitResultSchema.parse(
      (await commit(agents.researcher, `${base}/addenda-runs`, Buffer.from(addendaCsv), "a.csv", { mapping: addendaMapping, platform: "P-1" })).body,
    ).runs[0];
    const before = footprint(t);
    const res = await commit(agents.researcher, runsUrl, fixture("ingest/copper/export-j-per-g-k.dat"), "g.dat", {
      mapping: COPPER_MAPPINGS["export-j-per-g-k.dat"],
      addendaRunId: addenda.id,
    });
    expect(res.status).toBe(422);
    expect(footprint(t)).toEqual(before);
  });
});

describe("bad input gets a clear answer and changes nothing", () => {
  const twoColumns = { columns: { temperature: "T (K)", heatCapacity: "C (J/K)" }, units: { temperature: "K", heatCapacity: "J/K" } };
  const body = (rows: string) => Buffer.from(`T (K),C (J/K)\n${rows}`);
  const cases: { name: string; bytes: Buffer; mapping?: unknown; status: number; line?: number; column?: string; path?: string }[] = [
    { name: "empty file", bytes: Buffer.alloc(0), status: 400, path: "file" },
    { name: "only blank lines", bytes: Buffer.from("\n\n  \n"), status: 400 },
    { name: "binary file", bytes: Buffer.from([0x50, 0x4b, 0x03, 0x04, 0x00, 0x00, 0x14, 0x00, 0x08, 0x00, 0xff, 0xfe, 0x00]), status: 400, line: 1 },
    { name: "no numeric rows", bytes: Buffer.from("a calorimeter log\nnothing numeric here\nat all\n"), status: 400 },
    { name: "a header but no data", bytes: body(""), status: 400, line: 1 },
    { name: "ragged rows", bytes: body("2,1e-6\n3,2e-6\n4,3e-6,9\n5,4e-6\n"), status: 400, line: 4 },
    { name: "text in a numeric column", bytes: body("2,1e-6\n3,abc\n4,3e-6\n5,4e-6\n"), status: 400, line: 3, column: "C (J/K)" },
    { name: "NaN", bytes: body("2,1e-6\n3,NaN\n4,3e-6\n5,4e-6\n"), status: 400, line: 3, column: "C (J/K)" },
    { name: "Infinity", bytes: body("2,1e-6\n3,2e-6\n4,Infinity\n5,4e-6\n"), status: 400, line: 4, column: "C (J/K)" },
    { name: "zero temperature", bytes: body("2,1e-6\n0,2e-6\n4,3e-6\n5,4e-6\n"), status: 400, line: 3, column: "T (K)" },
    { name: "negative temperature", bytes: body("2,1e-6\n3,2e-6\n-4,3e-6\n5,4e-6\n"), status: 400, line: 4, column: "T (K)" },
    {
      name: "an unknown unit",
      bytes: body("2,1e-6\n3,2e-6\n4,3e-6\n"),
      mapping: { ...twoColumns, units: { temperature: "K", heatCapacity: "BTU/K" } },
      status: 400,
      path: "mapping.units.heatCapacity",
    },
    {
      name: "a mapping naming a missing column",
      bytes: body("2,1e-6\n3,2e-6\n4,3e-6\n"),
      mapping: { ...twoColumns, columns: { temperature: "Temp", heatCapacity: "C (J/K)" } },
      status: 400,
      line: 1,
      column: "Temp",
    },
    { name: "a mapping that is not JSON", bytes: body("2,1e-6\n3,2e-6\n4,3e-6\n"), mapping: "{columns:", status: 400, path: "mapping" },
  ];

  for (const c of cases) {
    it(`refuses ${c.name} with ${c.status}${c.line ? ` naming line ${c.line}` : ""}${c.column ? ` and column '${c.column}'` : ""}`, async () => {
      const { t, agents, runsUrl } = await setup();
      const before = footprint(t);
      for (const url of [`${runsUrl}/preview`, runsUrl]) {
        const res = await withUpload(agents.researcher.post(url), c.bytes, "bad.csv", { mapping: c.mapping ?? twoColumns });
        expect(res.status, `${url}: ${JSON.stringify(res.body)}`).toBe(c.status);
        const err = ApiErrorSchema.parse(res.body).error;
        expect(err.code).toBe("VALIDATION_FAILED");
        const d = err.details?.[0];
        if (c.line !== undefined) {
          expect(d?.line).toBe(c.line);
          expect(err.message).toContain(`line ${c.line}`);
        }
        if (c.column !== undefined) expect(d?.column).toBe(c.column);
        if (c.path !== undefined) expect(d?.path).toBe(c.path);
      }
      expect(footprint(t)).toEqual(before);
      expect(before.files).toEqual([]);
    });
  }

  it("refuses a request without a file, and one with two files, with 400", async () => {
    const { t, agents, runsUrl } = await setup();
    const none = await agents.researcher.post(runsUrl).field("mapping", JSON.stringify(twoColumns));
    expect(none.status).toBe(400);
    expect(ApiErrorSchema.parse(none.body).error.details?.[0].path).toBe("file");
    const two = await agents.researcher
      .post(runsUrl)
      .field("mapping", JSON.stringify(twoColumns))
      .attach("file", body("2,1\n3,2\n4,3\n"), "a.csv")
      .attach("file", body("2,1\n3,2\n5,3\n"), "b.csv");
    expect(two.status).toBe(400);
    const json = await agents.researcher.post(runsUrl).send({ mapping: twoColumns });
    expect(json.status).toBe(400);
    expect(footprint(t)).toMatchObject({ runs: 0, storedFiles: 0, files: [] });
  });

  it("refuses a file over 20 MB with 413 PAYLOAD_TOO_LARGE", async () => {
    const { t, agents, runsUrl } = await setup();
    const line = "12.345678,0.000123456789\n";
    const big = Buffer.from("T (K),C (J/K)\n" + line.repeat(Math.ceil((20 * 1024 * 1024) / line.length) + 10));
    expect(big.byteLength).toBeGreaterThan(20 * 1024 * 1024);
    const res = await withUpload(agents.researcher.post(runsUrl), big, "big.csv", { mapping: twoColumns });
    expect(res.status).toBe(413);
    expect(ApiErrorSchema.parse(res.body).error.code).toBe("PAYLOAD_TOO_LARGE");
    expect(footprint(t)).toMatchObject({ runs: 0, points: 0, storedFiles: 0, files: [] });
  });

  it("refuses an upload cut off mid-stream with 400, and a dropped connection leaves nothing", async () => {
    const { t, agents, runsUrl, users } = await setup();
    const { createServer } = await import("node:http");
    const server = createServer(t.app);
    await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
    const port = (server.address() as { port: number }).port;
    const cookie = await sessionCookie(t, users.researcher.id);
    const boundary = "----thetafold-cut";
    const full = Buffer.from(
      `--${boundary}\r\nContent-Disposition: form-data; name="mapping"\r\n\r\n${JSON.stringify(twoColumns)}\r\n` +
        `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="cut.csv"\r\nContent-Type: text/csv\r\n\r\n` +
        `T (K),C (J/K)\n${"3,2e-6\n".repeat(2000)}\r\n--${boundary}--\r\n`,
    );
    const partial = full.subarray(0, Math.floor(full.length / 2));
    const { request } = await import("node:http");
    // (a) The body ends (chunked) before the form does.
    const answered = await new Promise<{ status: number; body: string }>((resolve, reject) => {
      const req = request(
        { host: "127.0.0.1", port, method: "POST", path: runsUrl, headers: { Cookie: cookie, "Content-Type": `multipart/form-data; boundary=${boundary}`, "Transfer-Encoding": "chunked" } },
        (res) => {
          let text = "";
          res.on("data", (d) => (text += d));
          res.on("end", () => resolve({ status: res.statusCode ?? 0, body: text }));
        },
      );
      req.on("error", reject);
      req.end(partial);
    });
    expect(answered.status).toBe(400);
    expect(ApiErrorSchema.parse(JSON.parse(answered.body)).error.code).toBe("VALIDATION_FAILED");
    // (b) The connection drops midway: no answer can arrive, and nothing may be stored.
    await new Promise<void>((resolve) => {
      const req = request({
        host: "127.0.0.1",
        port,
        method: "POST",
        path: runsUrl,
        headers: { Cookie: cookie, "Content-Type": `multipart/form-data; boundary=${boundary}`, "Content-Length": String(full.length) },
      });
      req.on("error", () => resolve());
      req.write(partial, () => setTimeout(() => req.destroy(), 50));
      setTimeout(resolve, 500);
    });
    await new Promise((r) => setTimeout(r, 200));
    expect(footprint(t)).toMatchObject({ runs: 0, points: 0, storedFiles: 0, files: [] });
    await new Promise<void>((r) => server.close(() => r()));
    void agents;
  });

  it("leaves no orphan file and no partial run when the commit transaction fails", async () => {
    const { t, agents, runsUrl } = await setup();
    // Make the database refuse the 50th point mid-transaction.
    t.db.$client.exec("CREATE TRIGGER refuse_point BEFORE INSERT ON run_points WHEN NEW.idx = 50 BEGIN SELECT RAISE(ABORT, 'refused for the test'); END;");
    const errors: unknown[] = [];
    const original = console.error;
    console.error = (...a: unknown[]) => void errors.push(a);
    try {
      const res = await commit(agents.researcher, runsUrl, fixture(COPPER_J), "c.csv", { mapping: COPPER_MAPPINGS["export-j-per-k.csv"] });
      expect(res.status).toBe(500);
      expect(ApiErrorSchema.parse(res.body).error.code).toBe("INTERNAL");
    } finally {
      console.error = original;
    }
    expect(errors.length).toBeGreaterThan(0);
    expect(footprint(t)).toMatchObject({ runs: 0, points: 0, storedFiles: 0, files: [] });
    // With the fault gone the same upload goes through.
    t.db.$client.exec("DROP TRIGGER refuse_point");
    expect((await commit(agents.researcher, runsUrl, fixture(COPPER_J), "c.csv", { mapping: COPPER_MAPPINGS["export-j-per-k.csv"] })).status).toBe(201);
  });

  it("keeps a file another run still uses when a later commit of the same bytes fails", async () => {
    const { t, agents, runsUrl, base } = await setup();
    const bytes = fixture(COPPER_J);
    await commit(agents.researcher, runsUrl, bytes, "c.csv", { mapping: COPPER_MAPPINGS["export-j-per-k.csv"] }).expect(201);
    const other = SampleSchema.parse((await agents.researcher.post(`${base}/samples`).send({ label: "Cu-2", formula: "Cu", massMg: 25 })).body);
    t.db.$client.exec("CREATE TRIGGER refuse_point BEFORE INSERT ON run_points WHEN NEW.idx = 50 BEGIN SELECT RAISE(ABORT, 'refused for the test'); END;");
    const original = console.error;
    console.error = () => {};
    try {
      expect((await commit(agents.researcher, `${base}/samples/${other.id}/runs`, bytes, "c.csv", { mapping: COPPER_MAPPINGS["export-j-per-k.csv"] })).status).toBe(500);
    } finally {
      console.error = original;
    }
    expect(footprint(t)).toMatchObject({ runs: 1, points: 120, storedFiles: 1 });
    expect(footprint(t).files).toHaveLength(1);
  });

  it("deleting a sample removes its runs and the raw files nothing else uses", async () => {
    const { t, agents, runsUrl, base, sample } = await setup();
    await commit(agents.researcher, runsUrl, fixture(COPPER_J), "c.csv", { mapping: COPPER_MAPPINGS["export-j-per-k.csv"] }).expect(201);
    expect(footprint(t).files).toHaveLength(1);
    expect((await agents.lead.delete(`${base}/samples/${sample.id}`)).status).toBe(204);
    expect(footprint(t)).toMatchObject({ runs: 0, points: 0, storedFiles: 0, files: [] });
  });
});

async function sessionCookie(t: TestApp, userId: string): Promise<string> {
  const { createLucia } = await import("../../server/auth/lucia");
  const lucia = createLucia(t.db, false);
  const session = await lucia.createSession(userId, {});
  return lucia.createSessionCookie(session.id).serialize().split(";")[0];
}

describe("run routes role matrix", () => {
  it("anonymous 401; guest reads and downloads but gets 403 on uploads and masks; outsider and admin-not-member 404", async () => {
    const { t, agents, runsUrl, base } = await setup();
    const bytes = fixture(COPPER_J);
    const mapping = COPPER_MAPPINGS["export-j-per-k.csv"];
    const run = RunCommitResultSchema.parse((await commit(agents.lead, runsUrl, bytes, "c.csv", { mapping })).body).runs[0];
    const runUrl = `${base}/runs/${run.id}`;
    const other = Buffer.concat([bytes, Buffer.from("\n")]);
    const reads: [string, (a: Agent) => ReturnType<Agent["get"]>][] = [
      ["list runs", (a) => a.get(runsUrl)],
      ["run", (a) => a.get(runUrl)],
      ["raw", (a) => a.get(`${runUrl}/raw`)],
      ["reduced.csv", (a) => a.get(`${runUrl}/reduced.csv`)],
      ["addenda list", (a) => a.get(`${base}/addenda-runs`)],
    ];
    const writes: [string, (a: Agent) => ReturnType<Agent["post"]>][] = [
      ["preview", (a) => withUpload(a.post(`${runsUrl}/preview`), other, "o.csv", { mapping })],
      ["commit", (a) => withUpload(a.post(runsUrl), other, "o.csv", { mapping })],
      ["mask", (a) => a.patch(`${runUrl}/mask`).send({ indices: [1], masked: true })],
      ["addenda preview", (a) => withUpload(a.post(`${base}/addenda-runs/preview`), other, "o.csv", { mapping, platform: "P" })],
      ["addenda commit", (a) => withUpload(a.post(`${base}/addenda-runs`), other, "o.csv", { mapping, platform: "P" })],
    ];
    for (const [name, call] of [...reads, ...writes]) {
      expect((await call(agents.anonymous)).status, `anonymous ${name}`).toBe(401);
      expect((await call(agents.outsider)).status, `outsider ${name}`).toBe(404);
      expect((await call(agents.admin)).status, `admin ${name}`).toBe(404);
    }
    for (const [name, call] of reads) expect((await call(agents.guest)).status, `guest ${name}`).toBe(200);
    for (const [name, call] of writes) expect((await call(agents.guest)).status, `guest ${name}`).toBe(403);
    expect(footprint(t)).toMatchObject({ runs: 1, storedFiles: 1 });
    expect((await writes[0][1](agents.researcher)).status).toBe(200);
    expect((await writes[1][1](agents.researcher)).status).toBe(201);
    expect((await writes[2][1](agents.researcher)).status).toBe(200);
    expect((await writes[4][1](agents.lead)).status).toBe(201);
    // A run of lab A named under lab B's URL is not found for B's members either.
    const { otherLab } = await seedRolesLabOf(t);
    expect((await agents.outsider.get(`/api/labs/${otherLab}/runs/${run.id}`)).status).toBe(404);
  });
});

async function seedRolesLabOf(t: TestApp) {
  const row = t.db.$client.prepare("select lab_id as labId from memberships m join users u on u.id = m.user_id where u.email = 'lead-b@example.org'").get() as { labId: string };
  return { otherLab: row.labId };
}
