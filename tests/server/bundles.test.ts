import { createHash } from "node:crypto";
import { readFileSync, writeFileSync } from "node:fs";
import { eq } from "drizzle-orm";
import { strFromU8, unzipSync, zipSync } from "fflate";
import { beforeAll, describe, expect, it } from "vitest";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { BundleListSchema, BundleSchema, BundleStreamLineSchema, type Bundle } from "@shared/schemas/bundles";
import { auditLog, runs } from "../../server/db/schema";
import { verifyBagZip } from "../../server/services/bagit";
import { storedFilePath } from "../../server/services/files";
import { makeTestApp, seedRoles, type TestApp } from "../helpers/app";
import { addBatch, addSampleWithFits, binary, debyeParams, seedSeries } from "./compare-fixtures";

const sha256 = (b: Uint8Array) => createHash("sha256").update(b).digest("hex");

let t: TestApp;
let cast: Awaited<ReturnType<typeof seedRoles>>;
let series: ReturnType<typeof seedSeries>;
let base: string;
let comparisonId: string;
let built: Bundle;
let zip: Buffer;

beforeAll(async () => {
  t = makeTestApp();
  cast = await seedRoles(t);
  series = seedSeries(t.db, t.dataDir, cast.lab.id, cast.users.lead.id);
  base = `/api/labs/${cast.lab.id}`;
  const saved = await cast.agents.lead
    .post(`${base}/comparisons`)
    .send({ name: "A and B", selection: { batchIds: [series.batchA, series.batchB], sampleIds: [] }, parameter: "thetaD", groupBy: "batch" });
  comparisonId = saved.body.id;
  const res = await cast.agents.researcher
    .post(`${base}/bundles`)
    .send({ name: "Series A–B for the phonon paper", comparisonId, sampleIds: [series.c1.sampleId] });
  expect(res.status).toBe(201);
  built = BundleSchema.parse(res.body);
  const dl = await binary(cast.agents.guest.get(`${base}/bundles/${built.id}/download`));
  expect(dl.status).toBe(200);
  zip = dl.body as Buffer;
});

/** The bag's files keyed by path inside the bag (base folder stripped), read with fflate. */
function bagFiles(bytes: Uint8Array): { base: string; files: Map<string, Uint8Array> } {
  const all = unzipSync(bytes);
  const names = Object.keys(all).filter((n) => !n.endsWith("/"));
  const tops = new Set(names.map((n) => n.split("/")[0]));
  expect(tops.size).toBe(1); // RFC 8493 §4.2: one top-level folder, the bag's base directory
  const base = [...tops][0];
  return { base, files: new Map(names.map((n) => [n.slice(base.length + 1), all[n]])) };
}

function manifestLines(text: string): { checksum: string; path: string }[] {
  return text
    .split("\n")
    .filter((l) => l !== "")
    .map((l) => {
      const m = /^([0-9a-f]{64})[ \t]+(.+)$/.exec(l);
      expect(m, `manifest line "${l}"`).not.toBeNull();
      return { checksum: m![1], path: m![2] };
    });
}

