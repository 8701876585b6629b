import { randomUUID } from "node:crypto";
import { existsSync } from "node:fs";
import { and, asc, count, desc, eq, inArray, sql } from "drizzle-orm";
import { isIngestError, type IngestError } from "@shared/ingest/ingest-error";
import { proposeMapping } from "@shared/ingest/column-map";
import { decodeBytes, readDelimited, summarizeTable, type DelimitedTable } from "@shared/ingest/read-delimited";
import { reduceAddendaTable, reduceTable, type TotalPoint } from "@shared/ingest/reduce";
import { ImportMappingSchema, type ImportMapping, type ReducedRun } from "@shared/schemas/ingest";
import type { ApiErrorDetail } from "@shared/schemas/api-error";
import {
  DUPLICATE_RUN_PATH_PREFIX,
  type MaskResult,
  type RunCommitResult,
  type RunDetail,
  type RunPoint,
  type RunSummary,
  type RunUploadPreview,
  type UploadedFile,
} from "@shared/schemas/runs";
import type { Db } from "../db/client";
import { runPoints, runs, samples, storedFiles, users } from "../db/schema";
import { HttpError } from "../http-error";
import { audit } from "./audit";
import { putStoredFile, removeIfUnreferenced, sha256Hex, storedFilePath } from "./files";

/*
 * Runs: upload preview and commit (sample runs and addenda runs), read, mask, and the two downloads.
 * Reading and reduction are shared/ingest's; this file adds the sample's numbers, the file store and the
 * one transaction that writes the file row, the run rows and every point.
 */

type RunRow = typeof runs.$inferSelect;
type SampleRow = typeof samples.$inferSelect;

/** An uploaded file as multer hands it over. */
export interface UploadInput {
  bytes: Uint8Array;
  fileName: string;
}

/** Text fields that came with a sample-run upload (already checked by SampleRunUploadFields). */
export interface SampleRunFields {
  mapping?: string;
  label?: string;
  addendaRunId?: string;
  notes?: string;
}

/** Text fields that came with an addenda-run upload (already checked by AddendaRunUploadFields). */
export interface AddendaRunFields {
  mapping?: string;
  platform: string;
  label?: string;
  notes?: string;
}

// IngestError codes for input that reads fine but cannot be done (STYLE §4: 422); the rest are 400.
const UNPROCESSABLE_CODES = new Set<IngestError["code"]>(["UNIT_NOT_TOTAL", "INVALID_SAMPLE", "INVALID_ADDENDA"]);

/**
 * Turns a refusal of shared/ingest into the API error: 400 (or 422 for a possible-to-read but impossible
 * request), the message naming line and column, and one detail per problem with `line` and `column`.
 * @param e any thrown value
 * @returns an HttpError for an IngestError, else the value unchanged
 */
export function fromIngestError(e: unknown): unknown {
  if (!isIngestError(e)) return e;
  const details: ApiErrorDetail[] = e.issues.map((i) => ({
    ...(i.line !== null ? { line: i.line } : {}),
    ...(i.column !== null ? { column: i.column } : {}),
    message: i.message,
  }));
  const status = UNPROCESSABLE_CODES.has(e.code) ? 422 : 400;
  return new HttpError(status, status === 422 ? "UNPROCESSABLE" : "VALIDATION_FAILED", e.message, details);
}

function ingest<T>(fn: () => T): T {
  try {
    return fn();
  } catch (e) {
    throw fromIngestError(e);
  }
}

/**
 * Reads the JSON `mapping` field of an upload.
 * @param text the field as sent, or undefined
 * @returns the checked mapping, or null when absent
 * @throws HttpError 400 for invalid JSON or a mapping that fails ImportMappingSchema (paths "mapping.…")
 */
export function parseMappingField(text: string | undefined): ImportMapping | null {
  if (text === undefined || text.trim() === "") return null;
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch {
    throw new HttpError(400, "VALIDATION_FAILED", "mapping: not valid JSON", [{ path: "mapping", message: "not valid JSON" }]);
  }
  const parsed = ImportMappingSchema.safeParse(raw);
  if (!parsed.success) {
    const details = parsed.error.issues.map((i) => ({ path: ["mapping", ...i.path].join("."), message: i.message }));
    throw new HttpError(400, "VALIDATION_FAILED", `${details[0].path}: ${details[0].message}`, details);
  }
  return parsed.data;
}

