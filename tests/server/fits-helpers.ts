import { createSeededRandom } from "@shared/numerics/seeded-random";
import { createHash, randomUUID } from "node:crypto";
import type { Db } from "../../server/db/client";
import { runPoints, runs, samples, storedFiles } from "../../server/db/schema";

/** Uniforms in [0, 1) from the shared seeded generator, so synthetic runs repeat exactly. */
export function seededRandom(seed: number): () => number {
  return createSeededRandom(seed).uniform;
}

/** Standard normal deviates by Box–Muller from a uniform generator. */
export function gaussian(rand: () => number): () => number {
  return () => {
    const u = Math.max(rand(), 1e-300);
    const v = rand();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
  };
}

export interface SyntheticPoint {
  temperatureK: number;
  cp: number;
  sigma: number | null;
  masked?: boolean;
}

export interface InsertRunOptions {
  points: readonly SyntheticPoint[];
  atomsPerFormulaUnit: number;
  formula?: string;
  massMg?: number | null;
  massSigmaMg?: number;
  label?: string;
}

/**
 * Puts a synthetic run (and its sample) straight into the database, as the upload pipeline would leave
 * it: points sorted by T, indices 0…N−1. Labelled synthetic.
 */
export function insertSyntheticRun(db: Db, labId: string, opts: InsertRunOptions): { runId: string; sampleId: string; fileSha256: string } {
  const now = Date.now();
  const sampleId = randomUUID();
  const runId = randomUUID();
  const sorted = [...opts.points].sort((a, b) => a.temperatureK - b.temperatureK);
  const body = `synthetic run ${runId}\n` + sorted.map((p) => `${p.temperatureK},${p.cp},${p.sigma ?? ""}`).join("\n");
  const fileSha256 = createHash("sha256").update(body).digest("hex");
  db.insert(storedFiles).values({ sha256: fileSha256, sizeBytes: body.length, createdAt: now }).onConflictDoNothing().run();
  db.insert(samples)
    .values({
      id: sampleId,
      labId,
      label: opts.label ?? "synthetic sample",
      formula: opts.formula ?? "Cu",
      molarMassGPerMol: 63.546,
      atomsPerFormulaUnit: opts.atomsPerFormulaUnit,
      massMg: opts.massMg ?? 10,
      massSigmaMg: opts.massSigmaMg ?? 0,
      notes: "synthetic",
      createdAt: now,
      updatedAt: now,
    })
    .run();
  db.insert(runs)
    .values({
      id: runId,
      labId,
      sampleId,
      kind: "sample",
      label: opts.label ?? "synthetic run",
      fileSha256,
      fileName: "synthetic.csv",
      mapping: { synthetic: true },
      massMg: opts.massMg === undefined ? 10 : opts.massMg,
      molarMassGPerMol: 63.546,
      atomsPerFormulaUnit: opts.atomsPerFormulaUnit,
      pointCount: sorted.length,
      tMinK: sorted[0]?.temperatureK ?? 0,
      tMaxK: sorted[sorted.length - 1]?.temperatureK ?? 0,
      warnings: [],
      notes: "synthetic",
      createdAt: now,
    })
    .run();
  const rows = sorted.map((p, idx) => ({
    runId,
    idx,
    temperatureK: p.temperatureK,
    cp: p.cp,
    cpSigma: p.sigma,
    rowsAveraged: 1,
    sourceLine: idx + 2,
    masked: p.masked ?? false,
  }));
  for (let i = 0; i < rows.length; i += 500) db.insert(runPoints).values(rows.slice(i, i + 500)).run();
  return { runId, sampleId, fileSha256 };
}

/** n temperatures spaced evenly in log T from t0 to t1 (K). */
export function logSpaced(t0: number, t1: number, n: number): number[] {
  return Array.from({ length: n }, (_, i) => t0 * (t1 / t0) ** (i / (n - 1)));
}