describe("a bundle built through the API is a valid BagIt 1.0 bag (RFC 8493), read with fflate", () => {
  it("has bagit.txt exactly as RFC 8493 §2.1.1 gives it", () => {
    const { files } = bagFiles(zip);
    expect(strFromU8(files.get("bagit.txt")!)).toBe("BagIt-Version: 1.0\nTag-File-Character-Encoding: UTF-8\n");
  });

  it("lists every payload file in manifest-sha256.txt with a matching SHA-256, and nothing else (§2.1.3, §3)", () => {
    const { files } = bagFiles(zip);
    const lines = manifestLines(strFromU8(files.get("manifest-sha256.txt")!));
    const payload = [...files.keys()].filter((p) => p.startsWith("data/")).sort();
    expect(lines.map((l) => l.path).sort()).toEqual(payload);
    for (const l of lines) expect(sha256(files.get(l.path)!), l.path).toBe(l.checksum);
    expect(built.contents.map((c) => c.path).sort()).toEqual(payload);
  });

  it("lists the tag files in tagmanifest-sha256.txt with matching SHA-256 (§2.2.1)", () => {
    const { files } = bagFiles(zip);
    const lines = manifestLines(strFromU8(files.get("tagmanifest-sha256.txt")!));
    expect(lines.map((l) => l.path).sort()).toEqual(["bag-info.txt", "bagit.txt", "manifest-sha256.txt"]);
    for (const l of lines) expect(sha256(files.get(l.path)!), l.path).toBe(l.checksum);
  });

  it("declares a Payload-Oxum equal to the payload's bytes and file count, and the bag-info elements (§2.2.2)", () => {
    const { files } = bagFiles(zip);
    const info = strFromU8(files.get("bag-info.txt")!);
    const payload = [...files.entries()].filter(([p]) => p.startsWith("data/"));
    const octets = payload.reduce((a, [, b]) => a + b.byteLength, 0);
    expect(info).toMatch(new RegExp(`^Payload-Oxum: ${octets}\\.${payload.length}$`, "m"));
    for (const label of ["Source-Organization", "Contact-Email", "External-Description", "Bagging-Date", "Bag-Size"]) {
      expect(info, label).toMatch(new RegExp(`^${label}: \\S`, "m"));
    }
    expect(info).toMatch(/^Bagging-Date: \d{4}-\d{2}-\d{2}$/m);
  });

  it("passes the app's own checker too", () => {
    const r = verifyBagZip(zip);
    expect(r.failures).toEqual([]);
    expect(r.valid).toBe(true);
    expect(r.payloadOxum?.matches).toBe(true);
  });

  it("keeps each raw file byte for byte, and reduced tables keep masked points with their flag", () => {
    const { files } = bagFiles(zip);
    const rawPaths = [...files.keys()].filter((p) => p.startsWith("data/raw/"));
    // Batches A (4 samples) and B (2) from the comparison, plus C1: seven runs.
    expect(rawPaths).toHaveLength(7);
    const stored = t.db.select({ sha: runs.fileSha256 }).from(runs).all().map((r) => r.sha);
    for (const p of rawPaths) expect(stored).toContain(sha256(files.get(p)!));
    const reduced = [...files.keys()].filter((p) => p.startsWith("data/reduced/"));
    expect(reduced).toHaveLength(7);
    const lines = strFromU8(files.get(reduced[0])!).trimEnd().split("\n");
    const header = lines[0].split(",");
    expect(header).toContain("masked");
    const masked = lines.slice(1).map((l) => l.split(",")[header.indexOf("masked")]);
    expect(masked.filter((m) => m === "true")).toHaveLength(1);
    expect(masked.filter((m) => m === "false")).toHaveLength(11);
  });

  it("describes each approved fit in JSON (model, window, parameters, covariance, χ², version, input SHA-256) and leaves the draft out", () => {
    const { files } = bagFiles(zip);
    const fitFiles = [...files.keys()].filter((p) => p.startsWith("data/fits/"));
    expect(fitFiles).toHaveLength(7);
    const docs = fitFiles.map((p) => JSON.parse(strFromU8(files.get(p)!)));
    expect(docs.map((d) => d.fitId)).not.toContain(series.b2.fitIds[1]);
    for (const d of docs) {
      expect(d.state).toBe("approved");
      expect(d.model.components.length).toBeGreaterThan(0);
      expect(d.window.minK).toBeLessThan(d.window.maxK);
      expect(d.parameters.length).toBeGreaterThan(0);
      expect(Array.isArray(d.covariance)).toBe(true);
      expect(typeof d.chiSquare).toBe("number");
      expect(d.softwareVersion).toBe("0.1.0");
      expect(d.inputSha256).toMatch(/^[0-9a-f]{64}$/);
      expect(files.has(`data/${d.run.reducedTable}`)).toBe(true);
      expect(files.has(`data/${d.run.rawFile}`)).toBe(true);
    }
    expect(files.has("data/tables/comparison.csv")).toBe(true);
    const readme = strFromU8(files.get("data/README.txt")!);
    for (const word of ["Debye", "Einstein", "Schottky", "gamma T", "beta T^3", "Chebyshev", "Re-computing a fit", "research data"]) {
      expect(readme, word).toContain(word);
    }
  });
});

