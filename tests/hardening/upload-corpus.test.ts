import http from "node:http";
import type { AddressInfo } from "node:net";
import { existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { count } from "drizzle-orm";
import { strFromU8, unzipSync } from "fflate";
import Papa from "papaparse";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { createLucia } from "../../server/auth/lucia";
import { runPoints, runs, samples, storedFiles } from "../../server/db/schema";
import { makeTestApp, seedRoles, type TestApp } from "../helpers/app";
import { badFormulaCases, badUploadCorpus, FORMULA_TEXTS, type UploadCase } from "../helpers/corpus";
import { saveApprovedFit, SYNTHETIC_MAPPING, syntheticExport } from "./lab-world";

/*
 * The bad-input corpus (tests/helpers/corpus.ts) through the real upload API: every case goes to
 * POST …/runs/preview and to POST …/runs (commit), over one HTTP server with keep-alive, a few requests
 * in flight at a time. Proved: no 5xx, every one refused with the error body, nothing stored (rows and
 * files), the server still answering; then that the exported CSVs defuse formula-leading text.
 */

let t: TestApp;
/** DATA_DIR, alone in a folder of its own, so anything written beside it (by a "../" name) would show. */
let dataDir: string;
let server: http.Server;
let base: string;
let cookie: string;
let labId: string;
let sampleId: string;

beforeAll(async () => {
  dataDir = path.join(mkdtempSync(path.join(tmpdir(), "thetafold-corpus-")), "data");
  mkdirSync(dataDir);
  t = makeTestApp({ dataDir });
  const cast = await seedRoles(t);
  labId = cast.lab.id;
  const lucia = createLucia(t.db, false);
  cookie = lucia.createSessionCookie((await lucia.createSession(cast.users.researcher.id, {})).id).serialize();
  server = http.createServer(t.app);
  // The million-column cases hold the event loop for seconds (reported); without this, keep-alive
  // sockets idle over Node's 5 s default are closed just as the client reuses them (ECONNRESET).
  server.keepAliveTimeout = 120_000;
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const sample = await api("POST", `/api/labs/${labId}/samples`, { label: "corpus target", formula: "Cu", massMg: 10, massSigmaMg: 0.01 });
  expect(sample.status).toBe(201);
  sampleId = sample.body.id;
});

afterAll(async () => {
  server.closeAllConnections();
  await new Promise((r) => server.close(r));
  t.db.$client.close();
  rmSync(path.dirname(dataDir), { recursive: true, force: true });
});

async function api(method: string, url: string, json?: unknown): Promise<{ status: number; body: any }> {
  const res = await fetch(base + url, {
    method,
    headers: { cookie, ...(json === undefined ? {} : { "content-type": "application/json" }) },
    body: json === undefined ? undefined : JSON.stringify(json),
  });
  const text = await res.text();
  let body: unknown = text;
  try {
    body = JSON.parse(text);
  } catch {
    // not JSON (CSV, zip)
  }
  return { status: res.status, body };
}

async function sendUpload(kind: "preview" | "commit", c: UploadCase): Promise<{ status: number; body: unknown }> {
  const form = new FormData();
  if (c.mapping !== undefined) form.append("mapping", c.mapping);
  form.append("file", new Blob([new Uint8Array(c.bytes)]), c.fileName);
  const url = `${base}/api/labs/${labId}/samples/${sampleId}/runs${kind === "preview" ? "/preview" : ""}`;
  const res = await fetch(url, { method: "POST", headers: { cookie }, body: form });
  const text = await res.text();
  let body: unknown = text;
  try {
    body = JSON.parse(text);
  } catch {
    // a non-JSON answer fails the error-body check below
  }
  return { status: res.status, body };
}

/** Runs tasks with at most `limit` in flight. */
async function pool<T, R>(items: readonly T[], limit: number, fn: (item: T) => Promise<R>): Promise<R[]> {
  const out: R[] = new Array(items.length);
  let next = 0;
  await Promise.all(
    Array.from({ length: limit }, async () => {
      while (next < items.length) {
        const i = next++;
        out[i] = await fn(items[i]);
      }
    }),
  );
  return out;
}

function listFiles(dir: string): string[] {
  if (!existsSync(dir)) return [];
  return readdirSync(dir, { recursive: true, withFileTypes: true })
    .filter((d) => d.isFile())
    .map((d) => path.join(d.parentPath, d.name));
}

function footprint() {
  return {
    runs: t.db.select({ n: count() }).from(runs).get()!.n,
    points: t.db.select({ n: count() }).from(runPoints).get()!.n,
    storedFiles: t.db.select({ n: count() }).from(storedFiles).get()!.n,
    samples: t.db.select({ n: count() }).from(samples).get()!.n,
    files: listFiles(dataDir),
  };
}

const corpus = badUploadCorpus();

describe("bad-upload corpus through preview and commit", () => {
  it("has at least 1,000 cases over all eleven families, with unique ids, and repeats byte for byte from its seed", () => {
    expect(corpus.length).toBeGreaterThanOrEqual(1000);
    expect(new Set(corpus.map((c) => c.family)).size).toBe(11);
    expect(new Set(corpus.map((c) => c.id)).size).toBe(corpus.length);
    const again = badUploadCorpus();
    expect(again.map((c) => c.bytes.toString("base64")).slice(0, 50)).toEqual(corpus.map((c) => c.bytes.toString("base64")).slice(0, 50));
  });

  it("refuses every case in both steps with a 4xx error body, never a 5xx, and stores nothing", async () => {
    const before = footprint();
    expect(before.runs + before.points + before.storedFiles).toBe(0);
    const results = await pool(corpus, 4, async (c) => ({ c, preview: await sendUpload("preview", c), commit: await sendUpload("commit", c) }));

    const serverErrors = results.flatMap((r) =>
      (["preview", "commit"] as const).filter((k) => r[k].status >= 500).map((k) => `${r.c.id} ${k} ${r[k].status} (${r.c.note})`),
    );
    expect(serverErrors, "5xx answers").toEqual([]);
    const accepted = results.flatMap((r) =>
      (["preview", "commit"] as const).filter((k) => r[k].status < 400).map((k) => `${r.c.id} ${k} ${r[k].status} (${r.c.note})`),
    );
    expect(accepted, "cases that were not refused").toEqual([]);
    const badBodies = results.flatMap((r) =>
      (["preview", "commit"] as const).filter((k) => !ApiErrorSchema.safeParse(r[k].body).success).map((k) => `${r.c.id} ${k}`),
    );
    expect(badBodies, "refusals without the error body").toEqual([]);
    // Every refusal is one of the documented input errors (STYLE.md §4).
    const statuses = new Set(results.flatMap((r) => [r.preview.status, r.commit.status]));
    for (const s of statuses) expect([400, 404, 409, 413, 422]).toContain(s);

    expect(footprint()).toEqual(before);
    expect((await api("GET", "/api/health")).body).toEqual({ status: "ok" });
  }, 400_000);

  it("refuses broken multipart requests the same way: no file, two files, a wrong field, a cut-off body, over 20 MB, not multipart", async () => {
    const before = footprint();
    const url = `/api/labs/${labId}/samples/${sampleId}/runs`;
    // Resolves with the status, or "reset" when the connection ended before any answer came.
    const raw = async (headers: Record<string, string>, body: Buffer | string, cutAfter?: number) =>
      new Promise<number | "reset">((resolve) => {
        let answered = false;
        const req = http.request(base + url, { method: "POST", headers: { cookie, ...headers } }, (res) => {
          answered = true;
          res.resume();
          resolve(res.statusCode!);
        });
        req.on("error", () => {
          if (!answered) resolve("reset");
        });
        const bytes = typeof body === "string" ? Buffer.from(body) : body;
        if (cutAfter === undefined) {
          req.end(bytes);
          return;
        }
        // The client goes away mid-upload: half the body, then the socket is torn down.
        req.write(bytes.subarray(0, cutAfter), () => setTimeout(() => req.destroy(), 50));
      });
    const boundary = "----corpus-boundary";
    const part = (name: string, value: string, file?: string) =>
      `--${boundary}\r\nContent-Disposition: form-data; name="${name}"${file ? `; filename="${file}"` : ""}\r\n${file ? "Content-Type: text/csv\r\n" : ""}\r\n${value}\r\n`;
    const good = syntheticExport(20).toString("utf8");
    const mapping = JSON.stringify(SYNTHETIC_MAPPING);
    const full = part("mapping", mapping) + part("file", good, "run.csv") + `--${boundary}--\r\n`;
    const mp = { "content-type": `multipart/form-data; boundary=${boundary}` };
    const cases: [string, Promise<number | "reset">, (number | "reset")[]][] = [
      ["no file part", raw(mp, part("mapping", mapping) + `--${boundary}--\r\n`), [400]],
      ["two files", raw(mp, part("mapping", mapping) + part("file", good, "a.csv") + part("file", good, "b.csv") + `--${boundary}--\r\n`), [400]],
      ["file under another field name", raw(mp, part("mapping", mapping) + part("upload", good, "a.csv") + `--${boundary}--\r\n`), [400]],
      ["client gone mid-file (declared length never arrives)", raw({ ...mp, "content-length": String(Buffer.byteLength(full)) }, full, Math.floor(full.length / 2)), ["reset"]],
      ["body cut off mid-file (no closing boundary)", raw(mp, full.slice(0, full.length - 40)), [400]],
      ["multipart without a boundary", raw({ "content-type": "multipart/form-data" }, full), [400]],
      ["JSON instead of multipart", raw({ "content-type": "application/json" }, JSON.stringify({ mapping, file: good })), [400]],
      ["a 21 MB file", raw(mp, part("mapping", mapping) + part("file", "1".repeat(21 * 1024 * 1024), "big.csv") + `--${boundary}--\r\n`), [413]],
      ["a 100 kB label", raw(mp, part("label", "x".repeat(100_000)) + part("mapping", mapping) + part("file", good, "a.csv") + `--${boundary}--\r\n`), [400, 413]],
    ];
    for (const [what, status, allowed] of cases) expect(allowed, what).toContain(await status);
    // Let the server notice the torn-down upload before counting.
    await new Promise((r) => setTimeout(r, 200));
    expect(footprint()).toEqual(before);
    expect((await api("GET", "/api/health")).status).toBe(200);
  }, 60_000);

  it("refuses formulas that are not formulas when creating a sample (400 naming formula) and creates none", async () => {
    const before = footprint();
    const cases = badFormulaCases();
    expect(cases.length).toBeGreaterThanOrEqual(45);
    const results = await pool(cases, 6, async (c) => ({ c, res: await api("POST", `/api/labs/${labId}/samples`, { label: "not a formula", formula: c.formula, massMg: 5 }) }));
    const wrong = results.filter((r) => r.res.status !== 400).map((r) => `${r.c.id} ${r.c.note} → ${r.res.status}`);
    expect(wrong).toEqual([]);
    for (const r of results) {
      const err = ApiErrorSchema.parse(r.res.body).error;
      expect(err.code).toBe("VALIDATION_FAILED");
      expect(err.details?.map((d) => d.path), r.c.id).toContain("formula");
    }
    expect(footprint()).toEqual(before);
  });
});

describe("path-like file names on a good file", () => {
  it("store the bytes only under DATA_DIR/files by hash and keep no folder part in the name", async () => {
    const names = ["../../etc/passwd", "..\\..\\boot.ini", "/etc/hosts", "files/../../thetafold.db", "a/b/../../../escape.csv"];
    const outside = listFiles(path.dirname(dataDir)).length;
    const filesBefore = new Set(listFiles(path.join(dataDir, "files")));
    const runsBefore = t.db.select({ n: count() }).from(runs).get()!.n;
    for (const name of names) {
      const res = await sendUpload("commit", { id: name, family: "path-name", fileName: name, bytes: syntheticExport(15), mapping: JSON.stringify(SYNTHETIC_MAPPING), note: "" });
      expect(res.status, name).toBe(201);
      const body = res.body as { file: { fileName: string; sha256: string } };
      expect(body.file.fileName).not.toMatch(/[\\/]/);
      expect(body.file.fileName.length).toBeGreaterThan(0);
    }
    const stored = listFiles(path.join(dataDir, "files"))
      .filter((f) => !filesBefore.has(f))
      .map((f) => path.relative(path.join(dataDir, "files"), f));
    expect(stored).toHaveLength(names.length);
    for (const f of stored) expect(f).toMatch(/^[0-9a-f]{2}\/[0-9a-f]{64}$/);
    // Nothing new next to the data folder (where "../" names would have landed).
    expect(listFiles(path.dirname(dataDir)).length - outside).toBe(names.length);
    expect(t.db.select({ n: count() }).from(runs).get()!.n - runsBefore).toBe(names.length);
  });
});

/** Every cell of a CSV text; lines starting with "#" are the exports' comment lines, read as cells too. */
function cells(text: string): string[] {
  const parsed = Papa.parse<string[]>(text.replace(/^# /gm, ""), { skipEmptyLines: true });
  return parsed.data.flat();
}

/** Cells a spreadsheet would run: formula-leading and not a plain number. */
function dangerous(text: string): string[] {
  return cells(text).filter((c) => /^[=+\-@\t\r]/.test(c) && !/^-?(?:\d+\.?\d*|\.\d+)(?:e[+-]?\d+)?$/i.test(c));
}

describe("exported CSVs defuse formula-leading text (OWASP CSV injection)", () => {
  let runId: string;
  let fitLabId: string;

  beforeAll(async () => {
    fitLabId = labId;
    const batch = await api("POST", `/api/labs/${labId}/batches`, { code: "+SUM(1+1)", notes: FORMULA_TEXTS[0] });
    expect(batch.status).toBe(201);
    const sample = await api("POST", `/api/labs/${labId}/samples`, { label: FORMULA_TEXTS[0].slice(0, 80), formula: "Cu", massMg: 10, batchId: batch.body.id });
    expect(sample.status).toBe(201);
    const form = new FormData();
    form.append("mapping", JSON.stringify(SYNTHETIC_MAPPING));
    form.append("label", "=cmd|' /C calc'!A0");
    form.append("notes", "@SUM(1+1)");
    form.append("file", new Blob([new Uint8Array(syntheticExport(30))]), "=HYPERLINK(\"http:__example.invalid\").csv");
    const res = await fetch(`${base}/api/labs/${labId}/samples/${sample.body.id}/runs`, { method: "POST", headers: { cookie }, body: form });
    expect(res.status).toBe(201);
    runId = ((await res.json()) as { runs: { id: string }[] }).runs[0].id;
    const lead = (await seedLeadOf(labId))!;
    saveApprovedFit(t.db, labId, runId, lead);
  });

  it("in a run's reduced.csv: the formula-like label and file name are kept with a leading apostrophe", async () => {
    const res = await api("GET", `/api/labs/${labId}/runs/${runId}/reduced.csv`);
    expect(res.status).toBe(200);
    const text = String(res.body);
    expect(dangerous(text)).toEqual([]);
    expect(cells(text)).toContain("'=cmd|' /C calc'!A0");
    expect(cells(text).some((c) => c.startsWith("'=HYPERLINK("))).toBe(true);
  });

  it("in compare.csv: batch codes and sample labels that look like formulas are defused", async () => {
    const res = await api("GET", `/api/labs/${fitLabId}/compare.csv?parameter=gamma&groupBy=batch`);
    expect(res.status).toBe(200);
    const text = String(res.body);
    expect(dangerous(text)).toEqual([]);
    expect(cells(text)).toContain("'+SUM(1+1)");
  });

  it("in a bundle's CSV tables too (read from the zip with fflate)", async () => {
    const sampleList = await api("GET", `/api/labs/${labId}/samples?q=HYPERLINK`);
    const made = await api("POST", `/api/labs/${labId}/bundles`, { name: "injection check", sampleIds: [sampleList.body[0].id] });
    expect(made.status).toBe(201);
    const zip = await fetch(`${base}/api/labs/${labId}/bundles/${made.body.id}/download`, { headers: { cookie } });
    expect(zip.status).toBe(200);
    const files = unzipSync(new Uint8Array(await zip.arrayBuffer()));
    const csvs = Object.keys(files).filter((n) => n.endsWith(".csv"));
    expect(csvs.length).toBeGreaterThan(0);
    for (const n of csvs) expect(dangerous(strFromU8(files[n])), n).toEqual([]);
  });
});

async function seedLeadOf(lab: string): Promise<string | undefined> {
  const row = t.db.$client.prepare("select user_id from memberships where lab_id = ? and role = 'lead'").get(lab) as { user_id: string } | undefined;
  return row?.user_id;
}