/**
 * Reads an uploaded file as text and as a table.
 * @throws HttpError 400 naming line and column (empty, binary, no numeric rows, ragged, text, NaN…)
 */
function readUpload(file: UploadInput): DelimitedTable {
  if (file.bytes.byteLength === 0) {
    throw new HttpError(400, "VALIDATION_FAILED", "the file is empty", [{ path: "file", message: "the file is empty" }]);
  }
  return ingest(() => readDelimited(decodeBytes(file.bytes).text));
}

function displayName(db: Db, userId: string): string | null {
  return db.select({ n: users.displayName }).from(users).where(eq(users.id, userId)).get()?.n ?? null;
}

function iso(ms: number): string {
  return new Date(ms).toISOString();
}

// ---------------------------------------------------------------- reading runs

const summaryColumns = {
  run: runs,
  createdByName: users.displayName,
  maskedCount: sql<number>`(select count(*) from run_points p where p.run_id = ${runs.id} and p.masked = 1)`,
};

function toSummary(row: RunRow, maskedCount: number, createdByName: string | null): RunSummary {
  return {
    id: row.id,
    kind: row.kind,
    sampleId: row.sampleId,
    platform: row.platform,
    label: row.label,
    fileName: row.fileName,
    fileSha256: row.fileSha256,
    fieldT: row.fieldT,
    addendaRunId: row.addendaRunId,
    pointCount: row.pointCount,
    maskedCount: Number(maskedCount),
    tMinK: row.tMinK,
    tMaxK: row.tMaxK,
    warnings: row.warnings,
    notes: row.notes,
    createdAt: iso(row.createdAt),
    createdByName,
  };
}

/**
 * A sample's runs, newest first (runs split from one file stay together, by field).
 * @param db the database
 * @param labId the lab
 * @param sampleId the sample (not checked here)
 */
export function listSampleRuns(db: Db, labId: string, sampleId: string): RunSummary[] {
  return db
    .select(summaryColumns)
    .from(runs)
    .leftJoin(users, eq(users.id, runs.createdBy))
    .where(and(eq(runs.labId, labId), eq(runs.sampleId, sampleId)))
    .orderBy(desc(runs.createdAt), asc(runs.fileSha256), asc(runs.fieldT), asc(runs.id))
    .all()
    .map((r) => toSummary(r.run, r.maskedCount, r.createdByName));
}

/**
 * The lab's addenda runs, newest first.
 * @param db the database
 * @param labId the lab
 * @param platform keep only this platform (exact match), or all
 */
export function listAddendaRuns(db: Db, labId: string, platform?: string): RunSummary[] {
  const where = [eq(runs.labId, labId), eq(runs.kind, "addenda")];
  if (platform) where.push(eq(runs.platform, platform));
  return db
    .select(summaryColumns)
    .from(runs)
    .leftJoin(users, eq(users.id, runs.createdBy))
    .where(and(...where))
    .orderBy(desc(runs.createdAt), asc(runs.id))
    .all()
    .map((r) => toSummary(r.run, r.maskedCount, r.createdByName));
}

/**
 * One run row of the lab.
 * @throws HttpError 404 when the run is not in this lab
 */
export function getRunRow(db: Db, labId: string, runId: string): RunRow {
  const row = db.select().from(runs).where(and(eq(runs.labId, labId), eq(runs.id, runId))).get();
  if (!row) throw new HttpError(404, "NOT_FOUND", "No such run in this lab");
  return row;
}

/**
 * A run with its reduced points (temperature order; masked points included, flagged).
 * @param db the database
 * @param labId the lab
 * @param runId the run
 * @returns metadata, reduction inputs and points; a sample run's cp is J/(mol·K) per formula unit,
 *   cpPerAtom per mole of atoms; an addenda run's cp is J/K
 * @throws HttpError 404 when the run is not in this lab
 */
