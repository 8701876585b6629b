import { spawn, type ChildProcess } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, readdirSync, rmSync } from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { readEnv } from "../../server/env";
import { startServer, type RunningServer } from "../../server/index";
import { LOW_T_MODEL, LOW_T_WINDOW, SYNTHETIC_MAPPING, syntheticExport } from "./lab-world";
import { consistency, CONSISTENT, openInstallDb, prepareInstall, signIn, type Client, type PreparedInstall } from "./server-harness";

/*
 * 50 writes at once against one real server on a file database (WAL): uploads and fit saves from a
 * lead and four researchers, some deliberately clashing (the same file twice to one sample) or not
 * allowed (a guest), while a second process holds write locks on the same database file in short
 * bursts. Proved: every request is stored or refused cleanly (2xx or 4xx, never 5xx), nothing reports
 * SQLITE_BUSY, and the row counts afterwards are exactly what the 2xx answers say.
 */

const REPO = path.resolve(import.meta.dirname, "../..");

let install: PreparedInstall;
let server: RunningServer;
let base: string;
let lead: Client;
let researchers: Client[];
let guest: Client;
let locker: ChildProcess | undefined;
const errors: string[] = [];
const realConsoleError = console.error;

beforeAll(async () => {
  install = await prepareInstall(4);
  const env = readEnv({ DATA_DIR: install.dataDir, PORT: "0", HOST: "127.0.0.1", SEED: "none" });
  server = await startServer(env, { client: "skip", log: () => {} });
  base = server.url.replace("localhost", "127.0.0.1");
  lead = await signIn(base, install.people.lead);
  researchers = await Promise.all(install.people.researchers.map((e) => signIn(base, e)));
  guest = await signIn(base, install.people.guest);
  // Whatever the server logs as an error lands here (the error handler logs every 500 in full).
  console.error = (...args: unknown[]) => {
    errors.push(args.map((a) => (a instanceof Error ? `${a.message}\n${a.stack}` : String(a))).join(" "));
  };
}, 60_000);

afterAll(async () => {
  console.error = realConsoleError;
  locker?.kill("SIGKILL");
  await server?.close();
  if (install) rmSync(path.dirname(install.dataDir), { recursive: true, force: true });
});

/** A second process that takes the write lock on the database for ~20 ms every ~30 ms until killed. */
function startLocker(dbFile: string): ChildProcess {
  const script = `
    const Database = require("better-sqlite3");
    const db = new Database(process.argv[1]);
    db.pragma("busy_timeout = 5000");
    const insert = db.prepare("insert into audit_log (lab_id, user_id, action, target, created_at) values (null, null, 'test.lock', 'concurrency test', ?)");
    const burst = db.transaction(() => { const end = Date.now() + 20; while (Date.now() < end) insert.run(Date.now()); });
    setInterval(() => burst(), 30);
    process.send && process.send("ready");
  `;
  return spawn(process.execPath, ["-e", script, dbFile], { cwd: REPO, stdio: ["ignore", "inherit", "inherit", "ipc"] });
}

