import { mkdtempSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import type { ImportMappingInput } from "@shared/schemas/ingest";
import { ImportMappingSchema } from "@shared/schemas/ingest";
import { createBatch } from "../services/batches";
import { createImportPreset } from "../services/import-presets";
import { commitAddendaRun, commitSampleRun, previewAddendaRun, previewSampleRun } from "../services/runs";
import { createSample } from "../services/samples";
import type { Db } from "./client";
import type { SeedContext, SeedStep } from "./seed";

/*
 * The demo series: SYNTHETIC calorimeter exports made by fixtures/demo/generate.py (an invented
 * substitution series, a copper reference piece, an addenda run), uploaded at seed time through the same
 * service functions as a user's upload: preview, then commit. fixtures/demo/data.json says which file
 * belongs to which sample and how its columns are read.
 */

/** Where the demo exports and their description live. */
export const DEMO_FIXTURES = fileURLToPath(new URL("../../fixtures/demo/", import.meta.url));

interface DemoData {
  batches: { code: string; compositionX: number; synthesisDate: string; method: string; notes: string }[];
  samples: {
    key: string;
    label: string;
    batch: string | null;
    formula: string;
    massMg: number;
    massSigmaMg: number;
    compositionX: number | null;
    compositionName: string | null;
    notes: string;
  }[];
  files: {
    file: string;
    label: string;
    mapping: ImportMappingInput;
    sample?: string;
    addendaPlatform?: string;
    subtractAddenda?: boolean;
  }[];
  presets: { name: string; mapping: ImportMappingInput }[];
}

/** The demo series description (fixtures/demo/data.json). */
export function readDemoData(): DemoData {
  return JSON.parse(readFileSync(path.join(DEMO_FIXTURES, "data.json"), "utf8")) as DemoData;
}

/**
 * DATA_DIR of a database opened by startServer: the folder of its SQLite file (DATA_DIR holds both).
 * An in-memory database (tests) gets a fresh temporary folder.
 */
function dataDirOf(db: Db, ctx: SeedContext): string {
  const given = (ctx as SeedContext & { dataDir?: string }).dataDir;
  if (given) return given;
  const file = db.$client.name;
  if (file && file !== ":memory:") return path.dirname(path.resolve(file));
  return mkdtempSync(path.join(tmpdir(), "thetafold-demo-"));
}

/** Seed step: demo batches, samples, the addenda run, every demo run, and one import preset. */
export const seedDemoRuns: SeedStep = {
  name: "demo samples and runs",
  run(db, ctx) {
    const labId = ctx.labId;
    const userId = ctx.userIds["researcher@example.org"];
    if (!labId || !userId) throw new Error("seedDemoRuns needs the demo lab and researcher (run seedLabAndPeople first)");
    const dataDir = dataDirOf(db, ctx);
    const data = readDemoData();

    const batchIds = new Map<string, string>();
    for (const b of data.batches) {
      const batch = createBatch(db, labId, userId, { code: b.code, synthesisDate: b.synthesisDate, method: b.method, notes: b.notes });
      batchIds.set(b.code, batch.id);
    }
    const sampleIds = new Map<string, string>();
    for (const s of data.samples) {
      const sample = createSample(db, labId, userId, {
        label: s.label,
        batchId: s.batch ? batchIds.get(s.batch) : null,
        formula: s.formula,
        massMg: s.massMg,
        massSigmaMg: s.massSigmaMg,
        compositionX: s.compositionX,
        compositionName: s.compositionName,
        notes: s.notes,
      });
      sampleIds.set(s.key, sample.id);
    }

    let addendaRunId: string | undefined;
    for (const f of data.files) {
      const bytes = new Uint8Array(readFileSync(path.join(DEMO_FIXTURES, f.file)));
      const upload = { bytes, fileName: f.file };
      const mapping = JSON.stringify(ImportMappingSchema.parse(f.mapping));
      if (f.addendaPlatform) {
        const fields = { mapping, platform: f.addendaPlatform, label: f.label };
        previewAddendaRun(db, labId, upload, fields);
        addendaRunId = commitAddendaRun(db, dataDir, labId, userId, upload, fields).runs[0].id;
        continue;
      }
      const sampleId = sampleIds.get(f.sample ?? "");
      if (!sampleId) throw new Error(`fixtures/demo/data.json: file ${f.file} names no known sample`);
      if (f.subtractAddenda && !addendaRunId) throw new Error(`fixtures/demo/data.json: ${f.file} needs the addenda run listed before it`);
      const fields = { mapping, label: f.label, ...(f.subtractAddenda ? { addendaRunId } : {}) };
      previewSampleRun(db, labId, sampleId, upload, fields);
      commitSampleRun(db, dataDir, labId, userId, sampleId, upload, fields);
    }

    for (const p of data.presets) createImportPreset(db, labId, userId, { name: p.name, mapping: ImportMappingSchema.parse(p.mapping) });
  },
};
