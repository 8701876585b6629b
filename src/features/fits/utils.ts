import type { ComponentDefinition, ComponentKind, ParameterSetting } from "@shared/physics/model-types";
import type { ModelDefinitionInput } from "@shared/schemas/fits";

/** Plain names and formulas of the model terms, as the composer lists them. */
export const COMPONENT_INFO: Record<ComponentKind, { title: string; formula: string; note: string }> = {
  electronic: { title: "Electronic", formula: "γT", note: "Sommerfeld term of the conduction electrons" },
  t3: { title: "Lattice T³", formula: "βT³", note: "low-temperature lattice term; θ_D follows from β" },
  t5: { title: "Lattice T⁵", formula: "δT⁵", note: "next term of the low-temperature expansion" },
  debye: { title: "Debye lattice", formula: "9n_D R (T/θ_D)³ ∫ t⁴eᵗ/(eᵗ−1)² dt", note: "acoustic phonons" },
  einstein: { title: "Einstein mode", formula: "3n_E R x²eˣ/(eˣ−1)²", note: "an optical branch or a rattling atom" },
  schottky: { title: "Two-level Schottky", formula: "n_S R (Δ/T)² g e^{Δ/T}/(1+g e^{Δ/T})²", note: "a split level, g = g₀/g₁" },
  nuclear: { title: "Nuclear tail", formula: "A/T²", note: "hyperfine levels below a few kelvin" },
};

export const ADDABLE_KINDS: readonly ComponentKind[] = ["electronic", "t3", "t5", "debye", "einstein", "schottky", "nuclear"];

/** Base parameter names of each kind, before repeats are numbered (thetaE, thetaE2, …). */
const KIND_PARAMETERS: Record<ComponentKind, readonly string[]> = {
  electronic: ["gamma"],
  t3: ["beta"],
  t5: ["delta"],
  debye: ["thetaD", "nD"],
  einstein: ["thetaE", "nE"],
  schottky: ["gap", "nS", "gRatio"],
  nuclear: ["nuclearA"],
};

/** Symbols shown for parameter names. */
export function parameterSymbol(name: string): string {
  const m = /^([A-Za-z]+?)(\d*)$/.exec(name);
  const base = m?.[1] ?? name;
  const index = m?.[2] ? ` ${m[2]}` : "";
  const symbols: Record<string, string> = {
    gamma: "γ",
    beta: "β",
    delta: "δ",
    thetaD: "θ_D",
    nD: "n_D",
    thetaE: "θ_E",
    nE: "n_E",
    gap: "Δ",
    nS: "n_S",
    gRatio: "g₀/g₁",
    nuclearA: "A",
  };
  return `${symbols[base] ?? base}${index}`;
}

/**
 * The parameter names each component contributes, in component order. Repeats of a kind are numbered
 * from the second on (thetaE, thetaE2), as the engine names them. With the atom constraint nD is not a
 * parameter (n_D = n − Σ n_E).
 */
export function componentParameterNames(def: ModelDefinitionInput): string[][] {
  const seen = new Map<ComponentKind, number>();
  return def.components.map((c) => {
    const k = (seen.get(c.kind) ?? 0) + 1;
    seen.set(c.kind, k);
    const suffix = k === 1 ? "" : String(k);
    return KIND_PARAMETERS[c.kind]
      .filter((n) => !(def.constrainAtoms && c.kind === "debye" && n === "nD"))
      .map((n) => `${n}${suffix}`);
  });
}

/** Adds a component at the end. */
export function addComponent(def: ModelDefinitionInput, component: ComponentDefinition): ModelDefinitionInput {
  return { ...def, components: [...def.components, component] };
}

/**
 * Removes the component at `index`. Settings of parameters that no longer exist are dropped, and the
 * settings of later repeats of the same kind move down one number (thetaE3 → thetaE2) so they stay with
 * their component.
 */
export function removeComponent(def: ModelDefinitionInput, index: number): ModelDefinitionInput {
  const before = componentParameterNames({ ...def, constrainAtoms: false });
  const components = def.components.filter((_, i) => i !== index);
  const next: ModelDefinitionInput = { ...def, components };
  if (def.constrainAtoms && !components.some((c) => c.kind === "debye")) delete next.constrainAtoms;
  const after = componentParameterNames({ ...next, constrainAtoms: false });
  const old = def.parameters ?? {};
  const params: Record<string, ParameterSetting> = {};
  let j = 0;
  for (let i = 0; i < before.length; i++) {
    if (i === index) continue;
    before[i].forEach((name, k) => {
      const setting = old[name];
      if (setting) params[after[j][k]] = setting;
    });
    j++;
  }
  next.parameters = params;
  return next;
}

/** Replaces one component (e.g. a Debye dimension change). */
export function replaceComponent(def: ModelDefinitionInput, index: number, component: ComponentDefinition): ModelDefinitionInput {
  return { ...def, components: def.components.map((c, i) => (i === index ? component : c)) };
}

/** Merges a change into one parameter's setting; an emptied setting is dropped. */
export function updateParameter(def: ModelDefinitionInput, name: string, patch: Partial<ParameterSetting>): ModelDefinitionInput {
  const current = { ...(def.parameters?.[name] ?? {}), ...patch };
  for (const key of Object.keys(current) as (keyof ParameterSetting)[]) {
    if (current[key] === undefined) delete current[key];
  }
  if (current.fixed === false) delete current.fixed;
  const parameters = { ...(def.parameters ?? {}) };
  if (Object.keys(current).length === 0) delete parameters[name];
  else parameters[name] = current;
  return { ...def, parameters };
}

/** A short label of a model, e.g. "γT + Debye + Einstein". */
export function modelLabel(def: ModelDefinitionInput): string {
  return def.components
    .map((c) => {
      if (c.kind === "electronic") return "γT";
      if (c.kind === "t3") return "βT³";
      if (c.kind === "t5") return "δT⁵";
      if (c.kind === "debye") return c.dimension && c.dimension !== 3 ? `Debye ${c.dimension}D` : "Debye";
      return COMPONENT_INFO[c.kind].title.replace("Two-level ", "").replace(" mode", "").replace(" tail", "");
    })
    .join(" + ");
}

/** Keeps every k-th point so a chart draws at most `limit` (masked points always kept); for display only, never for fitting. */
export function decimateForDisplay<T extends object>(points: readonly T[], limit = 2000): T[] {
  if (points.length <= limit) return [...points];
  const step = Math.ceil(points.length / limit);
  return points.filter((p, i) => i % step === 0 || (p as { masked?: boolean }).masked === true || i === points.length - 1);
}

/** Parses a number field; empty → undefined, junk → NaN (the form shows it as invalid). */
export function parseNumberField(text: string): number | undefined {
  const t = text.trim().replace(",", ".");
  if (t === "") return undefined;
  return Number(t);
}

/** Ticks at 1, 2, 5 × 10ⁿ between lo and hi (K), for a logarithmic temperature axis. */
export function logTicks(lo: number, hi: number): number[] {
  if (!(lo > 0) || !(hi > lo)) return [];
  const out: number[] = [];
  for (let e = Math.floor(Math.log10(lo)); e <= Math.ceil(Math.log10(hi)); e++) {
    for (const m of [1, 2, 5]) {
      const t = Number((m * 10 ** e).toPrecision(3));
      if (t >= lo && t <= hi) out.push(t);
    }
  }
  return out;
}