describe("datapackage.json has what the Frictionless Data Package v1 spec requires", () => {
  // https://specs.frictionlessdata.io/data-package/ (resources: required, non-empty array); data-resource
  // (name: required, lower-case alphanumeric with - . _; path or data required); table-schema (fields,
  // each with a name; type from the listed types); tabular-data-package (every resource tabular).
  const TYPES = ["string", "number", "integer", "boolean", "object", "array", "date", "time", "datetime", "year", "yearmonth", "duration", "geopoint", "geojson", "any"];

  it("names each resource, points it at a file in the bag, and gives each field a name and a valid type", () => {
    const { files } = bagFiles(zip);
    const pkg = JSON.parse(strFromU8(files.get("data/datapackage.json")!));
    expect(pkg.profile).toBe("tabular-data-package");
    expect(pkg.name).toMatch(/^[a-z0-9._-]+$/);
    expect(Array.isArray(pkg.resources)).toBe(true);
    expect(pkg.resources.length).toBeGreaterThan(0);
    const names = new Set<string>();
    for (const r of pkg.resources) {
      expect(r.name).toMatch(/^[a-z0-9._-]+$/);
      expect(names.has(r.name)).toBe(false);
      names.add(r.name);
      expect(typeof r.path === "string" || r.data !== undefined).toBe(true);
      expect(r.profile).toBe("tabular-data-resource");
      expect(files.has(`data/${r.path}`), r.path).toBe(true);
      expect(Array.isArray(r.schema.fields)).toBe(true);
      for (const fld of r.schema.fields) {
        expect(typeof fld.name).toBe("string");
        expect(TYPES).toContain(fld.type);
      }
      // The table's header is exactly the schema's field names, in order.
      const header = strFromU8(files.get(`data/${r.path}`)!).split("\n")[0].split(",");
      expect(header, r.path).toEqual(r.schema.fields.map((x: { name: string }) => x.name));
    }
    expect([...names]).toEqual(expect.arrayContaining(["samples", "runs", "fits", "fit-parameters", "comparison"]));
  });
});

