import { buildComposite } from "@shared/physics/composite";
import type { ParamSpec } from "@shared/physics/model-types";
import { startValueCandidates } from "@shared/fitting/start-values";
import type { ModelDefinitionInput } from "@shared/schemas/fits";

/**
 * The composite's parameter specs for the composer (names, units, physical bounds), built with the
 * same engine code the server fits with; a definition the engine refuses gives its reason instead.
 */
export function buildModelSpecs(def: ModelDefinitionInput, atomsPerFormulaUnit: number): { specs: readonly ParamSpec[] | null; error: string | null } {
  if (def.components.length === 0) return { specs: null, error: null };
  try {
    return { specs: buildComposite(def, atomsPerFormulaUnit).params, error: null };
  } catch (err) {
    const message = err instanceof Error ? err.message.replace(/^buildComposite: /, "") : String(err);
    return { specs: null, error: message.charAt(0).toUpperCase() + message.slice(1) };
  }
}

/**
 * The start values the engine would try first for these points, by parameter name; null when there are
 * too few points or the model cannot be built. Computed in the browser from the shared start-value code.
 */
export function suggestStartValues(
  def: ModelDefinitionInput,
  atomsPerFormulaUnit: number,
  points: readonly { temperatureK: number; cp: number; sigma: number | null }[],
): Record<string, number> | null {
  if (def.components.length === 0 || points.length < 3) return null;
  try {
    const model = buildComposite(def, atomsPerFormulaUnit);
    const allSigma = points.every((p) => p.sigma !== null && p.sigma > 0);
    const [first] = startValueCandidates(
      { temperatureK: points.map((p) => p.temperatureK), cp: points.map((p) => p.cp), sigma: allSigma ? points.map((p) => p.sigma as number) : null },
      model,
      def,
      { atomsPerFormulaUnit, maxCandidates: 1 },
    );
    if (!first) return null;
    return Object.fromEntries(model.params.map((p, j) => [p.name, first.values[j]]));
  } catch {
    return null;
  }
}