export function getRunDetail(db: Db, labId: string, runId: string): RunDetail {
  const row = getRunRow(db, labId, runId);
  const creator = row.createdBy ? db.select({ n: users.displayName }).from(users).where(eq(users.id, row.createdBy)).get() : undefined;
  const pts = db.select().from(runPoints).where(eq(runPoints.runId, row.id)).orderBy(asc(runPoints.idx)).all();
  const n = row.kind === "sample" ? row.atomsPerFormulaUnit : null;
  const points: RunPoint[] = pts.map((p) => ({
    index: p.idx,
    temperatureK: p.temperatureK,
    cp: p.cp,
    cpSigma: p.cpSigma,
    cpPerAtom: n ? p.cp / n : null,
    fieldT: p.fieldT,
    rowsAveraged: p.rowsAveraged,
    sourceLine: p.sourceLine,
    masked: p.masked,
  }));
  const sample = row.sampleId
    ? (db.select({ id: samples.id, label: samples.label, formula: samples.formula }).from(samples).where(eq(samples.id, row.sampleId)).get() ?? null)
    : null;
  const addenda = row.addendaRunId
    ? (db.select({ id: runs.id, label: runs.label, platform: runs.platform }).from(runs).where(eq(runs.id, row.addendaRunId)).get() ?? null)
    : null;
  const siblingWhere = row.sampleId
    ? and(eq(runs.fileSha256, row.fileSha256), eq(runs.sampleId, row.sampleId), eq(runs.createdAt, row.createdAt))
    : and(eq(runs.fileSha256, row.fileSha256), eq(runs.kind, "addenda"), eq(runs.platform, row.platform), eq(runs.labId, labId));
  const siblings = db
    .select({ id: runs.id, label: runs.label, fieldT: runs.fieldT })
    .from(runs)
    .where(siblingWhere)
    .orderBy(asc(runs.fieldT), asc(runs.id))
    .all()
    .filter((s) => s.id !== row.id);
  return {
    ...toSummary(row, points.filter((p) => p.masked).length, creator?.n ?? null),
    mapping: ImportMappingSchema.parse(row.mapping),
    massMg: row.massMg,
    molarMassGPerMol: row.molarMassGPerMol,
    atomsPerFormulaUnit: row.atomsPerFormulaUnit,
    cpUnit: row.kind === "sample" ? "J/(mol*K)" : "J/K",
    sample,
    addendaRun: addenda,
    siblings,
    points,
  };
}

/**
 * Masks or unmasks points. Points are never deleted; masking is reversible and kept in exports.
 * @param db the database
 * @param labId the lab
 * @param userId who masks
 * @param runId the run
 * @param indices point indices (RunPoint.index)
 * @param masked true to mask, false to unmask
 * @returns how many points are masked now and how many changed
 * @throws HttpError 404 for an unknown run; 400 naming an index the run does not have
 */
export function maskPoints(db: Db, labId: string, userId: string, runId: string, indices: readonly number[], masked: boolean): MaskResult {
  const row = getRunRow(db, labId, runId);
  const unique = [...new Set(indices)];
  const bad = unique.findIndex((i) => i >= row.pointCount);
  if (bad >= 0) {
    const k = indices.indexOf(unique[bad]);
    throw new HttpError(400, "VALIDATION_FAILED", `indices.${k}: the run has points 0 to ${row.pointCount - 1}, not ${unique[bad]}`, [
      { path: `indices.${k}`, message: `no point ${unique[bad]} in this run` },
    ]);
  }
  const changed = db.transaction(() => {
    let n = 0;
    // SQLite limits bound variables per statement; 500 indices at a time stays far below it.
    for (let k = 0; k < unique.length; k += 500) {
      const chunk = unique.slice(k, k + 500);
      n += db
        .update(runPoints)
        .set({ masked })
        .where(and(eq(runPoints.runId, row.id), inArray(runPoints.idx, chunk), eq(runPoints.masked, !masked)))
        .run().changes;
    }
    audit(db, { labId, userId, action: masked ? "run.points_masked" : "run.points_unmasked", target: row.label, details: { runId: row.id, changed: n } });
    return n;
  });
  const maskedCount = db.select({ n: count() }).from(runPoints).where(and(eq(runPoints.runId, row.id), eq(runPoints.masked, true))).get()!.n;
  return { runId: row.id, maskedCount, changed };
}

/**
 * Where the raw file of a run is, and the name it was uploaded under.
 * @throws HttpError 404 for an unknown run, 500-class Error when the stored file is missing on disk
 */
