import { z } from "zod";
import { LabParams } from "./labs";

/** How rows are gathered into groups: by synthesis batch or by the samples' composition variable x. */
export const CompareGroupBySchema = z.enum(["batch", "x"]);
export type CompareGroupBy = z.infer<typeof CompareGroupBySchema>;

/** A fitted parameter's stable name (thetaD, thetaE, thetaE2, gamma, beta, …; see shared/physics/model-types). */
export const ParameterNameSchema = z
  .string()
  .regex(/^[A-Za-z][A-Za-z0-9_]{0,39}$/, "A parameter name is letters and digits, e.g. thetaD");

const Id = z.string().min(1).max(64);

/** Accepts `ids=a,b`, repeated `ids=a&ids=b`, or a JSON array; empty strings are dropped. */
const IdList = z.preprocess((v) => {
  if (v === undefined || v === null || v === "") return [];
  const parts = Array.isArray(v) ? v : [v];
  return parts.flatMap((p) => (typeof p === "string" ? p.split(",") : [p])).filter((p) => p !== "");
}, z.array(Id).max(500, "Choose at most 500 at once"));

/** What a comparison is made of. Both lists empty means every approved fit of the lab. */
export const ComparisonSelectionSchema = z.object({
  batchIds: z.array(Id).max(500).default([]),
  sampleIds: z.array(Id).max(500).default([]),
});
export type ComparisonSelection = z.infer<typeof ComparisonSelectionSchema>;

/** GET /api/labs/:labId/compare and compare.csv (and compare/curves). */
export const CompareQuery = z.object({
  parameter: ParameterNameSchema.default("thetaD"),
  groupBy: CompareGroupBySchema.default("batch"),
  batchIds: IdList,
  sampleIds: IdList,
});
export type CompareQuery = z.infer<typeof CompareQuery>;

/** One approved fit's value of the chosen parameter. */
export const CompareRowSchema = z.object({
  fitId: z.string(),
  runId: z.string(),
  runLabel: z.string(),
  sampleId: z.string(),
  sampleLabel: z.string(),
  batchId: z.string().nullable(),
  batchCode: z.string().nullable(),
  /** Composition variable of the sample, and its name (e.g. "x in Ba8Ga16-xGe30+x"). */
  x: z.number().nullable(),
  xName: z.string().nullable(),
  /** Model in words, e.g. "γT + Debye (3D) + Einstein". */
  model: z.string(),
  /** Canonical form of the model's components; equal keys mean the same model. */
  modelKey: z.string(),
  windowMinK: z.number(),
  windowMaxK: z.number(),
  parameter: z.string(),
  value: z.number(),
  unit: z.string(),
  /** Statistical standard error of the fit (scaled by √χ²_red), same unit as value. */
  sigmaStat: z.number().nullable(),
  /** Systematic part from the sample-mass uncertainty, same unit as value. */
  sigmaSys: z.number().nullable(),
  /** sigmaStat and sigmaSys in quadrature: the weight of this row in its group's weighted mean. */
  sigmaTotal: z.number().nullable(),
  /** Set when the value is not a fitted parameter but follows from one (θ_D from β of γT + βT³). */
  derivedFrom: z.string().nullable(),
  groupKey: z.string(),
  /** |value − group weighted mean| / sigmaTotal; null when this row has no σ or its group no weighted mean. */
  deviationSigma: z.number().nullable(),
  flagged: z.boolean(),
  approvedAt: z.string().nullable(),
});
export type CompareRow = z.infer<typeof CompareRowSchema>;

export const CompareGroupSchema = z.object({
  key: z.string(),
  label: z.string(),
  batchId: z.string().nullable(),
  x: z.number().nullable(),
  n: z.number().int(),
  /** Rows with a σ, the ones that enter the weighted mean. */
  nWeighted: z.number().int(),
  weightedMean: z.number().nullable(),
  weightedSigma: z.number().nullable(),
  /** χ² of the weighted rows about their mean over (n − 1); well above 1 means scatter beyond the stated σ. */
  reducedChiSquare: z.number().nullable(),
  unweightedMean: z.number(),
  /** Sample standard deviation (n − 1); null for one row. */
  spread: z.number().nullable(),
  standardError: z.number().nullable(),
  flaggedCount: z.number().int(),
  modelsDiffer: z.boolean(),
  windowsDiffer: z.boolean(),
});
export type CompareGroup = z.infer<typeof CompareGroupSchema>;

export const CompareNoteSchema = z.object({
  groupKey: z.string().nullable(),
  /** models/windows: rows not comparable as such; derived: θ_D from β; no-sigma: rows left out of weighted means; pair: both fits of a group of two flagged. */
  kind: z.enum(["models", "windows", "derived", "no-sigma", "pair"]),
  message: z.string(),
});
export type CompareNote = z.infer<typeof CompareNoteSchema>;

/** A parameter present on the lab's approved fits, for the parameter picker. */
export const AvailableParameterSchema = z.object({ name: z.string(), unit: z.string(), fits: z.number().int() });
export type AvailableParameter = z.infer<typeof AvailableParameterSchema>;

/** GET /api/labs/:labId/compare */
export const ComparisonResultSchema = z.object({
  parameter: z.string(),
  unit: z.string().nullable(),
  groupBy: CompareGroupBySchema,
  /** Outlier threshold in σ (rows strictly beyond it are flagged). */
  thresholdSigma: z.number(),
  rows: z.array(CompareRowSchema),
  groups: z.array(CompareGroupSchema),
  notes: z.array(CompareNoteSchema),
  availableParameters: z.array(AvailableParameterSchema),
});
export type ComparisonResult = z.infer<typeof ComparisonResultSchema>;

/** One chosen run's reduced points for the collapse and C/T³ plots (display only, may be decimated). */
export const CompareCurveSchema = z.object({
  fitId: z.string(),
  runId: z.string(),
  label: z.string(),
  groupKey: z.string(),
  /** Atoms per formula unit used to reduce the run. */
  atomsPerFormulaUnit: z.number(),
  /** θ_D of this fit in K (fitted, or from β); null when the fit has neither. */
  thetaD: z.number().nullable(),
  /** Fitted Sommerfeld coefficient in J/(mol·K²), or null. */
  gamma: z.number().nullable(),
  decimated: z.boolean(),
  /** Unmasked points: temperature in K, molar heat capacity in J/(mol·K) per formula unit. */
  points: z.array(z.object({ t: z.number(), cp: z.number() })),
});
export type CompareCurve = z.infer<typeof CompareCurveSchema>;

export const CompareCurvesSchema = z.array(CompareCurveSchema);

/** POST /api/labs/:labId/comparisons */
export const CreateComparisonBody = z.object({
  name: z.string().trim().min(1, "Name the comparison").max(120),
  selection: ComparisonSelectionSchema,
  parameter: ParameterNameSchema,
  groupBy: CompareGroupBySchema.default("batch"),
});
export type CreateComparisonBody = z.infer<typeof CreateComparisonBody>;

export const ComparisonSchema = z.object({
  id: z.string(),
  name: z.string(),
  selection: ComparisonSelectionSchema,
  parameter: z.string(),
  groupBy: CompareGroupBySchema,
  createdByName: z.string().nullable(),
  createdAt: z.string(),
});
export type Comparison = z.infer<typeof ComparisonSchema>;

export const ComparisonParams = LabParams.extend({ comparisonId: Id });
