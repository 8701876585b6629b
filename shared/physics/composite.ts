/*
 * Composite heat-capacity model: a sum of components (electronic γT, βT³, δT⁵, Debye, Einstein,
 * two-level Schottky, nuclear A/T²), each with its own parameters.
 *
 *   C(T) = Σ_c C_c(T; p_c)
 *
 * Units: T in K; C in J/(mol·K) per mole of formula units; parameters as in each component file.
 * Parameter order follows the component order; a repeated component numbers its parameters from the
 * second occurrence on (thetaE, nE, thetaE2, nE2, …) and its plot label likewise ("Einstein 2").
 * With constrainAtoms, the oscillator atoms add up to n: n_D = n − Σ n_E over the Einstein components,
 * and nD is not a parameter (its derivative is carried by each nE). n_D is not clamped at 0 so the
 * model stays smooth for the fitter; a fitted Σ n_E > n shows up as a negative Debye part.
 * Source: additivity of independent contributions to the heat capacity (common practice, no source);
 * the constraint is the count of 3n vibrational modes per formula unit.
 */
import { GAS_CONSTANT } from "./constants";
import { type DebyeDimension, debyeFunction, debyeValueAndSlope, params as debyeParams } from "./debye";
import { einsteinFunction, einsteinValueAndSlope, params as einsteinParams } from "./einstein";
import { params as electronicParams } from "./electronic";
import { params as nuclearParams } from "./nuclear";
import * as schottky from "./schottky";
import { params as t3Params } from "./t3";
import { params as t5Params } from "./t5";
import type { CompositeModel, ComponentDefinition, ComponentKind, ModelDefinition, ParamSpec } from "./model-types";

const R = GAS_CONSTANT;

const LABELS: Record<ComponentKind, string> = {
  electronic: "Electronic",
  t3: "T³ term",
  t5: "T⁵ term",
  debye: "Debye",
  einstein: "Einstein",
  schottky: "Schottky",
  nuclear: "Nuclear",
};

const PARAMS: Record<ComponentKind, readonly ParamSpec[]> = {
  electronic: electronicParams,
  t3: t3Params,
  t5: t5Params,
  debye: debyeParams,
  einstein: einsteinParams,
  schottky: schottky.params,
  nuclear: nuclearParams,
};

/**
 * One component bound to its slots in the composite parameter vector. Each kind gets its own small
 * closures that read p directly, so evaluation allocates nothing and the fitter's inner loop stays cheap;
 * the formulas are those of the component files (tests compare the two).
 */
interface Term {
  readonly label: string;
  value(p: readonly number[], t: number): number;
  /** Adds this term's ∂C/∂p into out. */
  addGradient(p: readonly number[], t: number, out: number[]): void;
}

/** Composite-vector index of each of the component's parameters (−1: derived n_D). */
function makeTerm(
  c: ComponentDefinition,
  label: string,
  slots: readonly number[],
  debyeCount: (p: readonly number[]) => number,
  einsteinCountSlots: readonly number[],
): Term {
  const [i0, i1, i2] = slots;
  switch (c.kind) {
    case "electronic":
      return { label, value: (p, t) => p[i0] * t, addGradient: (_p, t, out) => void (out[i0] += t) };
    case "t3":
      return { label, value: (p, t) => p[i0] * t * t * t, addGradient: (_p, t, out) => void (out[i0] += t * t * t) };
    case "t5":
      return {
        label,
        value: (p, t) => p[i0] * t * t * t * t * t,
        addGradient: (_p, t, out) => void (out[i0] += t * t * t * t * t),
      };
    case "nuclear":
      return { label, value: (p, t) => p[i0] / (t * t), addGradient: (_p, t, out) => void (out[i0] += 1 / (t * t)) };
    case "einstein":
      return {
        label,
        value: (p, t) => 3 * p[i1] * R * einsteinFunction(p[i0] / t),
        addGradient: (p, t, out) => {
          const [e, slope] = einsteinValueAndSlope(p[i0] / t);
          out[i0] += (3 * p[i1] * R * slope) / t;
          out[i1] += 3 * R * e;
        },
      };
    case "debye": {
      const d = (c.dimension ?? 3) as DebyeDimension;
      const derived = i1 < 0;
      return {
        label,
        value: (p, t) => 3 * (derived ? debyeCount(p) : p[i1]) * R * debyeFunction(p[i0] / t, d),
        addGradient: (p, t, out) => {
          const [v, slope] = debyeValueAndSlope(p[i0] / t, d);
          out[i0] += (3 * (derived ? debyeCount(p) : p[i1]) * R * slope) / t;
          const dn = 3 * R * v;
          if (!derived) out[i1] += dn;
          // Derived n_D = n − Σ n_E: ∂C_D/∂n_E = −∂C_D/∂n_D for every Einstein count.
          else for (const e of einsteinCountSlots) out[e] -= dn;
        },
      };
    }
    case "schottky": {
      const scratch = [0, 0, 0];
      const load = (p: readonly number[]) => {
        scratch[0] = p[i0];
        scratch[1] = p[i1];
        scratch[2] = p[i2];
        return scratch;
      };
      return {
        label,
        value: (p, t) => schottky.evaluate(load(p), t),
        addGradient: (p, t, out) => {
          const g = schottky.jacobian(load(p), t);
          out[i0] += g[0];
          out[i1] += g[1];
          out[i2] += g[2];
        },
      };
    }
    default:
      throw new RangeError(`unknown component kind "${String((c as { kind: unknown }).kind)}"`);
  }
}

