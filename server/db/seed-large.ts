import { createHash, randomUUID } from "node:crypto";
import { existsSync, mkdirSync, writeFileSync } from "node:fs";
import path from "node:path";
import { createSeededRandom } from "@shared/numerics/seeded-random";
import type { Role } from "@shared/schemas/auth";
import { storedFilePath } from "../services/files";
import type { Db } from "./client";
import { DEMO_PEOPLE } from "./seed";
import { batches, fitParameters, fits, labs, memberships, runPoints, runs, samples, storedFiles } from "./schema";

/*
 * SEED=large: a scale-test lab for benchmarks and for trying the pages with a lot in them. Everything is
 * synthetic and labelled so: an invented clathrate substitution series of 10 batches × 20 samples, 10
 * runs per sample (12 points each, 2–20 K, Cp = γT + βT³ with β from the sample's θ_D), and one approved
 * fit per run (the app allows one approved fit per run; an approval supersedes the run's earlier one),
 * so 200 samples, 2,000 runs and 2,000 approved fits. Half the fits are γT + Debye (gamma, thetaD, nD
 * fixed), half γT + βT³ (gamma, beta), so comparisons of θ_D meet both a fitted and a derived value.
 * Rows go in with one transaction per batch of samples; the raw files are written beside them.
 */

/** Sizes of the large seed. */
export const LARGE_SEED_SIZE = { batches: 10, samplesPerBatch: 20, runsPerSample: 10, pointsPerRun: 12 } as const;

/** CODATA 2018 molar gas constant, J/(mol·K) (exact from k_B and N_A). */
const R = 8.314462618;
/** Ba8Ga16Ge30: molar mass from mf-parser 3.9.3 (g/mol), 54 atoms per formula unit. */
const MOLAR_MASS = 4393.01;
const ATOMS = 54;
const SOFTWARE_VERSION = "seed-large";

/** What seedLarge made. */
export interface LargeSeedResult {
  labId: string;
  batches: number;
  samples: number;
  runs: number;
  points: number;
  approvedFits: number;
  elapsedMs: number;
}
/**
 * Adds the scale-test lab (see the header) with the given people as members.
 * @param db the database (migrated)
 * @param dataDir DATA_DIR: the synthetic raw files go to dataDir/files by SHA-256
 * @param members who gets which role in the new lab (e.g. the demo people)
 * @param options seed of the generator (default 20261201), lab name
 * @returns ids and counts
 */
