import { randomUUID } from "node:crypto";
import { and, asc, count, desc, eq, inArray, or, sql, type AnyColumn, type SQL } from "drizzle-orm";
import { parseFormula } from "@shared/ingest/formula";
import type { CreateSampleBody, Sample, SampleDetail, SampleListQuery, UpdateSampleBody } from "@shared/schemas/samples";
import type { Db } from "../db/client";
import { batches, runs, samples } from "../db/schema";
import { HttpError } from "../http-error";
import { audit } from "./audit";
import { getBatchRow } from "./batches";
import { dropUnreferencedFileRows, unlinkStoredFiles } from "./files";
import { listSampleRuns } from "./runs";

type SampleRow = typeof samples.$inferSelect;

function iso(ms: number): string {
  return new Date(ms).toISOString();
}

function toSample(row: SampleRow, batchCode: string | null, runCount: number): Sample {
  return {
    id: row.id,
    label: row.label,
    batchId: row.batchId,
    batchCode,
    formula: row.formula,
    molarMassGPerMol: row.molarMassGPerMol,
    molarMassOverrideReason: row.molarMassOverrideReason,
    atomsPerFormulaUnit: row.atomsPerFormulaUnit,
    atomsOverrideReason: row.atomsOverrideReason,
    massMg: row.massMg,
    massSigmaMg: row.massSigmaMg,
    compositionX: row.compositionX,
    compositionName: row.compositionName,
    notes: row.notes,
    runCount,
    createdAt: iso(row.createdAt),
    updatedAt: iso(row.updatedAt),
  };
}

/**
 * Molar mass and atom count for a formula, each either from the formula or from an override.
 * @param formula chemical formula (already checked by the shared schema)
 * @param override values in g/mol and atoms per formula unit, null/undefined to derive
 * @returns what reduction uses, in g/mol and atoms per formula unit
 * @throws HttpError 400 when the formula cannot be read (the schema normally catches this first)
 */
function resolveComposition(
  formula: string,
  override: { molarMassGPerMol?: number | null; atomsPerFormulaUnit?: number | null },
): { molarMassGPerMol: number; atomsPerFormulaUnit: number } {
  let derived: ReturnType<typeof parseFormula>;
  try {
    derived = parseFormula(formula);
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    throw new HttpError(400, "VALIDATION_FAILED", `formula: ${message}`, [{ path: "formula", message }]);
  }
  return {
    molarMassGPerMol: override.molarMassGPerMol ?? derived.molarMassGPerMol,
    atomsPerFormulaUnit: override.atomsPerFormulaUnit ?? derived.atomsPerFormulaUnit,
  };
}

function runCounts(db: Db, sampleIds: string[]): Map<string, number> {
  if (sampleIds.length === 0) return new Map();
  return new Map(
    db
      .select({ sampleId: runs.sampleId, n: count() })
      .from(runs)
      .where(inArray(runs.sampleId, sampleIds))
      .groupBy(runs.sampleId)
      .all()
      .map((r) => [r.sampleId!, r.n]),
  );
}

const sortColumns = {
  label: samples.label,
  createdAt: samples.createdAt,
  massMg: samples.massMg,
  compositionX: samples.compositionX,
  formula: samples.formula,
  batch: batches.code,
} as const;

/**
 * The lab's samples, filtered and sorted.
 * @param db the database
 * @param labId the lab
 * @param query `q` matches label, formula, notes, composition name and batch code (case-insensitive
 *   substring); `batchId` keeps one batch ("none" keeps samples without a batch); `sort` and `order`
 * @returns the samples (an empty list when none match)
 */
