/*
 * Contract between the heat-capacity models (shared/physics) and the fitter (shared/fitting).
 * Everything is SI: temperature in K, heat capacity in J/(mol·K) per mole of formula units.
 */

/** One model parameter: UI forms and the fitter both read this. */
export interface ParamSpec {
  /** Stable name used in the API, the CLI and stored fits: gamma, beta, delta, thetaD, thetaE, nD, nE, gap, nS, gRatio, nuclearA (repeats numbered: thetaE2). */
  readonly name: string;
  /** Unit in plain text, e.g. "K", "J/(mol·K²)", "1" for counts and ratios. */
  readonly unit: string;
  /** Physical bounds the fitter must respect (may be ±Infinity). */
  readonly lower: number;
  readonly upper: number;
}

/** A model y(T; p) with named parameters. */
export interface HeatCapacityModel {
  readonly params: readonly ParamSpec[];
  /** Heat capacity at temperatureK for parameter vector p (same order as params). */
  evaluate(p: readonly number[], temperatureK: number): number;
  /** ∂y/∂p_i at temperatureK, same order as params; absent when no analytic derivative exists. */
  jacobian?(p: readonly number[], temperatureK: number): number[];
}

/** Components of a composite model, summed. */
export type ComponentDefinition =
  | { kind: "electronic" } // gamma·T
  | { kind: "t3" } // beta·T³
  | { kind: "t5" } // delta·T⁵
  | { kind: "debye"; dimension?: 1 | 2 | 3 } // thetaD, nD (dimension defaults to 3)
  | { kind: "einstein" } // thetaE, nE
  | { kind: "schottky" } // gap (K), nS, gRatio = g0/g1
  | { kind: "nuclear" }; // nuclearA / T²

export type ComponentKind = ComponentDefinition["kind"];

/** User choices for one parameter, keyed by its name in ModelDefinition.parameters. */
export interface ParameterSetting {
  /** Start value, or the value held when fixed. */
  value?: number;
  fixed?: boolean;
  lower?: number;
  upper?: number;
}

export interface ModelDefinition {
  components: ComponentDefinition[];
  /**
   * Oscillator atoms add up to n (atoms per formula unit): n_D = n − Σ n_E. Then nD is not a parameter
   * of the composite. Needs exactly one Debye component.
   */
  constrainAtoms?: boolean;
  parameters?: Record<string, ParameterSetting>;
}

/** What buildComposite returns (shared/physics/composite.ts). */
export interface CompositeModel extends HeatCapacityModel {
  readonly definition: ModelDefinition;
  /** Each component's own contribution at T, for plots ("Debye", "Einstein 2", …). */
  parts(p: readonly number[], temperatureK: number): { label: string; value: number }[];
  /** Index of each parameter name in params. */
  indexOf(name: string): number;
}
