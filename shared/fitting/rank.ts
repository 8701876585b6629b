/*
 * Ranking candidate composite models fitted to the same points by the Bayesian information criterion
 * (Schwarz, Ann. Statist. 6 (1978) 461), ties broken by AIC (Burnham & Anderson, Model Selection and
 * Multimodel Inference, 2nd ed. (2002), §2.2). Every candidate sees the same window and mask, so the
 * criteria are comparable; ΔBIC is given against the best. Burnham & Anderson (§2.6, from memory) read
 * Δ ≤ 2 as "substantial support" and Δ > 10 as "essentially none" (their guidance for AIC differences).
 */
import type { ModelDefinition } from "@shared/physics/model-types";
import { fitHeatCapacity, type FitModelOptions, type HeatCapacityData, type HeatCapacityFit } from "@shared/fitting/fit-model";

export interface RankedModel {
  /** The candidate as given. */
  definition: ModelDefinition;
  /** Components joined by " + ", e.g. "electronic + debye + einstein". */
  label: string;
  /** Position in the ranking (1 = lowest BIC); null for a candidate that could not be fitted. */
  rank: number | null;
  /** BIC minus the best BIC; null for a failure. */
  deltaBic: number | null;
  /** AIC minus the best candidate's AIC; null for a failure. */
  deltaAic: number | null;
  fit: HeatCapacityFit | null;
  /** Why the candidate could not be fitted (the error message); null on success. */
  failure: string | null;
}

/** Plain label of a model definition, e.g. "electronic + debye (2D) + einstein + einstein". */
export function modelLabel(def: ModelDefinition): string {
  return def.components
    .map((c) => (c.kind === "debye" && c.dimension !== undefined && c.dimension !== 3 ? `debye (${c.dimension}D)` : c.kind))
    .join(" + ") + (def.constrainAtoms ? " (atoms constrained)" : "");
}

/**
 * Fits each candidate model to the same data and orders them by BIC (then AIC).
 * @param data T (K), molar cp (J/(mol·K)), σ or null, optional mask
 * @param candidates model definitions to compare (at least one)
 * @param opts as for fitHeatCapacity: atoms per formula unit, optional window (K)
 * @param onProgress called after each candidate with (done, total)
 * @returns every candidate: fitted ones ranked by BIC with ΔBIC and ΔAIC, then failures in input order
 * @throws TypeError when candidates is not an array; RangeError when it is empty
 * @see Schwarz (1978); Burnham & Anderson (2002) §2.2, §2.6
 */
export function rankModels(
  data: HeatCapacityData,
  candidates: readonly ModelDefinition[],
  opts: FitModelOptions,
  onProgress?: (done: number, total: number) => void,
): RankedModel[] {
  if (!Array.isArray(candidates)) throw new TypeError("candidates must be an array of model definitions");
  if (candidates.length === 0) throw new RangeError("candidates must hold at least one model definition");
  if (onProgress !== undefined && typeof onProgress !== "function") throw new TypeError("onProgress must be a function");
  const results: RankedModel[] = candidates.map((definition, index) => {
    let entry: RankedModel;
    try {
      const fit = fitHeatCapacity(data, definition, opts);
      entry = { definition, label: modelLabel(definition), rank: null, deltaBic: null, deltaAic: null, fit, failure: null };
    } catch (error) {
      entry = {
        definition,
        label: modelLabel(definition),
        rank: null,
        deltaBic: null,
        deltaAic: null,
        fit: null,
        failure: error instanceof Error ? error.message : String(error),
      };
    }
    onProgress?.(index + 1, candidates.length);
    return entry;
  });
  const fitted = results.filter((r) => r.fit !== null && Number.isFinite(r.fit.bic));
  fitted.sort((a, b) => a.fit!.bic - b.fit!.bic || a.fit!.aic - b.fit!.aic);
  const failed = results.filter((r) => !fitted.includes(r));
  for (const r of failed) {
    if (r.failure === null) r.failure = "the fit gave a non-finite information criterion";
  }
  if (fitted.length > 0) {
    const bestBic = fitted[0].fit!.bic;
    const bestAic = Math.min(...fitted.map((r) => r.fit!.aic));
    fitted.forEach((r, i) => {
      r.rank = i + 1;
      r.deltaBic = r.fit!.bic - bestBic;
      r.deltaAic = r.fit!.aic - bestAic;
    });
  }
  return [...fitted, ...failed];
}