export function rawFileOf(db: Db, dataDir: string, labId: string, runId: string): { filePath: string; fileName: string; sha256: string } {
  const row = getRunRow(db, labId, runId);
  const filePath = storedFilePath(dataDir, row.fileSha256);
  if (!existsSync(filePath)) throw new Error(`stored file ${row.fileSha256} of run ${row.id} is missing from ${dataDir}`);
  return { filePath, fileName: row.fileName, sha256: row.fileSha256 };
}

// Cells starting with these are read as formulas by spreadsheet programs (OWASP, "CSV Injection").
const FORMULA_START = /^[=+\-@\t\r]/;
// Numbers as this file writes them: they cannot hold a formula, so a leading minus stays a minus.
const PLAIN_NUMBER = /^-?(?:\d+\.?\d*|\.\d+)(?:e[+-]?\d+)?$/i;

/**
 * One CSV cell: quoted when it holds a delimiter, quote or line break; a text cell that starts with
 * = + - @ tab or CR gets a leading apostrophe so no spreadsheet runs it as a formula.
 */
export function csvCell(value: string | number | boolean | null): string {
  if (value === null) return "";
  if (typeof value === "boolean") return value ? "true" : "false";
  const text = typeof value === "number" ? (Number.isFinite(value) ? String(value) : "") : value;
  const safe = FORMULA_START.test(text) && !(typeof value === "number" || PLAIN_NUMBER.test(text)) ? `'${text}` : text;
  return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}

/**
 * The reduced run as CSV: a few `#` lines naming the run, then one row per point, masked ones included
 * with `masked` = true. Comma-delimited, decimal point, UTF-8, LF line ends.
 * @param detail from getRunDetail
 * @returns the CSV text
 */
export function reducedCsv(detail: RunDetail): string {
  const lines: string[] = [];
  const meta: [string, string | number | null][] = [
    ["run", detail.label],
    ["kind", detail.kind],
    ["sample", detail.sample?.label ?? null],
    ["formula", detail.sample?.formula ?? null],
    ["molar mass g/mol", detail.molarMassGPerMol],
    ["atoms per formula unit", detail.atomsPerFormulaUnit],
    ["mass mg", detail.massMg],
    ["field T", detail.fieldT],
    ["platform", detail.platform || null],
    ["addenda run", detail.addendaRun?.label ?? null],
    ["raw file", detail.fileName],
    ["raw file sha256", detail.fileSha256],
  ];
  for (const [k, v] of meta) if (v !== null) lines.push(`# ${k},${csvCell(v)}`);
  if (detail.kind === "sample") {
    lines.push("index,temperature_K,cp_J_per_mol_K,cp_sigma_J_per_mol_K,cp_per_atom_J_per_mol_K,field_T,rows_averaged,source_line,masked");
  } else {
    lines.push("index,temperature_K,cp_J_per_K,cp_sigma_J_per_K,cp_per_atom_J_per_mol_K,field_T,rows_averaged,source_line,masked");
  }
  for (const p of detail.points) {
    lines.push(
      [p.index, p.temperatureK, p.cp, p.cpSigma, p.cpPerAtom, p.fieldT, p.rowsAveraged, p.sourceLine, p.masked].map(csvCell).join(","),
    );
  }
  return lines.join("\n") + "\n";
}

// ---------------------------------------------------------------- uploads

function fileIdentity(file: UploadInput, duplicateOfRunId: string | null, sha256 = sha256Hex(file.bytes)): UploadedFile {
  return { fileName: file.fileName, sizeBytes: file.bytes.byteLength, sha256, duplicateOfRunId };
}

function duplicateSampleRun(db: Db, labId: string, sampleId: string, sha256: string): RunRow | undefined {
  return db
    .select()
    .from(runs)
    .where(and(eq(runs.labId, labId), eq(runs.sampleId, sampleId), eq(runs.fileSha256, sha256)))
    .orderBy(asc(runs.createdAt), asc(runs.fieldT))
    .limit(1)
    .get();
}

function duplicateAddendaRun(db: Db, labId: string, platform: string, sha256: string): RunRow | undefined {
  return db
    .select()
    .from(runs)
    .where(and(eq(runs.labId, labId), eq(runs.kind, "addenda"), eq(runs.platform, platform), eq(runs.fileSha256, sha256)))
    .orderBy(asc(runs.createdAt))
    .limit(1)
    .get();
}