describe("50 concurrent uploads and fit saves on one server", () => {
  it("stores or refuses each one cleanly, surfaces no SQLITE_BUSY, and leaves exact row counts", async () => {
    const labBase = `/api/labs/${install.labId}`;
    const writers = [lead, ...researchers];
    // Before the storm: five samples and ten runs to fit.
    const sampleIds: string[] = [];
    for (let i = 0; i < 5; i++) {
      const s = await writers[i].json("POST", `${labBase}/samples`, { label: `conc-${i}`, formula: "Cu", massMg: 10, massSigmaMg: 0.01 });
      expect(s.status).toBe(201);
      sampleIds.push(s.body.id);
    }
    const fitRuns: string[] = [];
    for (let i = 0; i < 10; i++) {
      const r = await writers[i % 5].upload(`${labBase}/samples/${sampleIds[i % 5]}/runs`, syntheticExport(30), `pre-${i}.csv`, { mapping: SYNTHETIC_MAPPING });
      expect(r.status).toBe(201);
      fitRuns.push(r.body.runs[0].id);
    }
    const db = openInstallDb(install);
    const count = (table: string) => (db.$client.prepare(`select count(*) as n from ${table}`).get() as { n: number }).n;
    const before = { runs: count("runs"), points: count("run_points"), fits: count("fits"), params: count("fit_parameters"), files: count("stored_files") };

    locker = startLocker(install.dbFile);
    await new Promise<void>((resolve) => locker!.once("message", () => resolve()));

    type Job = { kind: "upload" | "duplicate" | "fit" | "guest"; bytes?: Buffer; send: () => Promise<{ status: number; body: any }> };
    const jobs: Job[] = [];
    // 24 distinct uploads, 5 writers over 5 samples, 20 to 40 points each.
    for (let i = 0; i < 24; i++) {
      const bytes = syntheticExport(20 + (i % 3) * 10);
      jobs.push({ kind: "upload", bytes, send: () => writers[i % 5].upload(`${labBase}/samples/${sampleIds[i % 5]}/runs`, bytes, `storm-${i}.csv`, { mapping: SYNTHETIC_MAPPING }) });
    }
    // Three files sent twice at once to the same sample by two people: exactly one of each pair may be stored.
    for (let i = 0; i < 3; i++) {
      const bytes = syntheticExport(25);
      for (const w of [writers[1], writers[2]]) {
        jobs.push({ kind: "duplicate", bytes, send: () => w.upload(`${labBase}/samples/${sampleIds[0]}/runs`, bytes, `twice-${i}.csv`, { mapping: SYNTHETIC_MAPPING }) });
      }
    }
    // 18 fit saves over the ten runs, by every writer.
    for (let i = 0; i < 18; i++) {
      jobs.push({ kind: "fit", send: () => writers[i % 5].json("POST", `${labBase}/runs/${fitRuns[i % 10]}/fits`, { model: LOW_T_MODEL, window: LOW_T_WINDOW }) });
    }
    // Two uploads by the guest, refused with 403.
    for (let i = 0; i < 2; i++) {
      jobs.push({ kind: "guest", send: () => guest.upload(`${labBase}/samples/${sampleIds[0]}/runs`, syntheticExport(20), `guest-${i}.csv`, { mapping: SYNTHETIC_MAPPING }) });
    }
    expect(jobs).toHaveLength(50);

    const results = await Promise.all(jobs.map(async (j) => ({ job: j, res: await j.send() })));
    locker.kill("SIGKILL");
    locker = undefined;

    const statuses = results.map((r) => r.res.status);
    expect(statuses.filter((s) => s >= 500), JSON.stringify(results.filter((r) => r.res.status >= 500).map((r) => r.res.body))).toEqual([]);
    expect(statuses.every((s) => (s >= 200 && s < 300) || (s >= 400 && s < 500))).toBe(true);
    expect(errors.filter((e) => /SQLITE_BUSY|database is locked/i.test(e))).toEqual([]);
    expect(errors, "server errors logged during the storm").toEqual([]);

    const by = (kind: Job["kind"]) => results.filter((r) => r.job.kind === kind);
    expect(by("upload").map((r) => r.res.status)).toEqual(Array(24).fill(201));
    expect(by("fit").map((r) => r.res.status)).toEqual(Array(18).fill(201));
    expect(by("guest").map((r) => r.res.status)).toEqual([403, 403]);
    const dup = by("duplicate");
    for (let i = 0; i < 3; i++) expect([dup[2 * i].res.status, dup[2 * i + 1].res.status].sort()).toEqual([201, 409]);

    const stored = results.filter((r) => r.res.status === 201 && r.job.kind !== "fit");
    const newRuns = stored.flatMap((r) => r.res.body.runs as { id: string; pointCount: number }[]);
    const newFits = by("fit").map((r) => r.res.body as { id: string; parameters: unknown[] });
    const after = { runs: count("runs"), points: count("run_points"), fits: count("fits"), params: count("fit_parameters"), files: count("stored_files") };
    expect(after.runs - before.runs).toBe(newRuns.length);
    expect(after.runs - before.runs).toBe(27);
    expect(after.points - before.points).toBe(newRuns.reduce((a, r) => a + r.pointCount, 0));
    expect(after.fits - before.fits).toBe(18);
    expect(after.params - before.params).toBe(newFits.reduce((a, f) => a + f.parameters.length, 0));
    expect(after.files - before.files).toBe(27);
    // Each run row names the file whose SHA-256 it answered with.
    for (const r of stored) {
      const sha = createHash("sha256").update(r.job.bytes!).digest("hex");
      expect(r.res.body.file.sha256).toBe(sha);
      const onDisk = path.join(install.dataDir, "files", sha.slice(0, 2), sha);
      expect(existsSync(onDisk)).toBe(true);
    }
    const tmp = path.join(install.dataDir, "files", ".tmp");
    expect(existsSync(tmp) ? readdirSync(tmp) : []).toEqual([]);
    expect(consistency(db)).toEqual(CONSISTENT);
    // The other process really did hold the write lock in between (its rows are there).
    expect((db.$client.prepare("select count(*) as n from audit_log where action = 'test.lock'").get() as { n: number }).n).toBeGreaterThan(0);
    db.$client.close();
    expect((await lead.json("GET", "/api/health")).body).toEqual({ status: "ok" });
  }, 120_000);
});
