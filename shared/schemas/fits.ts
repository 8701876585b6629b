import { z } from "zod";
import type { ComponentDefinition, ModelDefinition, ParameterSetting } from "../physics/model-types";
import { LabParams } from "./labs";

/*
 * Request and response shapes of the fit workspace: fits, previews, model ranking, θ_D(T) and the
 * thermodynamic table. Everything SI: temperature in K, heat capacity in J/(mol·K) per mole of
 * formula units. The model part mirrors shared/physics/model-types.ts (the engine's contract); the
 * `satisfies` checks below keep the two from drifting apart.
 */

const finite = (what: string) => z.number({ error: `${what} must be a number` }).refine(Number.isFinite, `${what} must be finite`);

/** Parameter names that count atoms per formula unit (nD, nE, nE2, nS, …): never negative. */
export const ATOM_COUNT_PARAMETER = /^n[DES]\d*$/;

export const ComponentDefinitionSchema = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("electronic") }),
  z.object({ kind: z.literal("t3") }),
  z.object({ kind: z.literal("t5") }),
  z.object({
    kind: z.literal("debye"),
    dimension: z.union([z.literal(1), z.literal(2), z.literal(3)]).optional(),
  }),
  z.object({ kind: z.literal("einstein") }),
  z.object({ kind: z.literal("schottky") }),
  z.object({ kind: z.literal("nuclear") }),
]);

export const ParameterSettingSchema = z
  .object({
    value: finite("value").optional(),
    fixed: z.boolean().optional(),
    lower: z.number().refine((x) => !Number.isNaN(x), "lower bound must be a number").optional(),
    upper: z.number().refine((x) => !Number.isNaN(x), "upper bound must be a number").optional(),
  })
  .superRefine((s, ctx) => {
    if (s.lower !== undefined && s.upper !== undefined && !(s.lower < s.upper)) {
      ctx.addIssue({ code: "custom", path: ["upper"], message: `bounds crossed: lower ${s.lower} is not below upper ${s.upper}` });
    }
    if (s.fixed && s.value === undefined) {
      ctx.addIssue({ code: "custom", path: ["value"], message: "a fixed parameter needs its value" });
    }
    if (s.value !== undefined && s.lower !== undefined && s.value < s.lower) {
      ctx.addIssue({ code: "custom", path: ["value"], message: `value ${s.value} is below its lower bound ${s.lower}` });
    }
    if (s.value !== undefined && s.upper !== undefined && s.value > s.upper) {
      ctx.addIssue({ code: "custom", path: ["value"], message: `value ${s.value} is above its upper bound ${s.upper}` });
    }
  });

export const ModelDefinitionSchema = z
  .object({
    components: z.array(ComponentDefinitionSchema).min(1, "add at least one component to the model").max(12, "at most 12 components"),
    constrainAtoms: z.boolean().optional(),
    parameters: z.record(z.string().regex(/^[A-Za-z][A-Za-z0-9]{0,31}$/, "not a parameter name"), ParameterSettingSchema).optional(),
  })
  .superRefine((m, ctx) => {
    for (const [name, s] of Object.entries(m.parameters ?? {})) {
      if (ATOM_COUNT_PARAMETER.test(name) && s.value !== undefined && s.value < 0) {
        ctx.addIssue({ code: "custom", path: ["parameters", name, "value"], message: `${name} counts atoms per formula unit and cannot be negative` });
      }
    }
    if (m.constrainAtoms && m.components.filter((c) => c.kind === "debye").length !== 1) {
      ctx.addIssue({ code: "custom", path: ["constrainAtoms"], message: "the atom-count constraint needs exactly one Debye component" });
    }
  });

// Compile-time mirror checks against the engine's contract.
ComponentDefinitionSchema.parse satisfies (x: unknown) => ComponentDefinition;
ParameterSettingSchema.parse satisfies (x: unknown) => ParameterSetting;
ModelDefinitionSchema.parse satisfies (x: unknown) => ModelDefinition;

export type ModelDefinitionInput = z.infer<typeof ModelDefinitionSchema>;