describe("tampering", () => {
  it("verify reports the one payload file whose byte was changed", () => {
    const all = unzipSync(zip);
    const target = Object.keys(all).find((n) => n.includes("/data/tables/samples.csv"))!;
    const bytes = new Uint8Array(all[target]);
    bytes[bytes.length - 2] ^= 0x01;
    all[target] = bytes;
    const r = verifyBagZip(zipSync(all));
    expect(r.valid).toBe(false);
    expect(r.failures).toEqual([{ path: "data/tables/samples.csv", problem: "checksum does not match manifest-sha256.txt" }]);
  });

  it("verify reports a file missing from the payload, one not in the manifest, and a wrong Payload-Oxum", () => {
    const all = unzipSync(zip);
    const base = Object.keys(all)[0].split("/")[0];
    const readme = `${base}/data/README.txt`;
    delete all[readme];
    all[`${base}/data/extra.txt`] = new TextEncoder().encode("not listed");
    const r = verifyBagZip(zipSync(all));
    expect(r.valid).toBe(false);
    const problems = r.failures.map((f) => `${f.path}: ${f.problem}`);
    expect(problems).toContain("data/README.txt: listed in manifest-sha256.txt but missing from the bag");
    expect(problems).toContain("data/extra.txt: payload file not listed in manifest-sha256.txt");
    expect(problems.some((p) => p.startsWith("bag-info.txt: Payload-Oxum"))).toBe(true);
  });

  it("verify reports a changed tag file through the tag manifest", () => {
    const all = unzipSync(zip);
    const base = Object.keys(all)[0].split("/")[0];
    all[`${base}/bag-info.txt`] = new TextEncoder().encode(strFromU8(all[`${base}/bag-info.txt`]).replace("Contact-Name", "Contact-Nam3"));
    const r = verifyBagZip(zipSync(all));
    expect(r.failures).toEqual([{ path: "bag-info.txt", problem: "checksum does not match tagmanifest-sha256.txt" }]);
  });

  it("the download refuses a stored zip with one changed byte, and logs it", async () => {
    const t2 = makeTestApp();
    const c2 = await seedRoles(t2);
    const s = seedSeries(t2.db, t2.dataDir, c2.lab.id, c2.users.lead.id);
    const res = await c2.agents.lead.post(`/api/labs/${c2.lab.id}/bundles`).send({ name: "to tamper", sampleIds: [s.a[0].sampleId] });
    expect(res.status).toBe(201);
    const file = storedFilePath(t2.dataDir, res.body.fileSha256);
    const bytes = readFileSync(file);
    bytes[Math.floor(bytes.length / 2)] ^= 0xff;
    writeFileSync(file, bytes);
    const dl = await c2.agents.guest.get(`/api/labs/${c2.lab.id}/bundles/${res.body.id}/download`);
    expect(dl.status).toBe(500);
    expect(ApiErrorSchema.parse(dl.body).error.code).toBe("INTERNAL");
    const logged = t2.db.select().from(auditLog).where(eq(auditLog.action, "bundle.integrity_failed")).all();
    expect(logged).toHaveLength(1);
    expect(logged[0].details).toMatchObject({ bundleId: res.body.id, expected: res.body.fileSha256 });
  });
});

describe("a corrupted raw file", () => {
  it("stops the build with 500, records nothing and logs it", async () => {
    const t2 = makeTestApp();
    const c2 = await seedRoles(t2);
    const s = seedSeries(t2.db, t2.dataDir, c2.lab.id, c2.users.lead.id);
    writeFileSync(storedFilePath(t2.dataDir, s.a[0].rawSha256), "changed on disk");
    const res = await c2.agents.lead.post(`/api/labs/${c2.lab.id}/bundles`).send({ name: "broken", sampleIds: [s.a[0].sampleId] });
    expect(res.status).toBe(500);
    expect(ApiErrorSchema.parse(res.body).error.message).toMatch(/no longer matches its SHA-256/);
    expect((await c2.agents.lead.get(`/api/labs/${c2.lab.id}/bundles`)).body).toEqual([]);
    expect(t2.db.select().from(auditLog).where(eq(auditLog.action, "bundle.integrity_failed")).all()).toHaveLength(1);
  });
});

describe("reproducibility", () => {
  it("two builds of the same selection have the same payload manifest (and, on one day, the same zip)", async () => {
    const body = { name: "Batch A again", sampleIds: series.a.map((x) => x.sampleId), fitIds: [series.a[0].fitIds[0]] };
    const one = BundleSchema.parse((await cast.agents.lead.post(`${base}/bundles`).send(body)).body);
    const two = BundleSchema.parse((await cast.agents.lead.post(`${base}/bundles`).send({ ...body, sampleIds: [...body.sampleIds].reverse() })).body);
    // Built by someone else: bag-info.txt names another contact, the payload stays the same.
    const three = BundleSchema.parse((await cast.agents.researcher.post(`${base}/bundles`).send(body)).body);
    expect(two.id).not.toBe(one.id);
    expect(two.payloadManifestSha256).toBe(one.payloadManifestSha256);
    expect(three.payloadManifestSha256).toBe(one.payloadManifestSha256);
    const m1 = strFromU8(bagFiles(readFileSync(storedFilePath(t.dataDir, one.fileSha256))).files.get("manifest-sha256.txt")!);
    const m3 = strFromU8(bagFiles(readFileSync(storedFilePath(t.dataDir, three.fileSha256))).files.get("manifest-sha256.txt")!);
    expect(m3).toBe(m1);
    expect(two.fileSha256).toBe(one.fileSha256);
    expect(three.fileSha256).not.toBe(one.fileSha256);
    // Every zip entry carries the same fixed time stamp, taken from the data, not the clock.
    const dates = new Set<string>();
    const raw = readFileSync(storedFilePath(t.dataDir, one.fileSha256));
    for (let i = 0; i + 4 < raw.length; i++) {
      if (raw.readUInt32LE(i) === 0x04034b50) dates.add(raw.readUInt32LE(i + 10).toString(16));
    }
    expect(dates.size).toBe(1);
  });
});

