/*
 * Scale figures for `npm run bench` (section "scale"): the comparison API over the SEED=large lab
 * (200 samples, 2,000 runs, 2,000 approved fits, all synthetic) with 20 concurrent clients, and the
 * parse + reduce of a 100,000-row upload with shared/ingest. Prints figures, asserts nothing.
 *
 * The section runs in a child process (`node --import tsx tests/bench/scale.ts --child`) because it
 * starts a real server and awaits HTTP, while run.ts's sections are synchronous; the child prints one
 * JSON line of BenchLine[] at the end.
 */
import { createSeededRandom } from "@shared/numerics/seeded-random";
import { spawnSync } from "node:child_process";
import { mkdirSync, mkdtempSync, rmSync } from "node:fs";
import http from "node:http";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { decodeBytes, readDelimited } from "@shared/ingest/read-delimited";
import { reduceTable } from "@shared/ingest/reduce";
import type { BenchLine, BenchSection } from "./run";

const REPO = fileURLToPath(new URL("../..", import.meta.url));
const CLIENTS = 20;
// 200 requests in all; BENCH_REQUESTS overrides the per-client count.
const REQUESTS_PER_CLIENT = Number(process.env.BENCH_REQUESTS ?? 10);

/** Nearest-rank percentile of sorted values. */
function percentile(sorted: readonly number[], p: number): number {
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1))];
}

async function compareFigures(): Promise<BenchLine[]> {
  const { readEnv } = await import("../../server/env");
  const { startServer } = await import("../../server/index");
  const parent = mkdtempSync(path.join(tmpdir(), "thetafold-bench-"));
  const dataDir = path.join(parent, "data");
  mkdirSync(dataDir);
  const logLines: string[] = [];
  const seedStart = performance.now();
  const server = await startServer(readEnv({ DATA_DIR: dataDir, PORT: "0", HOST: "127.0.0.1", SEED: "large" }), {
    client: "skip",
    log: (l) => logLines.push(l),
  });
  const startMs = performance.now() - seedStart;
  try {
    const base = server.url.replace("localhost", "127.0.0.1");
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
    // A new connection per request: on a loaded machine a keep-alive socket can be reaped by the
    // server's 5 s keep-alive timer just as the next request arrives (ECONNRESET), which is noise here.
    const agent = new http.Agent({ keepAlive: false, maxSockets: CLIENTS });
    const once = () =>
      new Promise<number>((resolve, reject) => {
        const t0 = performance.now();
        http
          .get(url, { agent, headers: { cookie } }, (res) => {
            const chunks: Buffer[] = [];
            res.on("data", (c: Buffer) => chunks.push(c));
            res.on("end", () => {
              if (res.statusCode !== 200) return reject(new Error(`compare: ${res.statusCode}`));
              rows = (JSON.parse(Buffer.concat(chunks).toString("utf8")) as { rows: unknown[] }).rows.length;
              resolve(performance.now() - t0);
            });
          })
          .on("error", (err) => reject(Object.assign(err, { afterMs: performance.now() - t0 })));
      });
    for (let i = 0; i < 10; i++) await once();
    const single: number[] = [];
    for (let i = 0; i < 20; i++) single.push(await once());
    single.sort((a, b) => a - b);
    if (process.env.BENCH_VERBOSE) console.error(`single-client compare: p50 ${percentile(single, 50).toFixed(1)} ms`);

    const latencies: number[] = [];
    const wallStart = performance.now();
    await Promise.all(
      Array.from({ length: CLIENTS }, async () => {
        for (let i = 0; i < REQUESTS_PER_CLIENT; i++) latencies.push(await once());
      }),
    );
    const wallMs = performance.now() - wallStart;
    latencies.sort((a, b) => a - b);
    const seedLine = logLines.find((l) => l.startsWith("SEED=large")) ?? "";
    return [
      { label: "start with SEED=large (migrate, demo seed, scale seed, listen)", value: startMs, unit: "ms", note: seedLine },
      { label: `GET …/compare?parameter=thetaD&groupBy=batch, one client, p50 (${rows} rows)`, value: percentile(single, 50), unit: "ms" },
      { label: `same, ${CLIENTS} concurrent clients × ${REQUESTS_PER_CLIENT}, p50`, value: percentile(latencies, 50), unit: "ms" },
      {
        label: `same, ${CLIENTS} concurrent clients × ${REQUESTS_PER_CLIENT}, p95`,
        value: percentile(latencies, 95),
        unit: "ms",
        goal: "p95 < 100 ms",
        note: `max ${latencies[latencies.length - 1].toFixed(0)} ms; ${latencies.length} requests in ${wallMs.toFixed(0)} ms (${((latencies.length / wallMs) * 1000).toFixed(0)} per second)`,
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