/** [tmin, tmax] in K, tmin < tmax. */
export const WindowSchema = z
  .tuple([finite("window start").refine((t) => t > 0, "window start must be above 0 K"), finite("window end")])
  .refine(([a, b]) => a < b, { message: "the window must start below where it ends", path: [1] });
export type TemperatureWindow = z.infer<typeof WindowSchema>;

export const RunParams = LabParams.extend({ runId: z.string().min(1).max(64) });
export type RunParams = z.infer<typeof RunParams>;
export const FitParams = LabParams.extend({ fitId: z.string().min(1).max(64) });
export type FitParams = z.infer<typeof FitParams>;

/** POST …/runs/:runId/fits/preview */
export const PreviewFitBody = z.object({ model: ModelDefinitionSchema, window: WindowSchema });
export type PreviewFitBody = z.infer<typeof PreviewFitBody>;

/** POST …/runs/:runId/fits: fit and store a draft. A fit that does not converge is stored only with saveUnconverged. */
export const CreateFitBody = PreviewFitBody.extend({
  notes: z.string().max(4000).optional(),
  saveUnconverged: z.boolean().optional(),
});
export type CreateFitBody = z.infer<typeof CreateFitBody>;

export const FitStateSchema = z.enum(["draft", "approved", "superseded"]);
export type FitState = z.infer<typeof FitStateSchema>;

/** One plain-word warning about a fit (not converged, a parameter at its bound, |r| > 0.95, χ²_red far from 1, atoms not adding up…). */
export const FitWarningSchema = z.string();
export type FitWarning = z.infer<typeof FitWarningSchema>;

/** One parameter of a fit (also a row of fit_parameters). Uncertainties are standard uncertainties in the parameter's unit. */
export const FitParameterSchema = z.object({
  name: z.string(),
  value: z.number(),
  /** Statistical, scaled by √χ²_red; null for a fixed parameter or a singular covariance. */
  stderr: z.number().nullable(),
  /** Statistical, from the stated σ alone. */
  stderrUnscaled: z.number().nullable(),
  /** Systematic, from the sample-mass uncertainty (refit at m ± σ_m); null when the run has no mass or σ_m is 0. */
  stderrMass: z.number().nullable(),
  unit: z.string(),
  fixed: z.boolean(),
});
export type FitParameter = z.infer<typeof FitParameterSchema>;

/** One point used by the fit: its temperature and normalised residual (Cp − model)/σ (σ from the scatter for equal weights). */
export const ResidualPointSchema = z.object({
  temperatureK: z.number(),
  normalized: z.number(),
});
export type ResidualPoint = z.infer<typeof ResidualPointSchema>;

/** The model evaluated on a smooth grid across the window, with each component apart. */
export const CurvePointSchema = z.object({
  temperatureK: z.number(),
  total: z.number(),
  parts: z.record(z.string(), z.number()),
});
export type CurvePoint = z.infer<typeof CurvePointSchema>;

/** What a fit computes, stored or not. */
export const FitOutcomeSchema = z.object({
  model: ModelDefinitionSchema,
  window: z.tuple([z.number(), z.number()]),
  pointsUsed: z.number().int(),
  maskedExcluded: z.number().int(),
  converged: z.boolean(),
  stopReason: z.string(),
  iterations: z.number().int().nullable(),
  chiSquare: z.number(),
  reducedChiSquare: z.number(),
  dof: z.number().int(),
  aic: z.number(),
  bic: z.number(),
  parameters: z.array(FitParameterSchema),
  /** Names of the free parameters, in the order of the covariance and correlation rows. */
  freeParameters: z.array(z.string()),
  /** Scaled covariance s²(JᵀWJ)⁻¹ of the free parameters; null when the data cannot separate them (singular). */
  covariance: z.array(z.array(z.number())).nullable(),
  /** Correlation matrix of the free parameters; null when the covariance is. */
  correlation: z.array(z.array(z.number().nullable())).nullable(),
  warnings: z.array(FitWarningSchema),
  /** How σ was chosen: "stated" (each point's σ) or a rule for points without one. */
  weighting: z.string(),
  /** Atoms per formula unit used (Dulong–Petit 3nR, θ_D from β, atom constraint). */
  atomsPerFormulaUnit: z.number(),
  /** SHA-256 (hex) of the canonical input text, see canonicalFitInput in server/services/fits.ts. */
  inputSha256: z.string(),
  /** SHA-256 of the raw uploaded file of the run. */
  rawFileSha256: z.string(),
  softwareVersion: z.string(),
  residuals: z.array(ResidualPointSchema),
  curve: z.array(CurvePointSchema),
  /** Wall time of the engine call in ms (the fit plus the mass-systematic refits). */
  elapsedMs: z.number(),
});
export type FitOutcome = z.infer<typeof FitOutcomeSchema>;