describe("POST /api/labs/:labId/bundles refusals", () => {
  it("refuses an empty selection with 422", async () => {
    const res = await cast.agents.lead.post(`${base}/bundles`).send({ name: "nothing" });
    expect(res.status).toBe(422);
    expect(ApiErrorSchema.parse(res.body).error.code).toBe("UNPROCESSABLE");
  });

  it("refuses fits that are not approved with 422 naming them", async () => {
    const draft = series.b2.fitIds[1];
    const res = await cast.agents.lead.post(`${base}/bundles`).send({ name: "draft", fitIds: [series.b1.fitIds[0], draft] });
    expect(res.status).toBe(422);
    const e = ApiErrorSchema.parse(res.body).error;
    expect(e.message).toContain(draft);
    expect(e.details).toEqual([{ path: "fitIds.1", message: `fit ${draft} is draft, not approved` }]);
  });

  it("refuses another lab's sample, run, fit or comparison with 404", async () => {
    const other = addBatch(t.db, cast.otherLab.id, "X");
    const foreign = addSampleWithFits(t.db, t.dataDir, cast.otherLab.id, cast.users.outsider.id, { label: "X1", batchId: other, fits: [{ parameters: debyeParams(200) }] });
    for (const body of [{ sampleIds: [foreign.sampleId] }, { runIds: [foreign.runId] }, { fitIds: [foreign.fitIds[0]] }, { comparisonId: "nope" }]) {
      const res = await cast.agents.lead.post(`${base}/bundles`).send({ name: "foreign", ...body });
      expect(res.status, JSON.stringify(body)).toBe(404);
      expect(ApiErrorSchema.parse(res.body).error.code).toBe("NOT_FOUND");
    }
    const dl = await cast.agents.outsider.get(`/api/labs/${cast.otherLab.id}/bundles/${built.id}/download`);
    expect(dl.status).toBe(404);
  });

  it("refuses a missing name with 400", async () => {
    const res = await cast.agents.lead.post(`${base}/bundles`).send({ sampleIds: [series.a[0].sampleId] });
    expect(res.status).toBe(400);
  });
});

