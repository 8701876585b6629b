import { randomUUID } from "node:crypto";
import type { Test } from "supertest";
import type { Db } from "../../server/db/client";
import { batches, fitParameters, fits, runPoints, runs, samples, storedFiles } from "../../server/db/schema";
import { putStoredFile } from "../../server/services/files";

/*
 * Synthetic lab data for the comparison and bundle tests, written straight into the tables (the fit and
 * upload pipelines have their own tests). All values are invented for these tests.
 */

export interface FitSpec {
  parameters: { name: string; value: number; stderr: number | null; stderrMass: number | null; unit: string; fixed?: boolean }[];
  state?: "draft" | "approved" | "superseded";
  model?: Record<string, unknown>;
  window?: [number, number];
}

export interface SampleSpec {
  label: string;
  batchId: string | null;
  x?: number | null;
  atoms?: number;
  fits: FitSpec[];
}

const DEBYE_MODEL = { components: [{ kind: "electronic" }, { kind: "debye", dimension: 3 }] };

/** Inserts a batch. */
export function addBatch(db: Db, labId: string, code: string): string {
  const id = randomUUID();
  db.insert(batches).values({ id, labId, code, createdAt: Date.now() }).run();
  return id;
}

let fileCounter = 0;

/**
 * Inserts a sample with one run (a small synthetic raw file stored in dataDir, 12 reduced points, the
 * third masked) and one fit per spec on that run.
 * @returns the ids made
 */
export function addSampleWithFits(db: Db, dataDir: string, labId: string, userId: string, spec: SampleSpec) {
  const now = Date.now();
  const sampleId = randomUUID();
  db.insert(samples)
    .values({
      id: sampleId,
      labId,
      batchId: spec.batchId,
      label: spec.label,
      formula: "Ba8Ga16Ge30",
      molarMassGPerMol: 4393.01,
      atomsPerFormulaUnit: spec.atoms ?? 54,
      massMg: 12.5,
      massSigmaMg: 0.05,
      compositionX: spec.x ?? null,
      compositionName: spec.x == null ? null : "x",
      createdBy: userId,
      createdAt: now,
      updatedAt: now,
    })
    .run();
  fileCounter += 1;
  const raw = Buffer.from(
    `# synthetic test export ${fileCounter} for ${spec.label}\r\nT (K);C (uJ/K)\r\n` +
      Array.from({ length: 12 }, (_, i) => `${(2 + i * 1.5).toFixed(2).replace(".", ",")};${(0.4 * (2 + i * 1.5) ** 3).toFixed(3).replace(".", ",")}`).join("\r\n") +
      "\r\n",
    "utf8",
  );
  const stored = putStoredFile(dataDir, raw);
  db.insert(storedFiles).values({ sha256: stored.sha256, sizeBytes: raw.byteLength, createdAt: now }).onConflictDoNothing().run();
  const runId = randomUUID();
  db.insert(runs)
    .values({
      id: runId,
      labId,
      sampleId,
      label: `${spec.label} run 1`,
      fileSha256: stored.sha256,
      fileName: `${spec.label.replace(/\s+/g, "_")}.txt`,
      mapping: { delimiter: ";", temperature: { column: "T (K)", unit: "K" } },
      massMg: 12.5,
      molarMassGPerMol: 4393.01,
      atomsPerFormulaUnit: spec.atoms ?? 54,
      pointCount: 12,
      tMinK: 2,
      tMaxK: 18.5,
      warnings: [],
      createdBy: userId,
      createdAt: now + fileCounter,
    })
    .run();
  db.insert(runPoints)
    .values(
      Array.from({ length: 12 }, (_, i) => ({
        runId,
        idx: i,
        temperatureK: 2 + i * 1.5,
        cp: 0.01 * (2 + i * 1.5) ** 3,
        cpSigma: 0.0001 * (2 + i * 1.5) ** 3,
        rowsAveraged: 1,
        sourceLine: 3 + i,
        masked: i === 2,
      })),
    )
    .run();
  const fitIds: string[] = [];
  for (const [k, f] of spec.fits.entries()) {
    const fitId = randomUUID();
    fitIds.push(fitId);
    const state = f.state ?? "approved";
    const free = f.parameters.filter((p) => !p.fixed);
    db.insert(fits)
      .values({
        id: fitId,
        labId,
        runId,
        state,
        model: f.model ?? DEBYE_MODEL,
        windowMinK: f.window?.[0] ?? 2,
        windowMaxK: f.window?.[1] ?? 18.5,
        pointsUsed: 11,
        maskedExcluded: 1,
        converged: true,
        stopReason: "relative change below tolerance",
        chiSquare: 9.1,
        reducedChiSquare: 1.01,
        dof: 9,
        aic: 13.1,
        bic: 13.9,
        covariance: free.map((p, i) => free.map((q, j) => (i === j ? (p.stderr ?? 0) ** 2 : 0))),
        correlation: free.map((_, i) => free.map((__, j) => (i === j ? 1 : 0))),
        // The stored result as the fit service writes it (services/fits.ts StoredResult).
        result: {
          parameterOrder: f.parameters.map((p) => p.name),
          freeParameters: free.map((p) => p.name),
          warnings: [],
          weighting: "stated",
          atomsPerFormulaUnit: spec.atoms ?? 54,
          rawFileSha256: stored.sha256,
          iterations: 7,
          elapsedMs: 1,
          maskedIdx: [2],
          windowIdx: [0, 11],
          startValues: {},
          massMg: null,
          massSigmaMg: null,
        },
        inputSha256: "a".repeat(64),
        softwareVersion: "0.1.0",
        createdBy: userId,
        createdAt: now + k,
        approvedBy: state === "approved" ? userId : null,
        approvedAt: state === "approved" ? now + 100 + k : null,
      })
      .run();
    db.insert(fitParameters)
      .values(
        f.parameters.map((p) => ({
          fitId,
          name: p.name,
          value: p.value,
          stderr: p.stderr,
          stderrUnscaled: p.stderr,
          stderrMass: p.stderrMass,
          unit: p.unit,
          fixed: p.fixed ?? false,
        })),
      )
      .run();
  }
  return { sampleId, runId, fitIds, rawSha256: stored.sha256 };
}

