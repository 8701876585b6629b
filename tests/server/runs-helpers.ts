import { existsSync, readdirSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import { count } from "drizzle-orm";
import type { Test } from "supertest";
import { batches, importPresets, runPoints, runs, samples, storedFiles } from "../../server/db/schema";
import type { TestApp } from "../helpers/app";

/** Repository root, for reading fixture files. */
export const ROOT = path.resolve(import.meta.dirname, "../..");

/** Bytes of a fixture file, e.g. fixture("ingest/copper/export-j-per-k.csv"). */
export function fixture(rel: string): Buffer {
  return readFileSync(path.join(ROOT, "fixtures", rel));
}

/** Every file (not folder) under DATA_DIR/files, as paths relative to it; half-written temp files included. */
export function storedFileList(dataDir: string): string[] {
  const root = path.join(dataDir, "files");
  if (!existsSync(root)) return [];
  const out: string[] = [];
  const walk = (dir: string) => {
    for (const name of readdirSync(dir)) {
      const p = path.join(dir, name);
      if (statSync(p).isDirectory()) walk(p);
      else out.push(path.relative(root, p));
    }
  };
  walk(root);
  return out.sort();
}

/** Row counts of every table an upload may touch, and the files on disk. */
export function footprint(t: TestApp) {
  const n = (table: typeof runs | typeof runPoints | typeof storedFiles | typeof samples | typeof batches | typeof importPresets) =>
    t.db.select({ n: count() }).from(table).get()!.n;
  return {
    runs: n(runs),
    points: n(runPoints),
    storedFiles: n(storedFiles),
    samples: n(samples),
    batches: n(batches),
    presets: n(importPresets),
    files: storedFileList(t.dataDir),
  };
}

/** Attaches a file and optional text fields to a multipart request. */
export function withUpload(req: Test, bytes: Buffer, fileName: string, fields: Record<string, unknown> = {}): Test {
  for (const [k, v] of Object.entries(fields)) {
    if (v === undefined) continue;
    req.field(k, typeof v === "string" ? v : JSON.stringify(v));
  }
  return req.attach("file", bytes, fileName);
}

/** The copper fixture's mapping for each of its files (columns and units as written in their headers). */
export const COPPER_MAPPINGS = {
  "export-j-per-k.csv": {
    columns: { temperature: "Temperature (K)", heatCapacity: "Heat capacity (J/K)" },
    units: { temperature: "K", heatCapacity: "J/K" },
  },
  "export-mj-per-k.csv": {
    columns: { temperature: "Temperature [K]", heatCapacity: "Heat Capacity [mJ/K]", sigma: "Uncertainty [mJ/K]" },
    units: { temperature: "K", heatCapacity: "mJ/K" },
  },
  "export-uj-per-k.txt": {
    columns: { temperature: "T (K)", heatCapacity: "Cp (µJ/K)", sigma: "Cp error (µJ/K)" },
    units: { temperature: "K", heatCapacity: "uJ/K" },
  },
  "export-j-per-g-k.dat": {
    columns: { temperature: "T (K)", heatCapacity: "c (J/(g K))", sigma: "sigma (J/(g K))" },
    units: { temperature: "K", heatCapacity: "J/(g*K)" },
  },
} as const;