export const PersonRefSchema = z.object({ id: z.string(), displayName: z.string() });
export type PersonRef = z.infer<typeof PersonRefSchema>;

/** A stored fit. Nothing in it is ever overwritten; approval and supersession only fill their own fields. */
export const FitSchema = FitOutcomeSchema.extend({
  id: z.string(),
  labId: z.string(),
  runId: z.string(),
  state: FitStateSchema,
  notes: z.string(),
  createdBy: PersonRefSchema.nullable(),
  createdAt: z.string(),
  approvedBy: PersonRefSchema.nullable(),
  approvedAt: z.string().nullable(),
  supersededBy: z.string().nullable(),
  supersededAt: z.string().nullable(),
  /** Indices of the run's points inside the window that were masked when the fit ran (left out); the mask may change later, this does not. */
  maskedPointIndices: z.array(z.number().int()),
});
export type Fit = z.infer<typeof FitSchema>;

/** GET …/runs/:runId/fits: one line of the history (no residuals or curve). */
export const FitSummarySchema = FitSchema.omit({ residuals: true, curve: true, covariance: true });
export type FitSummary = z.infer<typeof FitSummarySchema>;
export const FitHistorySchema = z.array(FitSummarySchema);

/** POST …/runs/:runId/rank */
export const RankCandidateSchema = z.object({
  label: z.string().trim().min(1).max(80).optional(),
  model: ModelDefinitionSchema,
});
export type RankCandidate = z.infer<typeof RankCandidateSchema>;

export const RankBody = z.object({
  window: WindowSchema,
  /** Omitted or empty: the default candidate set (see DEFAULT_RANK_CANDIDATES). */
  candidates: z.array(RankCandidateSchema).max(12, "rank at most 12 candidates at once").optional(),
});
export type RankBody = z.infer<typeof RankBody>;

export const RankEntrySchema = z.object({
  label: z.string(),
  model: ModelDefinitionSchema,
  /** Null when the candidate could not be fitted at all (e.g. too few points for its parameters). */
  outcome: FitOutcomeSchema.omit({ residuals: true, curve: true }).nullable(),
  error: z.string().nullable(),
  /** BIC minus the best BIC; 0 for the best candidate; null when not fitted. */
  deltaBic: z.number().nullable(),
});
export type RankEntry = z.infer<typeof RankEntrySchema>;

export const RankResultSchema = z.object({
  window: z.tuple([z.number(), z.number()]),
  pointsUsed: z.number().int(),
  /** Ordered by BIC, lowest (preferred) first; candidates that failed come last. */
  entries: z.array(RankEntrySchema),
  elapsedMs: z.number(),
});
export type RankResult = z.infer<typeof RankResultSchema>;

/** A line of the streamed ranking (Accept: application/x-ndjson): progress lines, then the result. */
export const RankStreamLineSchema = z.discriminatedUnion("type", [
  z.object({ type: z.literal("progress"), done: z.number().int(), total: z.number().int(), label: z.string() }),
  z.object({ type: z.literal("result"), result: RankResultSchema }),
  z.object({ type: z.literal("error"), error: z.object({ code: z.string(), message: z.string() }) }),
]);
export type RankStreamLine = z.infer<typeof RankStreamLineSchema>;