export function seedLarge(
  db: Db,
  dataDir: string,
  members: readonly { userId: string; role: Role }[],
  options: { seed?: number; labName?: string } = {},
): LargeSeedResult {
  const started = performance.now();
  const random = createSeededRandom(options.seed ?? 20261201).uniform;
  const gauss = () => Math.sqrt(-2 * Math.log(Math.max(random(), 1e-300))) * Math.cos(2 * Math.PI * random());
  const now = Date.now();
  const labId = randomUUID();
  const leadId = members.find((m) => m.role === "lead")?.userId ?? members[0]?.userId ?? null;
  db.transaction(() => {
    db.insert(labs)
      .values({
        id: labId,
        name: options.labName ?? "Scale-test lab (synthetic, SEED=large)",
        organisation: "Fenwick Hollow Institute of Solid-State Science — fictional; all data are synthetic",
        contactEmail: "",
        createdAt: now,
      })
      .run();
    for (const m of members) db.insert(memberships).values({ labId, userId: m.userId, role: m.role, createdAt: now }).run();
  });

  const { batches: nBatches, samplesPerBatch, runsPerSample, pointsPerRun } = LARGE_SEED_SIZE;
  let runCount = 0;
  let pointCount = 0;
  let fitCount = 0;
  for (let b = 0; b < nBatches; b++) {
    const batchId = randomUUID();
    const x = b / (nBatches - 1);
    // θ_D falls along the series (invented trend), each sample scatters around its batch.
    const batchTheta = 305 - 25 * x;
    const sampleRows: (typeof samples.$inferInsert)[] = [];
    const runRows: (typeof runs.$inferInsert)[] = [];
    const pointRows: (typeof runPoints.$inferInsert)[] = [];
    const fileRows: (typeof storedFiles.$inferInsert)[] = [];
    const fitRows: (typeof fits.$inferInsert)[] = [];
    const paramRows: (typeof fitParameters.$inferInsert)[] = [];
    const files: { sha256: string; bytes: Buffer }[] = [];
    for (let s = 0; s < samplesPerBatch; s++) {
      const sampleId = randomUUID();
      const label = `SL-${String(b + 1).padStart(2, "0")}-${String(s + 1).padStart(2, "0")}`;
      const sampleTheta = batchTheta + 2 * gauss();
      const gamma = 0.004 + 0.002 * x + 0.0002 * gauss();
      const massMg = 5 + 20 * random();
      sampleRows.push({
        id: sampleId,
        labId,
        batchId,
        label,
        formula: "Ba8Ga16Ge30",
        molarMassGPerMol: MOLAR_MASS,
        atomsPerFormulaUnit: ATOMS,
        massMg,
        massSigmaMg: 0.02,
        compositionX: Number(x.toFixed(3)),
        compositionName: "x (synthetic Zn fraction)",
        notes: "synthetic, SEED=large",
        createdBy: leadId,
        createdAt: now + s,
        updatedAt: now + s,
      });
      for (let r = 0; r < runsPerSample; r++) {
        const runId = randomUUID();
        const theta = sampleTheta + gauss();
        const beta = (12 * Math.PI ** 4 * ATOMS * R) / (5 * theta ** 3);
        const temps = Array.from({ length: pointsPerRun }, (_, i) => 2 + (18 * i) / (pointsPerRun - 1));
        const cps = temps.map((t) => (gamma * t + beta * t ** 3) * (1 + 0.003 * gauss()));
        const text =
          `# SYNTHETIC DATA (SEED=large), invented for scale tests: ${label} run ${r + 1}\n` +
          "Temperature (K),Heat capacity (J/(mol K))\n" +
          temps.map((t, i) => `${t.toFixed(4)},${cps[i].toExponential(6)}`).join("\n") +
          "\n";
        const bytes = Buffer.from(text, "utf8");
        const sha256 = createHash("sha256").update(bytes).digest("hex");
        files.push({ sha256, bytes });
        fileRows.push({ sha256, sizeBytes: bytes.byteLength, createdAt: now });
        runRows.push({
          id: runId,
          labId,
          sampleId,
          kind: "sample",
          label: `${label} run ${r + 1}`,
          fileSha256: sha256,
          fileName: `${label}-run-${r + 1}.csv`,
          mapping: {
            columns: { temperature: "Temperature (K)", heatCapacity: "Heat capacity (J/(mol K))" },
            units: { temperature: "K", heatCapacity: "J/(mol*K)" },
          },
          massMg,
          molarMassGPerMol: MOLAR_MASS,
          atomsPerFormulaUnit: ATOMS,
          pointCount: pointsPerRun,
          tMinK: temps[0],
          tMaxK: temps[temps.length - 1],
          warnings: [],
          notes: "synthetic, SEED=large",
          createdBy: leadId,
          createdAt: now + r,
        });
        temps.forEach((t, idx) =>
          pointRows.push({ runId, idx, temperatureK: t, cp: cps[idx], cpSigma: cps[idx] * 0.003, rowsAveraged: 1, sourceLine: idx + 3, masked: false }),
        );
        const fitId = randomUUID();
        const debye = r % 2 === 0;
        const params = debye
          ? [
              { name: "gamma", value: gamma * (1 + 0.01 * gauss()), stderr: 0.00008, stderrMass: 0.00003, unit: "J/(mol·K²)", fixed: false },
              { name: "thetaD", value: theta + 0.5 * gauss(), stderr: 0.9, stderrMass: 0.4, unit: "K", fixed: false },
              { name: "nD", value: ATOMS, stderr: null, stderrMass: null, unit: "1", fixed: true },
            ]
          : [
              { name: "gamma", value: gamma * (1 + 0.01 * gauss()), stderr: 0.00006, stderrMass: 0.00002, unit: "J/(mol·K²)", fixed: false },
              { name: "beta", value: beta * (1 + 0.005 * gauss()), stderr: beta * 0.008, stderrMass: beta * 0.003, unit: "J/(mol·K⁴)", fixed: false },
            ];
        const free = params.filter((p) => !p.fixed);
        fitRows.push({
          id: fitId,
          labId,
          runId,
          state: "approved",
          model: debye
            ? { components: [{ kind: "electronic" }, { kind: "debye", dimension: 3 }], parameters: { nD: { value: ATOMS, fixed: true } } }
            : { components: [{ kind: "electronic" }, { kind: "t3" }] },
          windowMinK: 2,
          windowMaxK: 20,
          pointsUsed: pointsPerRun,
          maskedExcluded: 0,
          converged: true,
          stopReason: "synthetic (SEED=large): not fitted",
          chiSquare: 10 + random(),
          reducedChiSquare: 1 + 0.1 * random(),
          dof: pointsPerRun - free.length,
          aic: 14 + random(),
          bic: 15 + random(),
          covariance: free.map((p, i) => free.map((_, j) => (i === j ? (p.stderr ?? 0) ** 2 : 0))),
          correlation: free.map((_, i) => free.map((__, j) => (i === j ? 1 : 0))),
          result: {
            parameterOrder: params.map((p) => p.name),
            freeParameters: free.map((p) => p.name),
            warnings: [],
            weighting: "stated",
            atomsPerFormulaUnit: ATOMS,
            rawFileSha256: sha256,
            iterations: null,
            elapsedMs: 0,
            maskedIdx: [],
            windowIdx: [0, pointsPerRun - 1],
            startValues: {},
            massMg,
            massSigmaMg: 0.02,
          },
          inputSha256: sha256,
          softwareVersion: SOFTWARE_VERSION,
          notes: "synthetic, SEED=large",
          createdBy: leadId,
          createdAt: now + r,
          approvedBy: leadId,
          approvedAt: now + r + 1,
        });
        for (const p of params) paramRows.push({ fitId, name: p.name, value: p.value, stderr: p.stderr, stderrUnscaled: p.stderr, stderrMass: p.stderrMass, unit: p.unit, fixed: p.fixed });
      }
    }
    // Files first, rows after (as an upload does): a crash in between leaves only orphans the start-up sweep removes.
    for (const f of files) {
      const target = storedFilePath(dataDir, f.sha256);
      if (existsSync(target)) continue;
      mkdirSync(path.dirname(target), { recursive: true });
      writeFileSync(target, f.bytes);
    }
    db.transaction(() => {
      db.insert(batches)
        .values({ id: batchId, labId, code: `SL-${String(b + 1).padStart(2, "0")}`, method: "synthetic (SEED=large)", notes: `x = ${x.toFixed(3)}`, createdBy: leadId, createdAt: now + b })
        .run();
      const chunk = <T>(rows: T[], size: number, insert: (part: T[]) => void) => {
        for (let k = 0; k < rows.length; k += size) insert(rows.slice(k, k + size));
      };
      // SQLite allows 32,766 bound values per statement; these sizes stay far below it.
      chunk(sampleRows, 100, (part) => db.insert(samples).values(part).run());
      chunk(fileRows, 500, (part) => db.insert(storedFiles).values(part).onConflictDoNothing().run());
      chunk(runRows, 100, (part) => db.insert(runs).values(part).run());
      chunk(pointRows, 1000, (part) => db.insert(runPoints).values(part).run());
      chunk(fitRows, 100, (part) => db.insert(fits).values(part).run());
      chunk(paramRows, 1000, (part) => db.insert(fitParameters).values(part).run());
    });
    runCount += runRows.length;
    pointCount += pointRows.length;
    fitCount += fitRows.length;
  }
  return {
    labId,
    batches: nBatches,
    samples: nBatches * samplesPerBatch,
    runs: runCount,
    points: pointCount,
    approvedFits: fitCount,
    elapsedMs: performance.now() - started,
  };
}

/**
 * SEED=large on a fresh install: the scale-test lab with the three demo people in their demo roles.
 * @param db the database, just seeded with the demo lab
 * @param dataDir DATA_DIR
 * @param userIds demo user id by e-mail (from seedDemo)
 * @returns the line startServer logs
 */
export function seedLargeForDemo(db: Db, dataDir: string, userIds: Record<string, string>): string {
  const members = DEMO_PEOPLE.filter((p) => userIds[p.email]).map((p) => ({ userId: userIds[p.email], role: p.role }));
  const r = seedLarge(db, dataDir, members);
  return `SEED=large: added a scale-test lab (${r.samples} samples, ${r.runs} runs, ${r.approvedFits} approved fits, all synthetic) in ${(r.elapsedMs / 1000).toFixed(1)} s`;
}
