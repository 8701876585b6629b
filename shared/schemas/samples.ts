import { z } from "zod";
import { LabParams } from "./labs";
import { RunSummarySchema } from "./runs";
import { parseFormula, MAX_ATOMS_PER_FORMULA_UNIT, MAX_MOLAR_MASS_G_PER_MOL } from "@shared/ingest/formula";

/*
 * Batches and samples: request and response shapes. Masses are in mg (as weighed), molar mass in
 * g/mol, everything else SI. Times are ISO 8601 strings.
 */

const trimmed = (what: string, max: number) =>
  z.string({ error: `Enter ${what}` }).trim().min(1, `Enter ${what}`).max(max, `Use at most ${max} characters`);
const optionalText = (max: number) => z.string().trim().max(max, `Use at most ${max} characters`);
const finiteNumber = (what: string) =>
  z.number({ error: `${what} must be a number` }).refine(Number.isFinite, `${what} must be a finite number`);

/**
 * Why a formula cannot be read, or null when it can (the same check on the server and in the forms).
 * @param formula as typed
 * @returns the reader's message, or null
 */
export function formulaProblem(formula: string): string | null {
  try {
    parseFormula(formula);
    return null;
  } catch (e) {
    return e instanceof Error ? e.message : String(e);
  }
}

// ---------------------------------------------------------------- batches

export const BatchSchema = z.object({
  id: z.string(),
  code: z.string(),
  synthesisDate: z.string().nullable(),
  method: z.string(),
  notes: z.string(),
  sampleCount: z.number().int(),
  createdAt: z.string(),
});
export type Batch = z.infer<typeof BatchSchema>;

export const CreateBatchBody = z.object({
  code: trimmed("a batch code", 40),
  /** Calendar date of synthesis, YYYY-MM-DD; empty or absent when unknown. */
  synthesisDate: z
    .union([z.iso.date({ error: "Use the form YYYY-MM-DD" }), z.literal("")])
    .optional()
    .transform((d) => (d ? d : null)),
  method: optionalText(200).default(""),
  notes: optionalText(4000).default(""),
});
export type CreateBatchBody = z.infer<typeof CreateBatchBody>;
/** What a form holds before parsing. */
export type CreateBatchInput = z.input<typeof CreateBatchBody>;

// ---------------------------------------------------------------- samples

export const SampleSortSchema = z.enum(["label", "createdAt", "massMg", "compositionX", "formula", "batch"]);
export type SampleSort = z.infer<typeof SampleSortSchema>;

/** GET /api/labs/:labId/samples query: free-text search, sort, batch filter. */
export const SampleListQuery = z.object({
  q: z.string().trim().max(120).optional(),
  batchId: z.string().min(1).max(64).optional(),
  sort: SampleSortSchema.default("label"),
  order: z.enum(["asc", "desc"]).default("asc"),
});
export type SampleListQuery = z.infer<typeof SampleListQuery>;

export const SampleParams = LabParams.extend({ sampleId: z.string().min(1).max(64) });
export type SampleParams = z.infer<typeof SampleParams>;

export const SampleSchema = z.object({
  id: z.string(),
  label: z.string(),
  batchId: z.string().nullable(),
  batchCode: z.string().nullable(),
  formula: z.string(),
  /** Molar mass used for reduction (derived from the formula unless overridden), g/mol. */
  molarMassGPerMol: z.number(),
  molarMassOverrideReason: z.string().nullable(),
  /** Atoms per formula unit used for reduction (derived unless overridden). */
  atomsPerFormulaUnit: z.number(),
  atomsOverrideReason: z.string().nullable(),
  massMg: z.number(),
  massSigmaMg: z.number(),
  compositionX: z.number().nullable(),
  compositionName: z.string().nullable(),
  notes: z.string(),
  runCount: z.number().int(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type Sample = z.infer<typeof SampleSchema>;

/** GET /api/labs/:labId/samples/:sampleId: the sample, what its formula alone gives, and its runs. */
export const SampleDetailSchema = SampleSchema.extend({
  derived: z.object({ molarMassGPerMol: z.number(), atomsPerFormulaUnit: z.number() }),
  runs: z.array(RunSummarySchema),
});
export type SampleDetail = z.infer<typeof SampleDetailSchema>;

const sampleFields = {
  label: trimmed("a label", 80),
  batchId: z.string().min(1).max(64).nullable().optional(),
  formula: trimmed("a formula", 120),
  /** Set to override the molar mass from the formula (needs a reason); null clears the override. */
  molarMassGPerMol: finiteNumber("Molar mass").positive("Molar mass must be above 0").max(MAX_MOLAR_MASS_G_PER_MOL).nullable().optional(),
  molarMassOverrideReason: optionalText(500).nullable().optional(),
  atomsPerFormulaUnit: finiteNumber("Atoms per formula unit").positive("Atoms per formula unit must be above 0").max(MAX_ATOMS_PER_FORMULA_UNIT).nullable().optional(),
  atomsOverrideReason: optionalText(500).nullable().optional(),
  massMg: finiteNumber("Mass").positive("The mass must be above 0 mg").max(1e6, "The mass must be at most 1 kg"),
  massSigmaMg: finiteNumber("Mass uncertainty").min(0, "The mass uncertainty cannot be negative").max(1e6).optional(),
  compositionX: finiteNumber("Composition x").nullable().optional(),
  compositionName: optionalText(40).nullable().optional(),
  notes: optionalText(4000).optional(),
};

type SampleFieldsOut = Partial<{
  formula: string;
  molarMassGPerMol: number | null;
  molarMassOverrideReason: string | null;
  atomsPerFormulaUnit: number | null;
  atomsOverrideReason: string | null;
  massMg: number;
  massSigmaMg: number;
}>;

function checkSample(s: SampleFieldsOut, ctx: z.RefinementCtx) {
  if (s.formula !== undefined) {
    const problem = formulaProblem(s.formula);
    if (problem) ctx.addIssue({ code: "custom", path: ["formula"], message: problem });
  }
  if (s.molarMassGPerMol != null && !s.molarMassOverrideReason) {
    ctx.addIssue({ code: "custom", path: ["molarMassOverrideReason"], message: "Say why the molar mass differs from the formula" });
  }
  if (s.atomsPerFormulaUnit != null && !s.atomsOverrideReason) {
    ctx.addIssue({ code: "custom", path: ["atomsOverrideReason"], message: "Say why the atom count differs from the formula" });
  }
  if (s.massMg !== undefined && s.massSigmaMg !== undefined && s.massSigmaMg >= s.massMg) {
    ctx.addIssue({ code: "custom", path: ["massSigmaMg"], message: "The mass uncertainty must be smaller than the mass" });
  }
}

export const CreateSampleBody = z.object(sampleFields).superRefine(checkSample);
export type CreateSampleBody = z.infer<typeof CreateSampleBody>;
export type CreateSampleInput = z.input<typeof CreateSampleBody>;

/** PATCH: any subset of the create fields; null on an override returns to the value from the formula. */
export const UpdateSampleBody = z
  .object(sampleFields)
  .partial()
  .superRefine(checkSample)
  .refine((b) => Object.keys(b).length > 0, "Change at least one field");
export type UpdateSampleBody = z.infer<typeof UpdateSampleBody>;
