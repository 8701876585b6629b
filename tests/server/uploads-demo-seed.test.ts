import { createHash } from "node:crypto";
import { mkdtempSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { GAS_CONSTANT } from "@shared/physics/constants";
import * as debye from "@shared/physics/debye";
import * as einstein from "@shared/physics/einstein";
import { openDb } from "../../server/db/client";
import { runMigrations } from "../../server/db/migrate";
import { batches, runs, samples } from "../../server/db/schema";
import { seedDemo } from "../../server/db/seed";
import { DEMO_FIXTURES, readDemoData } from "../../server/db/seed-demo-runs";
import { getRunDetail, rawFileOf } from "../../server/services/runs";
import { storedFileList } from "./runs-helpers";

interface DemoModel {
  gamma: number;
  thetaD: number;
  nD: number;
  thetaE: number;
  nE: number;
}
// fixtures/demo/data.json, with the model fields the seed itself does not read.
const data = readDemoData() as unknown as {
  samples: { key: string; label: string; model: DemoModel }[];
  files: { file: string; sample?: string; noiseRelative: number; schottky?: { nS: number; gapKPerT: number } }[];
};

/** The generator's model (fixtures/demo/generate.py), evaluated with shared/physics (itself checked against mpmath 1.3.0). */
function model(m: DemoModel, T: number, schottky?: { nS: number; gapK: number }): number {
  let c = m.gamma * T + debye.evaluate([m.thetaD, m.nD], T) + (m.nE > 0 ? einstein.evaluate([m.thetaE, m.nE], T) : 0);
  if (schottky && schottky.gapK > 0) {
    // Two levels of equal degeneracy: n R (Δ/T)² e^{Δ/T}/(1 + e^{Δ/T})² (the generator's form).
    const y = schottky.gapK / T;
    c += (schottky.nS * GAS_CONSTANT * y * y * Math.exp(y)) / (1 + Math.exp(y)) ** 2;
  }
  return c;
}

async function seeded() {
  const dataDir = mkdtempSync(path.join(tmpdir(), "thetafold-seed-"));
  const db = openDb(path.join(dataDir, "thetafold.db"));
  runMigrations(db);
  const { labId } = await seedDemo(db, { password: "one demo password" });
  return { db, dataDir, labId };
}

describe("demo seed: the synthetic series uploaded through the upload services", () => {
  it("makes three batches of two samples, a copper reference, an addenda run and one run per file (two for the two-field file)", async () => {
    const { db, dataDir } = await seeded();
    expect(db.select().from(batches).all().map((b) => b.code).sort()).toEqual(["SIG-B1", "SIG-B2", "SIG-B3"]);
    const all = db.select().from(samples).all();
    expect(all).toHaveLength(7);
    for (const b of db.select().from(batches).all()) expect(all.filter((s) => s.batchId === b.id)).toHaveLength(2);
    expect(all.every((s) => /SYNTHETIC/.test(s.notes))).toBe(true);
    expect(all.filter((s) => /off its batch/.test(s.notes)).map((s) => s.label)).toEqual(["SIG-B2-b"]);
    const runRows = db.select().from(runs).all();
    expect(runRows.filter((r) => r.kind === "addenda")).toHaveLength(1);
    // Seven sample files, one of them split by field into two runs.
    expect(runRows.filter((r) => r.kind === "sample")).toHaveLength(8);
    expect(runRows.filter((r) => r.addendaRunId !== null).map((r) => r.label)).toEqual(["Gross scan, platform P-2 addenda subtracted"]);
    // Every demo export is stored once, byte for byte, under its SHA-256.
    const shas = data.files.map((f) => createHash("sha256").update(readFileSync(path.join(DEMO_FIXTURES, f.file))).digest("hex"));
    expect(storedFileList(dataDir)).toEqual(shas.map((s) => `${s.slice(0, 2)}/${s}`).sort());
    for (const r of runRows) {
      const raw = rawFileOf(db, dataDir, r.labId, r.id);
      expect(readFileSync(raw.filePath).equals(readFileSync(path.join(DEMO_FIXTURES, r.fileName)))).toBe(true);
    }
  });

  it("reduces every demo file back to the generator's model within the stated noise (5 σ per point)", async () => {
    const { db, labId } = await seeded();
    const runRows = db.select().from(runs).all().filter((r) => r.kind === "sample");
    const sampleById = new Map(db.select().from(samples).all().map((s) => [s.id, s]));
    let checked = 0;
    for (const r of runRows) {
      const sample = sampleById.get(r.sampleId!)!;
      const demo = data.samples.find((s) => s.label === sample.label)!;
      const file = data.files.find((f) => f.file === r.fileName)!;
      const detail = getRunDetail(db, labId, r.id);
      const gapK = file.schottky && r.fieldT !== null ? file.schottky.gapKPerT * Math.round(r.fieldT) : 0;
      for (const p of detail.points) {
        const expected = model(demo.model, p.temperatureK, file.schottky ? { nS: file.schottky.nS, gapK } : undefined);
        // σ as the file states it (noiseRelative of the value), combined with the addenda's where one was subtracted.
        const sigma = p.cpSigma ?? file.noiseRelative * expected;
        expect(Math.abs(p.cp - expected), `${r.fileName} at ${p.temperatureK} K`).toBeLessThan(5 * sigma + 1e-3 * expected);
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(600);
  });
});
