import { z } from "zod";
import { ImportMappingSchema, ImportPreviewSchema } from "./ingest";
import { LabParams } from "./labs";

/*
 * Runs: one measured Cp(T) curve, stored with the raw file it came from. A sample run's points are molar
 * heat capacity per mole of formula units, J/(mol·K); an addenda run's points are total heat capacity of
 * the platform, J/K. Temperatures in K, fields in T, times ISO 8601.
 */

export const RunKindSchema = z.enum(["sample", "addenda"]);
export type RunKind = z.infer<typeof RunKindSchema>;

export const RunParams = LabParams.extend({ runId: z.string().min(1).max(64) });
export type RunParams = z.infer<typeof RunParams>;

/** A run as listed on a sample page or in the addenda list. */
export const RunSummarySchema = z.object({
  id: z.string(),
  kind: RunKindSchema,
  sampleId: z.string().nullable(),
  platform: z.string(),
  label: z.string(),
  fileName: z.string(),
  fileSha256: z.string(),
  fieldT: z.number().nullable(),
  addendaRunId: z.string().nullable(),
  pointCount: z.number().int(),
  maskedCount: z.number().int(),
  tMinK: z.number(),
  tMaxK: z.number(),
  warnings: z.array(z.string()),
  notes: z.string(),
  createdAt: z.string(),
  createdByName: z.string().nullable(),
});
export type RunSummary = z.infer<typeof RunSummarySchema>;

/** One stored point. `index` is its position in the reduced, temperature-sorted run (the mask key). */
export const RunPointSchema = z.object({
  index: z.number().int(),
  temperatureK: z.number(),
  /** Sample run: J/(mol·K) per mole of formula units. Addenda run: J/K. */
  cp: z.number(),
  cpSigma: z.number().nullable(),
  /** Sample run: J/(mol·K) per mole of atoms (cp / atoms per formula unit); null for addenda runs. */
  cpPerAtom: z.number().nullable(),
  fieldT: z.number().nullable(),
  rowsAveraged: z.number().int(),
  sourceLine: z.number().int(),
  masked: z.boolean(),
});
export type RunPoint = z.infer<typeof RunPointSchema>;

/** GET /api/labs/:labId/runs/:runId */
export const RunDetailSchema = RunSummarySchema.extend({
  mapping: ImportMappingSchema,
  /** Reduction inputs as used when the run was committed (null for addenda runs). */
  massMg: z.number().nullable(),
  molarMassGPerMol: z.number().nullable(),
  atomsPerFormulaUnit: z.number().nullable(),
  /** "J/(mol*K)" for sample runs, "J/K" for addenda runs. */
  cpUnit: z.enum(["J/(mol*K)", "J/K"]),
  sample: z.object({ id: z.string(), label: z.string(), formula: z.string() }).nullable(),
  addendaRun: z.object({ id: z.string(), label: z.string(), platform: z.string() }).nullable(),
  /** Other runs made from the same file (the other fields of a split file). */
  siblings: z.array(z.object({ id: z.string(), label: z.string(), fieldT: z.number().nullable() })),
  points: z.array(RunPointSchema),
});
export type RunDetail = z.infer<typeof RunDetailSchema>;

/** PATCH /api/labs/:labId/runs/:runId/mask: mask or unmask points by index. Points are never deleted. */
export const MaskBody = z.object({
  indices: z
    .array(z.number().int().min(0), { error: "Give the point indices as a list of whole numbers" })
    .min(1, "Name at least one point")
    .max(100_000),
  masked: z.boolean({ error: "Say whether to mask (true) or unmask (false)" }),
});
export type MaskBody = z.infer<typeof MaskBody>;

export const MaskResultSchema = z.object({
  runId: z.string(),
  maskedCount: z.number().int(),
  changed: z.number().int(),
});
export type MaskResult = z.infer<typeof MaskResultSchema>;

/** The text fields that travel with the multipart `file` of a sample-run upload. */
export const SampleRunUploadFields = z.object({
  /** JSON of an ImportMapping; optional for a preview (the proposal is used), required for a commit. */
  mapping: z.string().max(20_000).optional(),
  label: z.string().trim().max(120, "Use at most 120 characters").optional(),
  /** An addenda run of this lab to interpolate and subtract. */
  addendaRunId: z.string().min(1).max(64).optional(),
  notes: z.string().trim().max(4000).optional(),
});
export type SampleRunUploadFields = z.infer<typeof SampleRunUploadFields>;

/** The text fields of an addenda-run upload: the platform (puck) is required. */
export const AddendaRunUploadFields = z.object({
  mapping: z.string().max(20_000).optional(),
  platform: z.string().trim().min(1, "Name the instrument platform").max(80, "Use at most 80 characters"),
  label: z.string().trim().max(120).optional(),
  notes: z.string().trim().max(4000).optional(),
});
export type AddendaRunUploadFields = z.infer<typeof AddendaRunUploadFields>;

/** The file itself, as the server saw it. */
export const UploadedFileSchema = z.object({
  fileName: z.string(),
  sizeBytes: z.number().int(),
  sha256: z.string(),
  /** A run of this sample (or platform) already made from the same bytes, if any: committing gives 409. */
  duplicateOfRunId: z.string().nullable(),
});
export type UploadedFile = z.infer<typeof UploadedFileSchema>;

/** POST …/runs/preview and …/addenda-runs/preview: the reader's view plus the file's identity. Writes nothing. */
export const RunUploadPreviewSchema = ImportPreviewSchema.extend({ file: UploadedFileSchema });
export type RunUploadPreview = z.infer<typeof RunUploadPreviewSchema>;

/** POST …/runs and …/addenda-runs: the runs made (one per field value). */
export const RunCommitResultSchema = z.object({
  file: UploadedFileSchema,
  runs: z.array(RunSummarySchema),
});
export type RunCommitResult = z.infer<typeof RunCommitResultSchema>;

export const AddendaRunListQuery = z.object({ platform: z.string().trim().min(1).max(80).optional() });
export type AddendaRunListQuery = z.infer<typeof AddendaRunListQuery>;

/** Prefix of the 409 detail path that names the first run made from the same file: `runs/<runId>`. */
export const DUPLICATE_RUN_PATH_PREFIX = "runs/";
