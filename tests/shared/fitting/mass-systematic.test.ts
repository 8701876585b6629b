import { describe, expect, it } from "vitest";
import { fitHeatCapacity } from "@shared/fitting/fit-model";
import { fitLowT, thetaDFromBeta } from "@shared/fitting/linear";
import { lowTMassSystematic, massSystematic } from "@shared/fitting/mass-systematic";
import type { ModelDefinition } from "@shared/physics/model-types";
import { expectClose } from "../../helpers/expect-close";
import { createSeededRandom } from "@shared/numerics/seeded-random";
import { syntheticRun } from "./synthetic-runs";

const def: ModelDefinition = { components: [{ kind: "electronic" }, { kind: "debye" }] };
const mass = { massMg: 12.5, sigmaMassMg: 0.05 };
// |m/(m − σ) − m/(m + σ)|/2 = mσ/(m² − σ²): the exact relative half-spread of any quantity ∝ 1/m.
const relative = (mass.massMg * mass.sigmaMassMg) / (mass.massMg ** 2 - mass.sigmaMassMg ** 2);

describe("massSystematic: refit at m ± σ_m", () => {
  // Synthetic run (seed 301).
  const run = syntheticRun(def, 2, [1.2e-3, 320, 2], { points: 150, tMinK: 2, tMaxK: 300 }, 0.005, createSeededRandom(301));

  it("with n_D free, scaling every Cp by m/m' scales γ and n_D exactly and leaves θ_D unchanged (C_D = 3n_D R·D(θ_D/T))", () => {
    const nominal = fitHeatCapacity(run, def, { atomsPerFormulaUnit: 2 });
    const result = massSystematic(run, def, { atomsPerFormulaUnit: 2 }, mass, nominal);
    expect(result.parameterNames).toEqual(["gamma", "thetaD", "nD"]);
    expectClose(result.systematic[0], nominal.params[0] * relative, { rel: 1e-6 }, "gamma"); // both refits converge to ~1e-7 σ
    expectClose(result.systematic[2], nominal.params[2] * relative, { rel: 1e-6 }, "nD");
    expect(result.systematic[1]).toBeLessThan(1e-6 * nominal.stdErrors[1]!);
  });

  it("with n_D fixed, θ_D takes up the scaling: its systematic part is nonzero and the fixed n_D has none", () => {
    const fixedDef: ModelDefinition = { ...def, parameters: { nD: { value: 2, fixed: true } } };
    const result = massSystematic(run, fixedDef, { atomsPerFormulaUnit: 2 }, mass);
    expect(result.systematic[2]).toBe(0);
    expect(result.systematic[1]).toBeGreaterThan(0);
    // Heavier true mass → smaller molar Cp → higher θ_D.
    expect(result.fitHeavier.params[1]).toBeGreaterThan(result.fitLighter.params[1]);
  });

  it("refuses σ_m ≥ m and m ≤ 0", () => {
    expect(() => massSystematic(run, def, { atomsPerFormulaUnit: 2 }, { massMg: 1, sigmaMassMg: 1 })).toThrow(/sigmaMassMg/);
    expect(() => massSystematic(run, def, { atomsPerFormulaUnit: 2 }, { massMg: 0, sigmaMassMg: 0 })).toThrow(/massMg/);
  });
});

describe("lowTMassSystematic: closed form for the C/T line", () => {
  it("matches refitting fitLowT at m ± σ_m, for γ, β, δ and θ_D from β", () => {
    const t = Array.from({ length: 30 }, (_, i) => 2 + 0.2 * i);
    const c = t.map((ti) => 1.1e-3 * ti + 6e-5 * ti ** 3 + 3e-8 * ti ** 5);
    const fit = (factor: number) => fitLowT(t, c.map((v) => v * factor), null, { withT5: true });
    const nominal = fit(1);
    const heavy = fit(mass.massMg / (mass.massMg + mass.sigmaMassMg));
    const light = fit(mass.massMg / (mass.massMg - mass.sigmaMassMg));
    const closed = lowTMassSystematic(nominal, 3, mass);
    expectClose(closed.gamma, Math.abs(heavy.gamma - light.gamma) / 2, { rel: 1e-9 }, "gamma");
    expectClose(closed.beta, Math.abs(heavy.beta - light.beta) / 2, { rel: 1e-9 }, "beta");
    expectClose(closed.delta!, Math.abs(heavy.delta! - light.delta!) / 2, { rel: 1e-8 }, "delta");
    const thetaSpread = Math.abs(thetaDFromBeta(heavy.beta, 3).thetaD - thetaDFromBeta(light.beta, 3).thetaD) / 2;
    expectClose(closed.thetaD!, thetaSpread, { rel: 1e-9 }, "thetaD");
  });
});