function duplicateError(first: RunRow, where: string): HttpError {
  return new HttpError(
    409,
    "CONFLICT",
    `This file was already uploaded to ${where} as run '${first.label}' on ${iso(first.createdAt).slice(0, 10)}`,
    [{ path: `${DUPLICATE_RUN_PATH_PREFIX}${first.id}`, message: `same SHA-256 as run '${first.label}'` }],
  );
}

/**
 * An addenda run's unmasked points as total heat capacity, for subtraction.
 * @throws HttpError 404 (path addendaRunId) when it is not an addenda run of this lab
 */
function loadAddenda(db: Db, labId: string, addendaRunId: string): { row: RunRow; points: TotalPoint[] } {
  const row = db.select().from(runs).where(and(eq(runs.labId, labId), eq(runs.id, addendaRunId))).get();
  if (!row || row.kind !== "addenda") {
    throw new HttpError(404, "NOT_FOUND", "addendaRunId: no addenda run with this id in this lab", [
      { path: "addendaRunId", message: "no such addenda run in this lab" },
    ]);
  }
  const points = db
    .select()
    .from(runPoints)
    .where(and(eq(runPoints.runId, row.id), eq(runPoints.masked, false)))
    .orderBy(asc(runPoints.idx))
    .all()
    .map((p) => ({ temperatureK: p.temperatureK, heatCapacityJPerK: p.cp, sigmaJPerK: p.cpSigma }));
  return { row, points };
}

function sampleBasis(sample: SampleRow) {
  return { massMg: sample.massMg, molarMassGPerMol: sample.molarMassGPerMol, atomsPerFormulaUnit: sample.atomsPerFormulaUnit };
}

function reduceSampleUpload(
  db: Db,
  labId: string,
  sample: SampleRow,
  table: DelimitedTable,
  mapping: ImportMapping,
  addendaRunId: string | undefined,
): { reduced: ReducedRun[]; addenda: RunRow | null } {
  if (addendaRunId && mapping.columns.addenda !== undefined) {
    throw new HttpError(
      422,
      "UNPROCESSABLE",
      `The mapping subtracts the file's addenda column '${mapping.columns.addenda}' and an addenda run was chosen too: pick one`,
      [{ path: "addendaRunId", message: "the file already has an addenda column mapped" }],
    );
  }
  const addenda = addendaRunId ? loadAddenda(db, labId, addendaRunId) : null;
  const reduced = ingest(() => reduceTable(table, mapping, sampleBasis(sample), addenda ? { addenda: addenda.points } : {}));
  return { reduced, addenda: addenda?.row ?? null };
}

// m = 1 g and M = 1 g/mol make the molar conversion of a total unit the plain factor to J/K, so
// reduceTable then yields J/K with its line bookkeeping; reduceAddendaTable is called first for its
// addenda-specific refusals (a non-total unit, several fields).
const UNIT_BASIS = { massMg: 1000, molarMassGPerMol: 1, atomsPerFormulaUnit: 1 };
const SAMPLE_ONLY_WARNINGS = new Set(["ABOVE_DULONG_PETIT"]);

function reduceAddendaUpload(table: DelimitedTable, mapping: ImportMapping): ReducedRun[] {
  return ingest(() => {
    reduceAddendaTable(table, mapping);
    return reduceTable(table, mapping, UNIT_BASIS).map((r) => ({ ...r, warnings: r.warnings.filter((w) => !SAMPLE_ONLY_WARNINGS.has(w.code)) }));
  });
}

/**
 * Preview of a sample-run upload: reads the file, proposes a column map from the header, and reduces
 * with the given mapping (or the proposal when it is complete). Writes nothing.
 * @param db the database
 * @param labId the lab
 * @param sampleId the sample the run would belong to
 * @param file the raw bytes and the name they were uploaded under
 * @param fields mapping (JSON), label, addendaRunId
 * @returns the table summary, proposal, mapping used, reduced runs (one per field) and the file's identity
 * @throws HttpError 404 for an unknown sample or addenda run; 400/422 naming line and column
 */