/**
 * Builds a composite model from its definition.
 * @param def components (summed in order), optional constrainAtoms, optional per-parameter settings
 *   (their names are checked against the model's parameters; values and fixing are the fitter's business)
 * @param atomsPerFormulaUnit n, atoms per formula unit (> 0); used by constrainAtoms
 * @returns the model: params (physical bounds), evaluate, analytic jacobian, parts for plots, indexOf
 * @throws RangeError on an empty component list, non-positive or non-finite n, an unknown component kind or
 *   Debye dimension, constrainAtoms without exactly one Debye component, a setting for an unknown parameter,
 *   or a setting with lower > upper
 */
export function buildComposite(def: ModelDefinition, atomsPerFormulaUnit: number): CompositeModel {
  if (!Array.isArray(def.components) || def.components.length === 0) {
    throw new RangeError("buildComposite: the model needs at least one component");
  }
  if (!(atomsPerFormulaUnit > 0) || !Number.isFinite(atomsPerFormulaUnit)) {
    throw new RangeError(`buildComposite: atomsPerFormulaUnit must be a positive number, got ${atomsPerFormulaUnit}`);
  }
  const constrain = def.constrainAtoms === true;
  const debyeComponents = def.components.filter((c) => c.kind === "debye").length;
  if (constrain && debyeComponents !== 1) {
    throw new RangeError(`buildComposite: constrainAtoms needs exactly one Debye component, found ${debyeComponents}`);
  }

  const params: ParamSpec[] = [];
  const seen = new Map<ComponentKind, number>();
  const einsteinCountSlots: number[] = [];
  const layout: { c: ComponentDefinition; label: string; slots: number[] }[] = [];
  for (const c of def.components) {
    const specs = Object.hasOwn(PARAMS, c.kind) ? PARAMS[c.kind] : undefined;
    if (specs === undefined) throw new RangeError(`buildComposite: unknown component kind "${String(c.kind)}"`);
    if (c.kind === "debye") {
      const d = c.dimension ?? 3;
      if (d !== 1 && d !== 2 && d !== 3) throw new RangeError(`buildComposite: Debye dimension must be 1, 2 or 3, got ${String(d)}`);
    }
    const occurrence = (seen.get(c.kind) ?? 0) + 1;
    seen.set(c.kind, occurrence);
    const suffix = occurrence === 1 ? "" : String(occurrence);
    const slots: number[] = [];
    for (const spec of specs) {
      if (constrain && c.kind === "debye" && spec.name === "nD") {
        slots.push(-1);
        continue;
      }
      slots.push(params.length);
      params.push({ name: spec.name + suffix, unit: spec.unit, lower: spec.lower, upper: spec.upper });
      if (c.kind === "einstein" && spec.name === "nE") einsteinCountSlots.push(params.length - 1);
    }
    layout.push({ c, label: LABELS[c.kind] + (occurrence === 1 ? "" : ` ${occurrence}`), slots });
  }
  const debyeCount = (p: readonly number[]): number => {
    let nE = 0;
    for (const e of einsteinCountSlots) nE += p[e];
    return atomsPerFormulaUnit - nE;
  };
  const terms = layout.map(({ c, label, slots }) => makeTerm(c, label, slots, debyeCount, einsteinCountSlots));

  const index = new Map(params.map((p, i) => [p.name, i] as const));
  for (const [name, setting] of Object.entries(def.parameters ?? {})) {
    if (!index.has(name)) {
      const hint = constrain && name === "nD" ? " (nD is derived from the atom count when constrainAtoms is set)" : "";
      throw new RangeError(`buildComposite: setting for unknown parameter "${name}"${hint}; the model has ${params.map((p) => p.name).join(", ")}`);
    }
    if (setting.lower !== undefined && setting.upper !== undefined && setting.lower > setting.upper) {
      throw new RangeError(`buildComposite: parameter "${name}" has lower ${setting.lower} > upper ${setting.upper}`);
    }
  }

  const nParams = params.length;
  const checkLength = (p: readonly number[]): void => {
    if (p.length !== nParams) {
      throw new RangeError(`composite model: expected ${nParams} parameters (${params.map((q) => q.name).join(", ")}), got ${p.length}`);
    }
  };

  const evaluate = (p: readonly number[], temperatureK: number): number => {
    checkLength(p);
    let sum = 0;
    for (let k = 0; k < terms.length; k++) sum += terms[k].value(p, temperatureK);
    return sum;
  };

  const jacobian = (p: readonly number[], temperatureK: number): number[] => {
    checkLength(p);
    const out = new Array<number>(nParams).fill(0);
    for (let k = 0; k < terms.length; k++) terms[k].addGradient(p, temperatureK, out);
    return out;
  };

  const parts = (p: readonly number[], temperatureK: number): { label: string; value: number }[] => {
    checkLength(p);
    return terms.map((term) => ({ label: term.label, value: term.value(p, temperatureK) }));
  };

  return {
    definition: def,
    params,
    evaluate,
    jacobian,
    parts,
    indexOf: (name: string) => index.get(name) ?? -1,
  };
}