export function listSamples(
  db: Db,
  labId: string,
  query: SampleListQuery,
): Sample[] {
  const where: SQL[] = [eq(samples.labId, labId)];
  if (query.batchId === "none") where.push(sql`${samples.batchId} is null`);
  else if (query.batchId) where.push(eq(samples.batchId, query.batchId));
  if (query.q) {
    // LIKE with an escape character, so % and _ in the search text are literal.
    const pattern = `%${query.q.toLowerCase().replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    const ci = (col: SQL | AnyColumn) => sql`lower(${col}) like ${pattern} escape '\\'`;
    where.push(or(ci(samples.label), ci(samples.formula), ci(samples.notes), ci(sql`coalesce(${samples.compositionName}, '')`), ci(sql`coalesce(${batches.code}, '')`))!);
  }
  const column = sortColumns[query.sort];
  const direction = query.order === "desc" ? desc : asc;
  const rows = db
    .select({ sample: samples, batchCode: batches.code })
    .from(samples)
    .leftJoin(batches, eq(batches.id, samples.batchId))
    .where(and(...where))
    // Nulls (no x, no batch) last either way; label breaks ties so the order is stable.
    .orderBy(sql`${column} is null`, direction(column), asc(samples.label), asc(samples.id))
    .all();
  const counts = runCounts(
    db,
    rows.map((r) => r.sample.id),
  );
  return rows.map((r) => toSample(r.sample, r.batchCode, counts.get(r.sample.id) ?? 0));
}

/**
 * One sample row of the lab.
 * @throws HttpError 404 when the sample is not in this lab
 */
export function getSampleRow(db: Db, labId: string, sampleId: string): SampleRow {
  const row = db.select().from(samples).where(and(eq(samples.labId, labId), eq(samples.id, sampleId))).get();
  if (!row) throw new HttpError(404, "NOT_FOUND", "No such sample in this lab");
  return row;
}

/**
 * A sample with what its formula alone gives and its runs (newest first).
 * @throws HttpError 404 when the sample is not in this lab
 */
export function getSampleDetail(db: Db, labId: string, sampleId: string): SampleDetail {
  const row = getSampleRow(db, labId, sampleId);
  const batchCode = row.batchId
    ? (db.select({ code: batches.code }).from(batches).where(eq(batches.id, row.batchId)).get()?.code ?? null)
    : null;
  const sampleRuns = listSampleRuns(db, labId, sampleId);
  let derived = { molarMassGPerMol: row.molarMassGPerMol, atomsPerFormulaUnit: row.atomsPerFormulaUnit };
  try {
    const f = parseFormula(row.formula);
    derived = { molarMassGPerMol: f.molarMassGPerMol, atomsPerFormulaUnit: f.atomsPerFormulaUnit };
  } catch {
    // A formula stored before a reader change: the stored values stand.
  }
  return { ...toSample(row, batchCode, sampleRuns.length), derived, runs: sampleRuns };
}

/**
 * Creates a sample; molar mass and atoms per formula unit come from the formula unless overridden.
 * @param db the database
 * @param labId the lab
 * @param userId who creates it
 * @param input the parsed CreateSampleBody (mass in mg, molar mass in g/mol)
 * @returns the new sample
 * @throws HttpError 404 when batchId names no batch of this lab
 */
export function createSample(db: Db, labId: string, userId: string, input: CreateSampleBody): Sample {
  if (input.batchId) getBatchRow(db, labId, input.batchId);
  const composition = resolveComposition(input.formula, input);
  const now = Date.now();
  const row: SampleRow = {
    id: randomUUID(),
    labId,
    batchId: input.batchId ?? null,
    label: input.label,
    formula: input.formula,
    molarMassGPerMol: composition.molarMassGPerMol,
    molarMassOverrideReason: input.molarMassGPerMol != null ? (input.molarMassOverrideReason ?? null) : null,
    atomsPerFormulaUnit: composition.atomsPerFormulaUnit,
    atomsOverrideReason: input.atomsPerFormulaUnit != null ? (input.atomsOverrideReason ?? null) : null,
    massMg: input.massMg,
    massSigmaMg: input.massSigmaMg ?? 0,
    compositionX: input.compositionX ?? null,
    compositionName: input.compositionName || null,
    notes: input.notes ?? "",
    createdBy: userId,
    createdAt: now,
    updatedAt: now,
  };
  db.transaction(() => {
    db.insert(samples).values(row).run();
    audit(db, { labId, userId, action: "sample.created", target: row.label });
  });
  const batchCode = row.batchId ? getBatchRow(db, labId, row.batchId).code : null;
  return toSample(row, batchCode, 0);
}

/**
 * Changes a sample. Runs already committed keep the mass and molar mass they were reduced with.
 * An override set to null returns to the value from the (possibly new) formula.
 * @param db the database
 * @param labId the lab
 * @param userId who edits
 * @param sampleId the sample
 * @param patch the parsed UpdateSampleBody
 * @returns the updated sample
 * @throws HttpError 404 for an unknown sample or batch; 400 when the result has an override without a reason
 */
export function updateSample(
  db: Db,
  labId: string,
  userId: string,
  sampleId: string,
  patch: UpdateSampleBody,
): Sample {
  const row = getSampleRow(db, labId, sampleId);
  if (patch.batchId) getBatchRow(db, labId, patch.batchId);
  const formula = patch.formula ?? row.formula;
  const keepMass = patch.molarMassGPerMol === undefined && row.molarMassOverrideReason !== null;
  const keepAtoms = patch.atomsPerFormulaUnit === undefined && row.atomsOverrideReason !== null;
  const molarOverride = keepMass ? row.molarMassGPerMol : (patch.molarMassGPerMol ?? null);
  const atomsOverride = keepAtoms ? row.atomsPerFormulaUnit : (patch.atomsPerFormulaUnit ?? null);
  const molarReason = molarOverride === null ? null : (patch.molarMassOverrideReason ?? row.molarMassOverrideReason);
  const atomsReason = atomsOverride === null ? null : (patch.atomsOverrideReason ?? row.atomsOverrideReason);
  if (molarOverride !== null && !molarReason) {
    throw new HttpError(400, "VALIDATION_FAILED", "molarMassOverrideReason: Say why the molar mass differs from the formula", [
      { path: "molarMassOverrideReason", message: "Say why the molar mass differs from the formula" },
    ]);
  }
  if (atomsOverride !== null && !atomsReason) {
    throw new HttpError(400, "VALIDATION_FAILED", "atomsOverrideReason: Say why the atom count differs from the formula", [
      { path: "atomsOverrideReason", message: "Say why the atom count differs from the formula" },
    ]);
  }
  const composition = resolveComposition(formula, { molarMassGPerMol: molarOverride, atomsPerFormulaUnit: atomsOverride });
  const massMg = patch.massMg ?? row.massMg;
  const massSigmaMg = patch.massSigmaMg ?? row.massSigmaMg;
  if (massSigmaMg >= massMg) {
    throw new HttpError(400, "VALIDATION_FAILED", "massSigmaMg: The mass uncertainty must be smaller than the mass", [
      { path: "massSigmaMg", message: "The mass uncertainty must be smaller than the mass" },
    ]);
  }
  const next: SampleRow = {
    ...row,
    label: patch.label ?? row.label,
    batchId: patch.batchId === undefined ? row.batchId : patch.batchId,
    formula,
    molarMassGPerMol: composition.molarMassGPerMol,
    molarMassOverrideReason: molarReason,
    atomsPerFormulaUnit: composition.atomsPerFormulaUnit,
    atomsOverrideReason: atomsReason,
    massMg,
    massSigmaMg,
    compositionX: patch.compositionX === undefined ? row.compositionX : patch.compositionX,
    compositionName: patch.compositionName === undefined ? row.compositionName : patch.compositionName || null,
    notes: patch.notes ?? row.notes,
    updatedAt: Date.now(),
  };
  db.transaction(() => {
    db.update(samples).set(next).where(eq(samples.id, row.id)).run();
    audit(db, { labId, userId, action: "sample.updated", target: next.label, details: { fields: Object.keys(patch) } });
  });
  const batchCode = next.batchId ? getBatchRow(db, labId, next.batchId).code : null;
  return toSample(next, batchCode, runCounts(db, [row.id]).get(row.id) ?? 0);
}

/**
 * Deletes a sample with its runs, their points and fits (cascade), and the stored raw files no other
 * run or bundle uses.
 * @param db the database
 * @param dataDir where stored files live
 * @param labId the lab
 * @param userId who deletes (a lead; the route checks)
 * @param sampleId the sample
 * @throws HttpError 404 for an unknown sample
 */
export function deleteSample(db: Db, dataDir: string, labId: string, userId: string, sampleId: string): void {
  const row = getSampleRow(db, labId, sampleId);
  const freed = db.transaction(() => {
    const shas = db.select({ s: runs.fileSha256 }).from(runs).where(eq(runs.sampleId, row.id)).all().map((r) => r.s);
    db.delete(samples).where(eq(samples.id, row.id)).run();
    audit(db, { labId, userId, action: "sample.deleted", target: row.label, details: { runs: shas.length } });
    return dropUnreferencedFileRows(db, shas);
  });
  unlinkStoredFiles(dataDir, freed);
}