export function previewSampleRun(db: Db, labId: string, sampleId: string, file: UploadInput, fields: SampleRunFields): RunUploadPreview {
  const sample = getSample(db, labId, sampleId);
  const requested = parseMappingField(fields.mapping);
  const table = readUpload(file);
  const proposal = proposeMapping(table.header, table.units);
  const mapping = requested ?? proposal.mapping;
  const reduced = mapping ? reduceSampleUpload(db, labId, sample, table, mapping, fields.addendaRunId).reduced : [];
  const sha256 = sha256Hex(file.bytes);
  const duplicate = duplicateSampleRun(db, labId, sample.id, sha256);
  return { file: fileIdentity(file, duplicate?.id ?? null, sha256), table: summarizeTable(table), proposal, mapping, runs: reduced };
}

/** Preview of an addenda-run upload (total heat capacity of the platform, J/K). Writes nothing. */
export function previewAddendaRun(db: Db, labId: string, file: UploadInput, fields: AddendaRunFields): RunUploadPreview {
  const requested = parseMappingField(fields.mapping);
  const table = readUpload(file);
  const proposal = proposeMapping(table.header, table.units);
  const mapping = requested ?? proposal.mapping;
  const reduced = mapping ? reduceAddendaUpload(table, mapping) : [];
  const sha256 = sha256Hex(file.bytes);
  const duplicate = duplicateAddendaRun(db, labId, fields.platform, sha256);
  return { file: fileIdentity(file, duplicate?.id ?? null, sha256), table: summarizeTable(table), proposal, mapping, runs: reduced };
}

function getSample(db: Db, labId: string, sampleId: string): SampleRow {
  const row = db.select().from(samples).where(and(eq(samples.labId, labId), eq(samples.id, sampleId))).get();
  if (!row) throw new HttpError(404, "NOT_FOUND", "No such sample in this lab");
  return row;
}

function requireMapping(mapping: ImportMapping | null): ImportMapping {
  if (!mapping) {
    throw new HttpError(400, "VALIDATION_FAILED", "mapping: choose the columns and units before committing", [
      { path: "mapping", message: "required to commit" },
    ]);
  }
  return mapping;
}

function fieldLabel(base: string, fieldT: number | null): string {
  return fieldT === null ? base : `${base} · ${formatField(fieldT)}`;
}

function formatField(fieldT: number): string {
  // Fields are set to a few decimals; 4 significant digits shows 0.05 T steps and 14 T alike.
  const rounded = Math.abs(fieldT) < 5e-4 ? 0 : Number(fieldT.toPrecision(4));
  return `${rounded} T`;
}

interface NewRun {
  row: RunRow;
  points: (typeof runPoints.$inferInsert)[];
}

function buildRuns(
  reduced: readonly ReducedRun[],
  base: Omit<RunRow, "id" | "fieldT" | "label" | "pointCount" | "tMinK" | "tMaxK" | "warnings">,
  label: string,
): NewRun[] {
  return reduced.map((r) => {
    const id = randomUUID();
    const ts = r.points.map((p) => p.temperatureK);
    const row: RunRow = {
      ...base,
      id,
      fieldT: r.fieldT,
      label: fieldLabel(label, r.fieldT),
      pointCount: r.points.length,
      tMinK: Math.min(...ts),
      tMaxK: Math.max(...ts),
      warnings: r.warnings.map((w) => w.message),
    };
    const points = r.points.map((p, idx) => ({
      runId: id,
      idx,
      temperatureK: p.temperatureK,
      cp: p.heatCapacity,
      cpSigma: p.sigma,
      fieldT: r.fieldT,
      rowsAveraged: p.rowsAveraged,
      sourceLine: p.sourceLine,
      // A point the addenda run does not cover is kept but masked (not corrected, never deleted).
      masked: p.outsideAddendaRange,
    }));
    return { row, points };
  });
}

/**
 * Stores the raw file and, in one transaction, its stored_files row, the run rows and every point.
 * If anything fails, a file this call created and nothing references is removed again.
 */
function storeRuns(db: Db, dataDir: string, file: UploadInput, made: readonly NewRun[], auditEntry: { labId: string; userId: string; action: string; target: string }): void {
  const stored = putStoredFile(dataDir, file.bytes);
  try {
    db.transaction(() => {
      db.insert(storedFiles).values({ sha256: stored.sha256, sizeBytes: file.bytes.byteLength, createdAt: Date.now() }).onConflictDoNothing().run();
      for (const m of made) {
        db.insert(runs).values(m.row).run();
        // Nine values per point: 400 points per statement stays under SQLite's bound-variable limit.
        for (let k = 0; k < m.points.length; k += 400) db.insert(runPoints).values(m.points.slice(k, k + 400)).run();
      }
      audit(db, { ...auditEntry, details: { runs: made.map((m) => m.row.id), sha256: stored.sha256 } });
    });
  } catch (err) {
    if (stored.created) removeIfUnreferenced(db, dataDir, stored.sha256);
    throw err;
  }
}

