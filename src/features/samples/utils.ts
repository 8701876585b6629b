import { z } from "zod";
import { CreateSampleBody, UpdateSampleBody } from "@shared/schemas/samples";

/** A number typed into a form: blank is "not given", a decimal comma is accepted, anything else stays NaN (refused). */
export function formNumber(text: string | undefined): number | undefined {
  if (text === undefined) return undefined;
  const t = text.trim();
  if (t === "") return undefined;
  return /^[+-]?(\d+([.,]\d*)?|[.,]\d+)([eE][+-]?\d+)?$/.test(t) ? Number(t.replace(",", ".")) : Number.NaN;
}

function blankToNull(text: string | undefined): string | null | undefined {
  if (text === undefined) return undefined;
  return text.trim() === "" ? null : text;
}

/** Form field values (strings, by input name) → the body the samples API takes. Blank overrides are null (from the formula). */
export function sampleFormToBody(values: unknown): unknown {
  if (typeof values !== "object" || values === null) return values;
  const v = values as Record<string, string | undefined>;
  return {
    label: v.label ?? "",
    formula: v.formula ?? "",
    batchId: blankToNull(v.batchId) ?? null,
    massMg: formNumber(v.massMg) ?? Number.NaN,
    massSigmaMg: formNumber(v.massSigmaMg),
    molarMassGPerMol: formNumber(v.molarMassGPerMol) ?? null,
    molarMassOverrideReason: blankToNull(v.molarMassOverrideReason),
    atomsPerFormulaUnit: formNumber(v.atomsPerFormulaUnit) ?? null,
    atomsOverrideReason: blankToNull(v.atomsOverrideReason),
    compositionX: formNumber(v.compositionX) ?? null,
    compositionName: blankToNull(v.compositionName),
    notes: v.notes ?? "",
  };
}

/** The create schema of the server, read from form strings (same messages as the API gives). */
export const SampleCreateFormSchema = z.preprocess(sampleFormToBody, CreateSampleBody);
/** The update schema of the server, read from form strings; the edit form sends every field. */
export const SampleUpdateFormSchema = z.preprocess(sampleFormToBody, UpdateSampleBody);

/** "1.234 g/mol" style numbers for the sample pages: up to 6 significant digits, no trailing zeros. */
export function formatPlain(value: number | null | undefined, digits = 6): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return "—";
  return Number(value.toPrecision(digits)).toString();
}

/** Sort choices of the sample list. */
export const SAMPLE_SORT_OPTIONS = [
  { value: "label", label: "Label" },
  { value: "batch", label: "Batch" },
  { value: "compositionX", label: "Composition x" },
  { value: "massMg", label: "Mass" },
  { value: "formula", label: "Formula" },
  { value: "createdAt", label: "Date added" },
] as const;
