/*
 * The systematic part of each fitted parameter's uncertainty that comes from the sample-mass
 * uncertainty, reported apart from the statistical (fit) part.
 *
 * Molar heat capacity is C_total·M/m, so with the true mass m' = m ± σ_m every molar value (and its σ)
 * scales by m/m'. We refit at both masses and quote half the spread per parameter:
 *   u_m(p) = |p(m + σ_m) − p(m − σ_m)| / 2.
 * For the linear low-temperature fit the refit is exact by hand: γ, β, δ scale by m/m', so
 *   u_m(γ) = γ·|m/(m − σ_m) − m/(m + σ_m)|/2 = γ·m·σ_m/(m² − σ_m²)   (likewise β, δ),
 * and θ_D ∝ β^{−1/3} ∝ (m'/m)^{1/3}, so u_m(θ_D) = θ_D·|((m + σ_m)/m)^{1/3} − ((m − σ_m)/m)^{1/3}|/2.
 * Half the spread of a ±1σ refit is the usual one-at-a-time (finite-difference) propagation of a
 * systematic input (JCGM 100:2008, GUM, §5.1.3 and annex F for the sensitivity-coefficient idea; common
 * practice, no source for this exact recipe).
 */
import type { ModelDefinition } from "@shared/physics/model-types";
import { fitHeatCapacity, type FitModelOptions, type HeatCapacityData, type HeatCapacityFit } from "@shared/fitting/fit-model";
import { thetaDFromBeta } from "@shared/fitting/linear";

export interface MassInput {
  /** Sample mass used for the molar values, mg (> 0). */
  massMg: number;
  /** Its standard uncertainty, mg (≥ 0 and < massMg). */
  sigmaMassMg: number;
}

export interface MassSystematic {
  parameterNames: string[];
  /** Half the spread of each parameter between the refits at m + σ_m and m − σ_m (its unit); 0 for fixed parameters. */
  systematic: number[];
  /** Refit with molar values scaled by m/(m + σ_m). */
  fitHeavier: HeatCapacityFit;
  /** Refit with molar values scaled by m/(m − σ_m). */
  fitLighter: HeatCapacityFit;
}

function checkMass(mass: MassInput): void {
  if (mass === null || typeof mass !== "object") throw new TypeError("mass must be an object with massMg and sigmaMassMg");
  if (!(Number.isFinite(mass.massMg) && mass.massMg > 0)) throw new RangeError(`massMg must be a mass > 0 mg (got ${String(mass.massMg)})`);
  if (!(Number.isFinite(mass.sigmaMassMg) && mass.sigmaMassMg >= 0 && mass.sigmaMassMg < mass.massMg)) {
    throw new RangeError(`sigmaMassMg must be ≥ 0 and below massMg (got ${String(mass.sigmaMassMg)} mg for ${String(mass.massMg)} mg)`);
  }
}

/**
 * Mass-uncertainty systematic of every parameter of a composite fit, by refitting at m ± σ_m.
 * @param data the run as fitted: T (K), molar cp and σ (J/(mol·K)) computed with massMg, optional mask
 * @param def the model definition
 * @param opts as for fitHeatCapacity
 * @param mass sample mass and its standard uncertainty, mg
 * @param baseline the fit at the nominal mass; its parameters start both refits (so they stay in its
 *   minimum); fitted here when omitted
 * @returns the half-spread per parameter, in each parameter's unit, with both refits
 * @throws RangeError for a bad mass or its uncertainty, and whatever fitHeatCapacity throws
 * @see JCGM 100:2008 (GUM) §5.1.3
 */
export function massSystematic(
  data: HeatCapacityData,
  def: ModelDefinition,
  opts: FitModelOptions,
  mass: MassInput,
  baseline?: HeatCapacityFit,
): MassSystematic {
  checkMass(mass);
  const nominal = baseline ?? fitHeatCapacity(data, def, opts);
  const parameters: NonNullable<ModelDefinition["parameters"]> = { ...(def.parameters ?? {}) };
  nominal.parameterNames.forEach((name, j) => {
    parameters[name] = { ...(parameters[name] ?? {}), value: nominal.params[j] };
  });
  const startAtNominal: ModelDefinition = { ...def, parameters };
  const refit = (trueMassMg: number) => {
    const factor = mass.massMg / trueMassMg;
    const scaled: HeatCapacityData = {
      temperatureK: data.temperatureK,
      cp: data.cp.map((v) => v * factor),
      sigma: data.sigma === null ? null : data.sigma.map((v) => v * factor),
      masked: data.masked,
    };
    // Fixed amplitudes are physical statements (a fixed n_D, say) and stay fixed; free ones start scaled.
    const scaledStart: ModelDefinition = {
      ...startAtNominal,
      parameters: Object.fromEntries(
        Object.entries(startAtNominal.parameters ?? {}).map(([name, s]) => {
          const amplitude = /^(gamma|beta|delta|nD|nE|nS|nuclearA)\d*$/.test(name);
          return [name, amplitude && !s.fixed && s.value !== undefined ? { ...s, value: s.value * factor } : s];
        }),
      ),
    };
    return fitHeatCapacity(scaled, scaledStart, opts);
  };
  const fitHeavier = refit(mass.massMg + mass.sigmaMassMg);
  const fitLighter = refit(mass.massMg - mass.sigmaMassMg);
  return {
    parameterNames: nominal.parameterNames,
    systematic: nominal.params.map((_, j) => Math.abs(fitHeavier.params[j] - fitLighter.params[j]) / 2),
    fitHeavier,
    fitLighter,
  };
}

/**
 * Mass-uncertainty systematic of the low-temperature line, in closed form (γ, β, δ scale by m/m').
 * @param fit γ (J/(mol·K²)), β (J/(mol·K⁴)) and optionally δ (J/(mol·K⁶)) at the nominal mass
 * @param atomsN atoms per formula unit, for θ_D from β
 * @param mass sample mass and its standard uncertainty, mg
 * @returns half-spreads of γ, β, δ (null without δ) and θ_D (K; null when β ≤ 0)
 * @throws RangeError for a bad mass or its uncertainty, or non-finite γ, β
 */
export function lowTMassSystematic(
  fit: { gamma: number; beta: number; delta?: number | null },
  atomsN: number,
  mass: MassInput,
): { gamma: number; beta: number; delta: number | null; thetaD: number | null } {
  checkMass(mass);
  if (!Number.isFinite(fit.gamma) || !Number.isFinite(fit.beta)) throw new RangeError("fit.gamma and fit.beta must be finite numbers");
  const m = mass.massMg;
  const s = mass.sigmaMassMg;
  // |m/(m − σ) − m/(m + σ)| / 2 = m·σ/(m² − σ²)
  const relative = (m * s) / (m * m - s * s);
  const delta = fit.delta === undefined || fit.delta === null ? null : Math.abs(fit.delta) * relative;
  let thetaD: number | null = null;
  if (fit.beta > 0) {
    const theta = thetaDFromBeta(fit.beta, atomsN).thetaD;
    thetaD = (theta * Math.abs(Math.cbrt((m + s) / m) - Math.cbrt((m - s) / m))) / 2;
  }
  return { gamma: Math.abs(fit.gamma) * relative, beta: Math.abs(fit.beta) * relative, delta, thetaD };
}
