/*
 * Scale figures for `npm run bench` (section "scale"): the comparison API over the SEED=large lab
 * (200 samples, 2,000 runs, 2,000 approved fits, all synthetic) with 20 concurrent clients, and the
 * parse + reduce of a 100,000-row upload with shared/ingest. Prints figures, asserts nothing.
 *
 * The section runs in a child process (`node --import tsx tests/bench/scale.ts --child`) because it
 * awaits HTTP, while run.ts's sections are synchronous; the child prints one JSON line of BenchLine[]
 * at the end. The server it measures runs in a third process, as in production.
 */
import { createSeededRandom } from "@shared/numerics/seeded-random";
import { spawn, spawnSync } from "node:child_process";
import { mkdirSync, mkdtempSync, rmSync } from "node:fs";
import http from "node:http";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { gunzipSync } from "node:zlib";
import { decodeBytes, readDelimited } from "@shared/ingest/read-delimited";
import { reduceTable } from "@shared/ingest/reduce";
import type { BenchLine, BenchSection } from "./run";

const REPO = fileURLToPath(new URL("../..", import.meta.url));
const CLIENTS = 20;
// 500 measured requests in all, after an unmeasured concurrent round of 3 per client; BENCH_REQUESTS
// overrides the per-client count.
const REQUESTS_PER_CLIENT = Number(process.env.BENCH_REQUESTS ?? 25);
const WARMUP_PER_CLIENT = 3;

/** Nearest-rank percentile of sorted values. */
function percentile(sorted: readonly number[], p: number): number {
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1))];
}

/** The server as it runs in production: its own process (node --import tsx server/index.ts --api-only). */
function startServerProcess(env: NodeJS.ProcessEnv): Promise<{ url: string; log: string[]; close(): Promise<void> }> {
  return new Promise((resolve, reject) => {
    const proc = spawn(process.execPath, ["--import", "tsx", "server/index.ts", "--api-only"], {
      cwd: REPO,
      env: { ...process.env, ...env },
      stdio: ["ignore", "pipe", "pipe"],
    });
    let out = "";
    const close = () =>
      new Promise<void>((done) => {
        if (proc.exitCode !== null || proc.signalCode !== null) return done();
        // SIGTERM shuts the server down in order; if that hangs, it is killed after 10 s.
        const hard = setTimeout(() => proc.kill("SIGKILL"), 10_000);
        proc.once("exit", () => {
          clearTimeout(hard);
          done();
        });
        proc.kill("SIGTERM");
      });
    proc.stdout!.on("data", (c: Buffer) => {
      out += c.toString();
      const m = /listening on (http:\/\/127\.0\.0\.1:\d+)/.exec(out);
      if (m) resolve({ url: m[1], log: out.split("\n"), close });
    });
    proc.stderr!.on("data", (c: Buffer) => (out += c.toString()));
    proc.once("exit", (code) => reject(new Error(`server exited (${code}) before listening:\n${out}`)));
  });
}

