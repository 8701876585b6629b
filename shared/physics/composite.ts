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
import * as debye from "./debye";
import * as einstein from "./einstein";
import * as electronic from "./electronic";
import * as nuclear from "./nuclear";
import * as schottky from "./schottky";
import * as t3 from "./t3";
import * as t5 from "./t5";
import type { CompositeModel, ComponentDefinition, ComponentKind, ModelDefinition, ParamSpec } from "./model-types";

interface ComponentModule {
  readonly params: readonly ParamSpec[];
  evaluate(p: readonly number[], temperatureK: number): number;
  jacobian(p: readonly number[], temperatureK: number): number[];
}

const LABELS: Record<ComponentKind, string> = {
  electronic: "Electronic",
  t3: "T³ term",
  t5: "T⁵ term",
  debye: "Debye",
  einstein: "Einstein",
  schottky: "Schottky",
  nuclear: "Nuclear",
};

function moduleFor(c: ComponentDefinition): ComponentModule {
  switch (c.kind) {
    case "electronic":
      return electronic;
    case "t3":
      return t3;
    case "t5":
      return t5;
    case "einstein":
      return einstein;
    case "schottky":
      return schottky;
    case "nuclear":
      return nuclear;
    case "debye": {
      const d = c.dimension ?? 3;
      if (d !== 1 && d !== 2 && d !== 3) throw new RangeError(`debye component: dimension must be 1, 2 or 3, got ${String(d)}`);
      return {
        params: debye.params,
        evaluate: (p, t) => debye.evaluate(p, t, d),
        jacobian: (p, t) => debye.jacobian(p, t, d),
      };
    }
    default:
      throw new RangeError(`unknown component kind "${String((c as { kind: unknown }).kind)}"`);
  }
}

interface Piece {
  readonly label: string;
  readonly module: ComponentModule;
  /** For each of the module's parameters, its index in the composite vector, or −1 for the derived nD. */
  readonly slots: readonly number[];
  /** Parameter values handed to the module (reused between calls, so evaluation allocates nothing). */
  readonly scratch: number[];
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
  const debyeCount = def.components.filter((c) => c.kind === "debye").length;
  if (constrain && debyeCount !== 1) {
    throw new RangeError(`buildComposite: constrainAtoms needs exactly one Debye component, found ${debyeCount}`);
  }

  const params: ParamSpec[] = [];
  const pieces: Piece[] = [];
  const seen = new Map<ComponentKind, number>();
  const einsteinCountSlots: number[] = [];
  let debyePiece = -1;
  for (const c of def.components) {
    const module = moduleFor(c);
    const occurrence = (seen.get(c.kind) ?? 0) + 1;
    seen.set(c.kind, occurrence);
    const suffix = occurrence === 1 ? "" : String(occurrence);
    const slots: number[] = [];
    for (const spec of module.params) {
      if (constrain && c.kind === "debye" && spec.name === "nD") {
        slots.push(-1);
        continue;
      }
      slots.push(params.length);
      params.push({ name: spec.name + suffix, unit: spec.unit, lower: spec.lower, upper: spec.upper });
      if (c.kind === "einstein" && spec.name === "nE") einsteinCountSlots.push(params.length - 1);
    }
    if (c.kind === "debye") debyePiece = pieces.length;
    pieces.push({
      label: LABELS[c.kind] + (occurrence === 1 ? "" : ` ${occurrence}`),
      module,
      slots,
      scratch: new Array<number>(slots.length).fill(0),
    });
  }

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
  const load = (piece: Piece, p: readonly number[]): readonly number[] => {
    const { slots, scratch } = piece;
    for (let i = 0; i < slots.length; i++) {
      const s = slots[i];
      if (s >= 0) scratch[i] = p[s];
      else {
        let nE = 0;
        for (const e of einsteinCountSlots) nE += p[e];
        scratch[i] = atomsPerFormulaUnit - nE;
      }
    }
    return scratch;
  };

  const evaluate = (p: readonly number[], temperatureK: number): number => {
    checkLength(p);
    let sum = 0;
    for (const piece of pieces) sum += piece.module.evaluate(load(piece, p), temperatureK);
    return sum;
  };

  const jacobian = (p: readonly number[], temperatureK: number): number[] => {
    checkLength(p);
    const out = new Array<number>(nParams).fill(0);
    for (let k = 0; k < pieces.length; k++) {
      const piece = pieces[k];
      const j = piece.module.jacobian(load(piece, p), temperatureK);
      for (let i = 0; i < piece.slots.length; i++) {
        const s = piece.slots[i];
        if (s >= 0) out[s] += j[i];
        // Derived n_D = n − Σ n_E: ∂C_D/∂n_E = −∂C_D/∂n_D for every Einstein count.
        else if (k === debyePiece) for (const e of einsteinCountSlots) out[e] -= j[i];
      }
    }
    return out;
  };

  const parts = (p: readonly number[], temperatureK: number): { label: string; value: number }[] => {
    checkLength(p);
    return pieces.map((piece) => ({ label: piece.label, value: piece.module.evaluate(load(piece, p), temperatureK) }));
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