/** θ_D and γ parameters with σ_stat 0.8 K and σ_sys 0.6 K (together exactly 1 K in quadrature). */
export function debyeParams(thetaD: number, gamma = 0.012) {
  return [
    { name: "gamma", value: gamma, stderr: 0.0004, stderrMass: 0.0001, unit: "J/(mol·K²)" },
    { name: "thetaD", value: thetaD, stderr: 0.8, stderrMass: 0.6, unit: "K" },
  ];
}

/**
 * The standard series of these tests: batch A with four samples at θ_D 300, 301, 299 and a planted
 * outlier at 305 K (5σ from the other three's mean, σ = 1 K each); batch B with two samples at 320 and
 * 322 K plus a draft fit at 400 K that must not count; batch C with one sample fitted γT + βT³.
 */
export function seedSeries(db: Db, dataDir: string, labId: string, userId: string) {
  const batchA = addBatch(db, labId, "A-01");
  const batchB = addBatch(db, labId, "B-02");
  const batchC = addBatch(db, labId, "C-03");
  const a = [300, 301, 299, 305].map((t, i) =>
    addSampleWithFits(db, dataDir, labId, userId, { label: `A${i + 1}`, batchId: batchA, x: 0, fits: [{ parameters: debyeParams(t) }] }),
  );
  const b1 = addSampleWithFits(db, dataDir, labId, userId, { label: "B1", batchId: batchB, x: 0.5, fits: [{ parameters: debyeParams(320) }] });
  const b2 = addSampleWithFits(db, dataDir, labId, userId, {
    label: "B2",
    batchId: batchB,
    x: 0.5,
    fits: [{ parameters: debyeParams(322) }, { parameters: debyeParams(400), state: "draft" }],
  });
  const c1 = addSampleWithFits(db, dataDir, labId, userId, {
    label: "C1",
    batchId: batchC,
    x: 1,
    atoms: 1,
    fits: [
      {
        model: { components: [{ kind: "electronic" }, { kind: "t3" }] },
        window: [2, 6],
        parameters: [
          { name: "gamma", value: 0.0007, stderr: 0.00001, stderrMass: 0.000003, unit: "J/(mol·K²)" },
          { name: "beta", value: 4.8e-5, stderr: 3e-7, stderrMass: 1e-7, unit: "J/(mol·K⁴)" },
        ],
      },
    ],
  });
  return { batchA, batchB, batchC, a, b1, b2, c1 };
}

/** Collects a binary body (supertest only buffers text and JSON by itself). */
export function binary(req: Test): Test {
  return req.buffer(true).parse((res, cb) => {
    const chunks: Buffer[] = [];
    res.on("data", (c: Buffer) => chunks.push(c));
    res.on("end", () => cb(null, Buffer.concat(chunks)));
  });
}
