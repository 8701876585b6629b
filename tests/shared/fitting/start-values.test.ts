import { describe, expect, it } from "vitest";
import { EINSTEIN_C_OVER_T3_PEAK_X, schottkyPeakX, startValueCandidates } from "@shared/fitting/start-values";
import { buildComposite } from "@shared/physics/composite";
import { einsteinFunction } from "@shared/physics/einstein";
import * as schottky from "@shared/physics/schottky";
import type { ModelDefinition } from "@shared/physics/model-types";
import { expectClose } from "../../helpers/expect-close";
import { createSeededRandom } from "@shared/numerics/seeded-random";
import { syntheticRun } from "./synthetic-runs";

describe("peak positions used for start values", () => {
  it("Einstein C/T³ peaks at θ_E/T = 4.92811935817328 (root of x·coth(x/2) = 5; mpmath 1.3.0 findroot, 30 digits)", () => {
    expectClose(EINSTEIN_C_OVER_T3_PEAK_X, 4.9281193581732837753, { rel: 1e-15 }, "constant");
    // And the Einstein function itself peaks there: scan E(x)·x³ on a fine grid around it.
    const g = (x: number) => einsteinFunction(x) * x ** 3;
    let best = 0;
    for (let x = 3; x <= 7; x += 1e-5) if (g(x) > g(best)) best = x;
    expectClose(best, EINSTEIN_C_OVER_T3_PEAK_X, { abs: 2e-5 }, "grid maximum");
  });

  it("Schottky C peaks at Δ/T = 2.39935728051547 for g = 1 (T_peak ≈ 0.417 Δ), and at the mpmath roots for other g and for C/T", () => {
    // Roots of (2 + m)/x = tanh((x + ln g)/2), mpmath 1.3.0 findroot at 30 digits.
    expectClose(schottkyPeakX(1), 2.3993572805154676678, { rel: 1e-14 }, "g=1");
    expectClose(schottkyPeakX(3), 2.1599264374648304118, { rel: 1e-14 }, "g=3");
    expectClose(schottkyPeakX(0.5), 2.6546579724625921667, { rel: 1e-14 }, "g=0.5");
    expectClose(schottkyPeakX(1, 1), 3.2436373501994747685, { rel: 1e-14 }, "C/T, g=1");
    expectClose(schottkyPeakX(2, 1), 3.1335927531850446358, { rel: 1e-14 }, "C/T, g=2");
    // The physics model's own curve peaks there (gap 10 K, g = 3).
    const c = (t: number) => schottky.evaluate([10, 1, 3], t);
    let tBest = 1;
    for (let t = 1; t <= 10; t += 1e-5) if (c(t) > c(tBest)) tBest = t;
    expectClose(10 / tBest, schottkyPeakX(3), { rel: 1e-4 }, "grid maximum");
    expect(Number.isNaN(schottkyPeakX(0))).toBe(true);
  });
});

describe("startValueCandidates on synthetic runs", () => {
  const debyeDef: ModelDefinition = { components: [{ kind: "electronic" }, { kind: "debye" }] };

  it("starts γT + Debye close to the truth: γ from the low-T line, θ_D from β (synthetic, seed 31)", () => {
    const truth = [1.5e-3, 280, 2];
    const run = syntheticRun(debyeDef, 2, truth, { points: 200, tMinK: 1.8, tMaxK: 300 }, 0.005, createSeededRandom(31));
    const model = buildComposite(debyeDef, 2);
    const [best] = startValueCandidates(run, model, debyeDef, { atomsPerFormulaUnit: 2 });
    expect(Math.abs(best.values[0] / truth[0] - 1)).toBeLessThan(0.1);
    expect(Math.abs(best.values[1] / truth[1] - 1)).toBeLessThan(0.1);
    expect(Math.abs(best.values[2] / truth[2] - 1)).toBeLessThan(0.1);
  });

  it("finds an Einstein mode near its θ_E among the best starts (synthetic, seed 32)", () => {
    const def: ModelDefinition = { components: [{ kind: "electronic" }, { kind: "debye" }, { kind: "einstein" }] };
    const truth = [2e-3, 220, 3, 70, 2];
    const run = syntheticRun(def, 5, truth, { points: 300, tMinK: 2, tMaxK: 300 }, 0.005, createSeededRandom(32));
    const model = buildComposite(def, 5);
    const candidates = startValueCandidates(run, model, def, { atomsPerFormulaUnit: 5 });
    expect(candidates.length).toBeGreaterThan(1);
    const thetaE = candidates[0].values[model.indexOf("thetaE")];
    expect(thetaE / 70).toBeGreaterThan(0.5);
    expect(thetaE / 70).toBeLessThan(2);
    for (let i = 1; i < candidates.length; i++) {
      expect(candidates[i].screenChiSquare).toBeGreaterThanOrEqual(candidates[i - 1].screenChiSquare);
    }
  });

  it("uses a user's value instead of its own, and keeps every start inside the bounds", () => {
    const def: ModelDefinition = {
      ...debyeDef,
      parameters: { thetaD: { value: 123 }, nD: { upper: 1.5 } },
    };
    const run = syntheticRun(debyeDef, 2, [1e-3, 300, 2], { points: 100, tMinK: 2, tMaxK: 300 }, 0.01, createSeededRandom(33));
    const model = buildComposite(def, 2);
    for (const c of startValueCandidates(run, model, def, { atomsPerFormulaUnit: 2 })) {
      expect(c.values[1]).toBe(123);
      expect(c.values[2]).toBeLessThanOrEqual(1.5);
    }
  });
});