async function compareFigures(): Promise<BenchLine[]> {
  const { readEnv } = await import("../../server/env");
  const parent = mkdtempSync(path.join(tmpdir(), "thetafold-bench-"));
  const dataDir = path.join(parent, "data");
  mkdirSync(dataDir);
  const seedStart = performance.now();
  // The clients run here, the server in a process of its own, as browsers and server would.
  const server = await startServerProcess({ DATA_DIR: dataDir, PORT: "0", HOST: "127.0.0.1", SEED: "large", NODE_ENV: "production" });
  const logLines = server.log;
  const startMs = performance.now() - seedStart;
  try {
    const base = server.url;
    const password = readEnv({}).DEMO_PASSWORD;
    const signIn = await fetch(`${base}/api/auth/sign-in`, {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ email: "lead@example.org", password }),
    });
    if (signIn.status !== 200) throw new Error(`sign-in: ${signIn.status} ${await signIn.text()}`);
    const cookie = signIn.headers.getSetCookie().find((c) => c.startsWith("auth_session="))!.split(";")[0];
    const me = (await (await fetch(`${base}/api/me`, { headers: { cookie } })).json()) as { memberships: { labId: string; labName: string }[] };
    const lab = me.memberships.find((m) => m.labName.includes("SEED=large"));
    if (!lab) throw new Error("the SEED=large lab is missing");
    const url = `${base}/api/labs/${lab.labId}/compare?parameter=thetaD&groupBy=batch`;

    let rows = 0;
    let bytes = 0;
    let sentBytes = 0;
    // Persistent connections, as browsers keep them (HTTP/1.1). No phase below leaves a socket idle near
    // the server's 5 s keep-alive timeout, where a reused socket could meet a closing one (ECONNRESET).
    // The clients only count the bytes of each answer (the first is parsed once, for its row count).
    const agent = new http.Agent({ keepAlive: true, maxSockets: CLIENTS + 1 });
    const once = (method = "GET", target = url, body?: string) =>
      new Promise<number>((resolve, reject) => {
        const t0 = performance.now();
        // Asks for gzip as every browser does; the answer is counted, not unpacked (but the first).
        const headers: http.OutgoingHttpHeaders = { cookie, origin: base, "accept-encoding": "gzip" };
        if (body) headers["content-type"] = "application/json";
        const req = http.request(target, { method, agent, headers }, (res) => {
          const chunks: Buffer[] = [];
          res.on("data", (c: Buffer) => chunks.push(c));
          res.on("end", () => {
            if (res.statusCode !== 200) return reject(new Error(`${method} ${target}: ${res.statusCode}`));
            if (rows === 0 && method === "GET") {
              const packed = Buffer.concat(chunks);
              const all = res.headers["content-encoding"] === "gzip" ? gunzipSync(packed) : packed;
              bytes = all.byteLength;
              sentBytes = packed.byteLength;
              rows = (JSON.parse(all.toString("utf8")) as { rows: unknown[] }).rows.length;
            }
            resolve(performance.now() - t0);
          });
        });
        req.on("error", (err) => reject(Object.assign(err, { afterMs: performance.now() - t0 })));
        req.end(body);
      });
    for (let i = 0; i < 10; i++) await once();
    const single: number[] = [];
    for (let i = 0; i < 20; i++) single.push(await once());
    single.sort((a, b) => a - b);

    // What one computation costs: the first request after any write to the database pays it.
    const { compareFits } = await import("../../server/services/compare");
    const { openDb } = await import("../../server/db/client");
    const reader = openDb(path.join(dataDir, "thetafold.db"));
    const input = { parameter: "thetaD", groupBy: "batch" as const, batchIds: [], sampleIds: [] };
    const compute: number[] = [];
    for (let i = 0; i < 15; i++) {
      const t0 = performance.now();
      JSON.stringify(compareFits(reader, lab.labId, input));
      if (i >= 3) compute.push(performance.now() - t0);
    }
    reader.$client.close();
    compute.sort((a, b) => a - b);

    const concurrent = async (during?: () => Promise<void>, perClient = REQUESTS_PER_CLIENT) => {
      const latencies: number[] = [];
      const wallStart = performance.now();
      let done = false;
      const writer = during ? (async () => {
        while (!done) await during();
      })() : Promise.resolve();
      await Promise.all(
        Array.from({ length: CLIENTS }, async () => {
          for (let i = 0; i < perClient; i++) latencies.push(await once());
        }),
      );
      done = true;
      await writer;
      latencies.sort((a, b) => a - b);
      return { latencies, wallMs: performance.now() - wallStart };
    };
    await concurrent(undefined, WARMUP_PER_CLIENT); // opens the server's concurrent path (JIT, sockets) unmeasured
    const quiet = await concurrent();

    // The same load while a researcher renames a sample of the lab every 250 ms (each rename
    // invalidates the cached answers, so the next request recomputes).
    const sampleList = (await (await fetch(`${base}/api/labs/${lab.labId}/samples`, { headers: { cookie } })).json()) as
      | { items?: { id: string; label: string }[] }
      | { id: string; label: string }[];
    const firstSample = (Array.isArray(sampleList) ? sampleList : (sampleList.items ?? []))[0];
    if (!firstSample) throw new Error("the SEED=large lab has no samples");
    let writes = 0;
    const busy = await concurrent(async () => {
      await new Promise((r) => setTimeout(r, 250));
      writes++;
      await once("PATCH", `${base}/api/labs/${lab.labId}/samples/${firstSample.id}`, JSON.stringify({ label: `${firstSample.label}` + (writes % 2 ? "-r" : "") }));
    });

    agent.destroy();

    const seedLine = logLines.find((l) => l.startsWith("SEED=large")) ?? "";
    const spread = (r: { latencies: number[]; wallMs: number }) =>
      `max ${r.latencies[r.latencies.length - 1].toFixed(0)} ms; ${r.latencies.length} requests in ${r.wallMs.toFixed(0)} ms (${((r.latencies.length / r.wallMs) * 1000).toFixed(0)} per second)`;
    return [
      { label: "server process start with SEED=large (migrate, demo seed, scale seed, listen)", value: startMs, unit: "ms", note: seedLine },
      {
        label: `compareFits + JSON for the whole lab (${rows} rows, ${(bytes / 1e6).toFixed(1)} MB), one computation, median`,
        value: percentile(compute, 50),
        unit: "ms",
        note: "paid by the first request after any write; later ones are served from the cache",
      },
      {
        label: `GET …/compare?parameter=thetaD&groupBy=batch, one client, p50`,
        value: percentile(single, 50),
        unit: "ms",
        note: `${(sentBytes / 1e3).toFixed(0)} kB sent gzip-compressed`,
      },
      { label: `same, ${CLIENTS} concurrent clients × ${REQUESTS_PER_CLIENT}, p50`, value: percentile(quiet.latencies, 50), unit: "ms" },
      {
        label: `same, ${CLIENTS} concurrent clients × ${REQUESTS_PER_CLIENT}, p95`,
        value: percentile(quiet.latencies, 95),
        unit: "ms",
        goal: "p95 < 100 ms",
        note: spread(quiet),
      },
      {
        label: `same, while a sample is renamed every 250 ms (${writes} renames), p95`,
        value: percentile(busy.latencies, 95),
        unit: "ms",
        note: `p50 ${percentile(busy.latencies, 50).toFixed(1)} ms; ${spread(busy)}`,
      },
    ];
  } finally {
    await server.close();
    rmSync(parent, { recursive: true, force: true });
  }
}