describe("listing and progress", () => {
  it("lists bundles with contents, size, creator and date for guests (without share links)", async () => {
    await cast.agents.lead.post(`${base}/bundles/${built.id}/links`).send({});
    const res = await cast.agents.guest.get(`${base}/bundles`);
    expect(res.status).toBe(200);
    const list = BundleListSchema.parse(res.body);
    const mine = list.find((b) => b.id === built.id)!;
    expect(mine.createdBy?.displayName).toBe(cast.users.researcher.displayName);
    expect(mine.sizeBytes).toBe(zip.byteLength);
    expect(mine.counts).toEqual({ samples: 7, runs: 7, fits: 7 });
    expect(mine.selection.comparisonName).toBe("A and B");
    expect(mine.links).toEqual([]);
    const asLead = BundleListSchema.parse((await cast.agents.lead.get(`${base}/bundles`)).body);
    expect(asLead.find((b) => b.id === built.id)!.links).toHaveLength(1);
  });

  it("streams progress lines and then the bundle when asked for NDJSON", async () => {
    const res = await cast.agents.lead
      .post(`${base}/bundles`)
      .set("Accept", "application/x-ndjson")
      .send({ name: "with progress", sampleIds: [series.b1.sampleId] });
    expect(res.status).toBe(201);
    expect(res.headers["content-type"]).toMatch(/application\/x-ndjson/);
    const lines = res.text.trim().split("\n").map((l) => BundleStreamLineSchema.parse(JSON.parse(l)));
    const phases = lines.filter((l) => l.type === "progress").map((l) => (l.type === "progress" ? l.phase : ""));
    expect(phases[0]).toBe("collecting");
    expect(phases).toContain("hashing");
    expect(phases).toContain("writing");
    expect(phases[phases.length - 1]).toBe("storing");
    const last = lines[lines.length - 1];
    expect(last.type).toBe("result");
  });
});

describe("role matrix of the bundle routes", () => {
  it("POST /bundles: anonymous 401, guest 403, researcher and lead 201, outsider and admin 404", async () => {
    const url = `${base}/bundles`;
    const body = { name: "roles", sampleIds: [series.a[1].sampleId] };
    expect((await cast.agents.anonymous.post(url).send(body)).status).toBe(401);
    expect((await cast.agents.guest.post(url).send(body)).status).toBe(403);
    expect((await cast.agents.researcher.post(url).send(body)).status).toBe(201);
    expect((await cast.agents.lead.post(url).send(body)).status).toBe(201);
    expect((await cast.agents.outsider.post(url).send(body)).status).toBe(404);
    expect((await cast.agents.admin.post(url).send(body)).status).toBe(404);
  });

  it.each(["", "/BID", "/BID/download"])("GET /bundles%s: anonymous 401, guest/researcher/lead 200, outsider and admin 404", async (suffix) => {
    const url = `${base}/bundles${suffix.replace("BID", built.id)}`;
    expect((await cast.agents.anonymous.get(url)).status).toBe(401);
    for (const who of ["guest", "researcher", "lead"] as const) expect((await binary(cast.agents[who].get(url))).status, who).toBe(200);
    for (const who of ["outsider", "admin"] as const) expect((await cast.agents[who].get(url)).status, who).toBe(404);
  });

  it("POST and DELETE share links: anonymous 401, guest 403, researcher and lead allowed, outsider and admin 404", async () => {
    const url = `${base}/bundles/${built.id}/links`;
    expect((await cast.agents.anonymous.post(url).send({})).status).toBe(401);
    const g = await cast.agents.guest.post(url).send({});
    expect(g.status).toBe(403);
    expect(ApiErrorSchema.parse(g.body).error.code).toBe("FORBIDDEN");
    expect((await cast.agents.outsider.post(url).send({})).status).toBe(404);
    expect((await cast.agents.admin.post(url).send({})).status).toBe(404);
    const r = await cast.agents.researcher.post(url).send({});
    const l = await cast.agents.lead.post(url).send({});
    expect([r.status, l.status]).toEqual([201, 201]);
    expect((await cast.agents.anonymous.delete(`${url}/${r.body.id}`)).status).toBe(401);
    expect((await cast.agents.guest.delete(`${url}/${r.body.id}`)).status).toBe(403);
    expect((await cast.agents.outsider.delete(`${url}/${r.body.id}`)).status).toBe(404);
    expect((await cast.agents.admin.delete(`${url}/${r.body.id}`)).status).toBe(404);
    expect((await cast.agents.researcher.delete(`${url}/${r.body.id}`)).status).toBe(204);
    expect((await cast.agents.lead.delete(`${url}/${l.body.id}`)).status).toBe(204);
    expect((await cast.agents.lead.delete(`${url}/no-such-link`)).status).toBe(404);
  });
});