/** The candidates ranked when the request names none. */
export const DEFAULT_RANK_CANDIDATES: readonly { label: string; model: ModelDefinitionInput }[] = [
  { label: "γT + Debye", model: { components: [{ kind: "electronic" }, { kind: "debye" }] } },
  { label: "γT + Debye + Einstein", model: { components: [{ kind: "electronic" }, { kind: "debye" }, { kind: "einstein" }] } },
  {
    label: "γT + Debye + 2 Einstein",
    model: { components: [{ kind: "electronic" }, { kind: "debye" }, { kind: "einstein" }, { kind: "einstein" }] },
  },
  { label: "γT + Debye + Schottky", model: { components: [{ kind: "electronic" }, { kind: "debye" }, { kind: "schottky" }] } },
];

/** ?fitId= on θ_D(T) and thermo; default the approved fit, else the newest. */
export const FitChoiceQuery = z.object({ fitId: z.string().min(1).max(64).optional() });

/** GET …/runs/:runId/theta-d */
export const ThetaDPointSchema = z.object({
  temperatureK: z.number(),
  /** Lattice part used: Cp minus the fitted electronic (and Schottky and nuclear) parts, J/(mol·K). */
  lattice: z.number(),
  /** Equivalent Debye temperature in K, null when no θ_D reproduces the lattice part. */
  thetaD: z.number().nullable(),
  /** Why there is no solution (lattice part ≤ 0 or at/above 3nR), null when solved. */
  noSolution: z.string().nullable(),
  masked: z.boolean(),
});
export type ThetaDPoint = z.infer<typeof ThetaDPointSchema>;

export const ThetaDCurveSchema = z.object({
  fitId: z.string(),
  atomsPerFormulaUnit: z.number(),
  /** Components subtracted before the inversion, e.g. ["electronic"]. */
  subtracted: z.array(z.string()),
  /** The fitted θ_D (the Debye component's, or from β of a T³ term), with its scaled standard error. */
  fittedThetaD: z.object({ value: z.number(), stderr: z.number().nullable(), source: z.string() }).nullable(),
  points: z.array(ThetaDPointSchema),
});
export type ThetaDCurve = z.infer<typeof ThetaDCurveSchema>;

/** GET …/runs/:runId/thermo?at=298.15,300 */
export const ThermoQuery = FitChoiceQuery.extend({
  at: z
    .string()
    .max(2000)
    .optional()
    .transform((s, ctx) => {
      if (s === undefined || s.trim() === "") return undefined;
      const parts = s.split(",").map((p) => p.trim());
      const out: number[] = [];
      for (const [i, p] of parts.entries()) {
        const t = Number(p);
        if (p === "" || !Number.isFinite(t) || t <= 0) {
          ctx.addIssue({ code: "custom", path: [i], message: `"${p}" is not a temperature above 0 K` });
          return z.NEVER;
        }
        out.push(t);
      }
      if (out.length > 200) {
        ctx.addIssue({ code: "custom", message: "ask for at most 200 temperatures" });
        return z.NEVER;
      }
      return out;
    }),
});
export type ThermoQuery = z.infer<typeof ThermoQuery>;

export const ThermoRowSchema = z.object({
  temperatureK: z.number(),
  /** Cp at T from the data (monotone interpolation), J/(mol·K). */
  cp: z.number(),
  /** S(T) = ∫₀ᵀ C/T dT, J/(mol·K). */
  entropy: z.number(),
  /** H(T) − H(0) = ∫₀ᵀ C dT, J/mol. */
  enthalpy: z.number(),
});
export type ThermoRow = z.infer<typeof ThermoRowSchema>;

export const ThermoTableSchema = z.object({
  fitId: z.string(),
  /** First data point: below it the fitted model is integrated, above it the data. */
  dataStartK: z.number(),
  dataEndK: z.number(),
  /** Share of S(298.15 K) (or of the last row) that comes from the model below the first point. */
  modelShareOfEntropy: z.number(),
  rows: z.array(ThermoRowSchema),
});
export type ThermoTable = z.infer<typeof ThermoTableSchema>;