/** A synthetic 100,000-row export: T (K), total C (J/K), σ (J/K), field (T) in three fields; seeded. */
export function bigExport(rows: number): Uint8Array {
  const rand = createSeededRandom(12345).uniform;
  const moles = 10e-3 / 63.546;
  const lines = ["# SYNTHETIC DATA: invented for the Thetafold bench", "Temperature (K),Heat capacity (J/K),Uncertainty (J/K),Field (T)"];
  for (let i = 0; i < rows; i++) {
    const field = [0, 1, 9][i % 3];
    const t = 1.8 + (298 * Math.floor(i / 3)) / (rows / 3);
    // γT plus a T³ lattice term that levels off (a crude stand-in, below 3R everywhere).
    const molar = 0.000695 * t + (4.8e-5 * t ** 3) / (1 + (t / 60) ** 3);
    const c = molar * moles * (1 + 0.002 * (rand() - 0.5));
    lines.push(`${t.toFixed(5)},${c.toExponential(6)},${(c * 0.003).toExponential(3)},${field}`);
  }
  return new TextEncoder().encode(lines.join("\n") + "\n");
}

function parseFigures(): BenchLine[] {
  const rows = 100_000;
  const bytes = bigExport(rows);
  const mapping = {
    columns: { temperature: "Temperature (K)", heatCapacity: "Heat capacity (J/K)", sigma: "Uncertainty (J/K)", field: "Field (T)" },
    units: { temperature: "K", heatCapacity: "J/K", field: "T" },
  } as never;
  const basis = { massMg: 10, molarMassGPerMol: 63.546, atomsPerFormulaUnit: 1 };
  const times: number[] = [];
  let points = 0;
  for (let i = 0; i < 6; i++) {
    const t0 = performance.now();
    const table = readDelimited(decodeBytes(bytes).text);
    const runs = reduceTable(table, mapping, basis);
    const dt = performance.now() - t0;
    points = runs.reduce((s, r) => s + r.points.length, 0);
    if (i > 0) times.push(dt); // the first pass warms the JIT
  }
  times.sort((x, y) => x - y);
  return [
    {
      label: `decode + read + reduce a ${rows.toLocaleString("en")}-row upload (${(bytes.byteLength / 1e6).toFixed(1)} MB, 3 fields), median of 5`,
      value: percentile(times, 50),
      unit: "ms",
      goal: "< 500 ms",
      note: `min ${times[0].toFixed(0)} ms, max ${times[times.length - 1].toFixed(0)} ms; ${points} reduced points`,
    },
  ];
}

async function child(): Promise<void> {
  const lines = [...parseFigures(), ...(await compareFigures())];
  console.log(`BENCH-JSON ${JSON.stringify(lines)}`);
}

/** The "scale" section of `npm run bench` (runs the figures in a child process). */
export const scaleSection: BenchSection = {
  name: "scale",
  title: "Scale: compare API over SEED=large with 20 concurrent clients; parsing a 100,000-row upload (synthetic)",
  run: () => {
    const res = spawnSync(process.execPath, ["--import", "tsx", fileURLToPath(import.meta.url), "--child"], {
      cwd: REPO,
      encoding: "utf8",
      maxBuffer: 64 * 1024 * 1024,
      timeout: 10 * 60_000,
    });
    const line = res.stdout.split("\n").find((l) => l.startsWith("BENCH-JSON "));
    if (!line) return [{ label: `scale bench failed (exit ${res.status}): ${(res.stderr || res.stdout).trim().slice(-300)}`, value: Number.NaN, unit: "" }];
    return JSON.parse(line.slice("BENCH-JSON ".length)) as BenchLine[];
  },
};

if (process.argv.includes("--child") && import.meta.url === pathToFileURL(path.resolve(process.argv[1] ?? "")).href) {
  child().then(
    () => process.exit(0),
    (err: unknown) => {
      console.error(err);
      process.exit(1);
    },
  );
}