/**
 * Commits a sample-run upload: one run per field value, the raw file kept byte for byte.
 * @param db the database
 * @param dataDir where stored files live
 * @param labId the lab
 * @param userId who uploads
 * @param sampleId the sample
 * @param file raw bytes and original name
 * @param fields mapping (required, JSON), label, addendaRunId, notes
 * @returns the file's identity and the runs made
 * @throws HttpError 404 unknown sample/addenda run; 409 CONFLICT when this sample already has a run from
 *   the same bytes (detail path `runs/<id>`); 400/422 naming line and column; nothing is written then
 */
export function commitSampleRun(
  db: Db,
  dataDir: string,
  labId: string,
  userId: string,
  sampleId: string,
  file: UploadInput,
  fields: SampleRunFields,
): RunCommitResult {
  const sample = getSample(db, labId, sampleId);
  const mapping = requireMapping(parseMappingField(fields.mapping));
  const sha256 = sha256Hex(file.bytes);
  const first = duplicateSampleRun(db, labId, sample.id, sha256);
  if (first) throw duplicateError(first, `sample '${sample.label}'`);
  const table = readUpload(file);
  const { reduced, addenda } = reduceSampleUpload(db, labId, sample, table, mapping, fields.addendaRunId);
  const now = Date.now();
  const made = buildRuns(
    reduced,
    {
      labId,
      sampleId: sample.id,
      kind: "sample",
      platform: addenda?.platform ?? "",
      fileSha256: sha256,
      fileName: file.fileName,
      mapping: mapping as unknown as Record<string, unknown>,
      addendaRunId: addenda?.id ?? null,
      massMg: sample.massMg,
      molarMassGPerMol: sample.molarMassGPerMol,
      atomsPerFormulaUnit: sample.atomsPerFormulaUnit,
      notes: fields.notes ?? "",
      createdBy: userId,
      createdAt: now,
    },
    fields.label || file.fileName,
  );
  storeRuns(db, dataDir, file, made, { labId, userId, action: "run.uploaded", target: `${sample.label}: ${file.fileName}` });
  const by = displayName(db, userId);
  return { file: fileIdentity(file, null, sha256), runs: made.map((m) => toSummary(m.row, m.points.filter((p) => p.masked).length, by)) };
}

/**
 * Commits an addenda-run upload of an instrument platform (points in J/K total).
 * @throws HttpError 409 when this platform already has an addenda run from the same bytes; 400/422 as the preview
 */
export function commitAddendaRun(db: Db, dataDir: string, labId: string, userId: string, file: UploadInput, fields: AddendaRunFields): RunCommitResult {
  const mapping = requireMapping(parseMappingField(fields.mapping));
  const sha256 = sha256Hex(file.bytes);
  const first = duplicateAddendaRun(db, labId, fields.platform, sha256);
  if (first) throw duplicateError(first, `platform '${fields.platform}'`);
  const table = readUpload(file);
  const reduced = reduceAddendaUpload(table, mapping);
  const made = buildRuns(
    reduced,
    {
      labId,
      sampleId: null,
      kind: "addenda",
      platform: fields.platform,
      fileSha256: sha256,
      fileName: file.fileName,
      mapping: mapping as unknown as Record<string, unknown>,
      addendaRunId: null,
      massMg: null,
      molarMassGPerMol: null,
      atomsPerFormulaUnit: null,
      notes: fields.notes ?? "",
      createdBy: userId,
      createdAt: Date.now(),
    },
    fields.label || `Addenda ${fields.platform}`,
  );
  storeRuns(db, dataDir, file, made, { labId, userId, action: "addenda.uploaded", target: `${fields.platform}: ${file.fileName}` });
  const by = displayName(db, userId);
  return { file: fileIdentity(file, null, sha256), runs: made.map((m) => toSummary(m.row, 0, by)) };
}
