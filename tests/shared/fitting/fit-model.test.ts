import { describe, expect, it } from "vitest";
import { fitHeatCapacity } from "@shared/fitting/fit-model";
import type { ModelDefinition } from "@shared/physics/model-types";
import { createSeededRandom } from "@shared/numerics/seeded-random";
import { syntheticRun } from "./synthetic-runs";

const debyeDef: ModelDefinition = { components: [{ kind: "electronic" }, { kind: "debye" }] };
const threeDef: ModelDefinition = { components: [{ kind: "electronic" }, { kind: "debye" }, { kind: "einstein" }] };

/** |fitted − truth| ≤ 3 standard errors (σ are the true noise, so the unscaled errors apply). */
function expectWithin3Sigma(fit: ReturnType<typeof fitHeatCapacity>, truth: number[]): void {
  truth.forEach((v, j) => {
    const se = fit.stdErrorsUnscaled[j];
    expect(se, `${fit.parameterNames[j]} has a standard error`).not.toBeNull();
    expect(Math.abs(fit.params[j] - v), `${fit.parameterNames[j]}: ${fit.params[j]} vs ${v} ± ${se}`).toBeLessThan(3 * se!);
  });
}

describe("fitHeatCapacity recovers the parameters of synthetic runs", () => {
  it("γT + Debye, 300 points 1.8–300 K, 0.5 % noise (synthetic, seed 101): within 3σ, χ² in its 99 % range", () => {
    const truth = [1.2e-3, 320, 2];
    const run = syntheticRun(debyeDef, 2, truth, { points: 300, tMinK: 1.8, tMaxK: 300 }, 0.005, createSeededRandom(101));
    const fit = fitHeatCapacity({ ...run, sigma: run.sigma }, debyeDef, { atomsPerFormulaUnit: 2 });
    expect(fit.converged).toBe(true);
    expect(fit.parameterNames).toEqual(["gamma", "thetaD", "nD"]);
    expect(fit.parameterUnits[1]).toBe("K");
    expectWithin3Sigma(fit, truth);
    // χ² with 297 dof lies in [237.98, 363.53] with 99 % probability (mpmath 1.3.0 gammainc quantiles).
    expect(fit.chiSquare).toBeGreaterThan(237.98);
    expect(fit.chiSquare).toBeLessThan(363.53);
    expect(fit.warnings).toEqual([]);
  });

  it("γT + Debye + Einstein, 500 points 2–300 K, 0.5 % noise (synthetic, seed 102): within 3σ, χ² in its 99 % range", () => {
    const truth = [2e-3, 250, 3, 80, 2];
    const run = syntheticRun(threeDef, 5, truth, { points: 500, tMinK: 2, tMaxK: 300 }, 0.005, createSeededRandom(102));
    const fit = fitHeatCapacity(run, threeDef, { atomsPerFormulaUnit: 5 });
    expect(fit.converged).toBe(true);
    expect(fit.parameterNames).toEqual(["gamma", "thetaD", "nD", "thetaE", "nE"]);
    expectWithin3Sigma(fit, truth);
    // χ² with 495 dof lies in [417.71, 579.80] with 99 % probability (mpmath 1.3.0 gammainc quantiles).
    expect(fit.chiSquare).toBeGreaterThan(417.71);
    expect(fit.chiSquare).toBeLessThan(579.8);
  });

  it("with constrainAtoms the Debye atoms follow n − n_E and the rest is recovered (synthetic, seed 103)", () => {
    const def: ModelDefinition = { ...threeDef, constrainAtoms: true };
    const truth = [2e-3, 250, 80, 2]; // gamma, thetaD, thetaE, nE; nD = 5 − 2
    const run = syntheticRun(def, 5, truth, { points: 400, tMinK: 2, tMaxK: 300 }, 0.005, createSeededRandom(103));
    const fit = fitHeatCapacity(run, def, { atomsPerFormulaUnit: 5 });
    expect(fit.parameterNames).toEqual(["gamma", "thetaD", "thetaE", "nE"]);
    expectWithin3Sigma(fit, truth);
  });

  it("γT + βT³ + Schottky (g fixed at 1), 200 points 0.4–15 K (synthetic, seed 110): gap and n_S within 3σ", () => {
    const def: ModelDefinition = {
      components: [{ kind: "electronic" }, { kind: "t3" }, { kind: "schottky" }],
      parameters: { gRatio: { value: 1, fixed: true } },
    };
    const truth = [1e-3, 2e-4, 3, 0.05, 1];
    const run = syntheticRun(def, 1, truth, { points: 200, tMinK: 0.4, tMaxK: 15 }, 0.005, createSeededRandom(110));
    const fit = fitHeatCapacity(run, def, { atomsPerFormulaUnit: 1 });
    expect(fit.converged).toBe(true);
    expectWithin3Sigma(fit, truth.slice(0, 4));
  });

  it("nuclear A/T² + γT + βT³, 100 points 0.1–5 K (synthetic, seed 111): within 3σ", () => {
    const def: ModelDefinition = { components: [{ kind: "nuclear" }, { kind: "electronic" }, { kind: "t3" }] };
    const truth = [2e-5, 1e-3, 2e-4];
    const run = syntheticRun(def, 1, truth, { points: 100, tMinK: 0.1, tMaxK: 5 }, 0.005, createSeededRandom(111));
    const fit = fitHeatCapacity(run, def, { atomsPerFormulaUnit: 1 });
    expectWithin3Sigma(fit, truth);
  });

  it("γT + Debye + two Einstein modes, 400 points (synthetic, seed 112): within 3σ, and the correlations are reported", () => {
    const def: ModelDefinition = { components: [{ kind: "electronic" }, { kind: "debye" }, { kind: "einstein" }, { kind: "einstein" }] };
    const truth = [2e-3, 200, 4, 60, 2, 150, 2];
    const run = syntheticRun(def, 8, truth, { points: 400, tMinK: 2, tMaxK: 300 }, 0.003, createSeededRandom(112));
    const fit = fitHeatCapacity(run, def, { atomsPerFormulaUnit: 8 });
    expect(fit.parameterNames).toEqual(["gamma", "thetaD", "nD", "thetaE", "nE", "thetaE2", "nE2"]);
    expectWithin3Sigma(fit, truth);
  });

  it("without σ it weights points equally, says so, and still lands within 3 scaled errors (synthetic, seed 104)", () => {
    const truth = [1.2e-3, 320, 2];
    const run = syntheticRun(debyeDef, 2, truth, { points: 200, tMinK: 2, tMaxK: 300 }, 0.002, createSeededRandom(104));
    const fit = fitHeatCapacity({ temperatureK: run.temperatureK, cp: run.cp, sigma: null }, debyeDef, { atomsPerFormulaUnit: 2 });
    expect(fit.informationCriteria).toBe("estimated-sigma");
    expect(fit.warnings.some((w) => w.includes("No uncertainties were given"))).toBe(true);
    expect(Math.abs(fit.params[1] - 320)).toBeLessThan(3 * fit.stdErrors[1]!);
  });
});

describe("fitHeatCapacity: window, mask and user settings", () => {
  const truth = [1.2e-3, 320, 2];
  const run = syntheticRun(debyeDef, 2, truth, { points: 120, tMinK: 2, tMaxK: 300 }, 0.005, createSeededRandom(105));

  it("fits only unmasked points inside the window and counts what it left out", () => {
    const masked = run.temperatureK.map((_, i) => i % 10 === 3);
    const fit = fitHeatCapacity({ ...run, masked }, debyeDef, { atomsPerFormulaUnit: 2, windowK: [5, 200] });
    const expected = run.temperatureK.map((t, i) => (t >= 5 && t <= 200 && !masked[i] ? i : -1)).filter((i) => i >= 0);
    expect(fit.pointsUsed).toEqual(expected);
    expect(fit.maskedExcluded).toBe(run.temperatureK.filter((t, i) => masked[i] && t >= 5 && t <= 200).length);
    expect(fit.outsideWindow).toBe(run.temperatureK.filter((t, i) => !masked[i] && (t < 5 || t > 200)).length);
    expect(fit.pointCount).toBe(expected.length);
    expect(fit.windowK[0]).toBeGreaterThanOrEqual(5);
  });

  it("holds a fixed parameter at its value and reports no error for it", () => {
    const def: ModelDefinition = { ...debyeDef, parameters: { nD: { value: 2, fixed: true } } };
    const fit = fitHeatCapacity(run, def, { atomsPerFormulaUnit: 2 });
    expect(fit.params[2]).toBe(2);
    expect(fit.parameters[2]).toMatchObject({ name: "nD", fixed: true, stdError: null });
    expect(fit.freeParameterCount).toBe(2);
  });

  it("throws a RangeError with a clear message when there are no more points than free parameters", () => {
    expect(() => fitHeatCapacity(run, debyeDef, { atomsPerFormulaUnit: 2, windowK: [2, 2.2] })).toThrow(
      /3 free parameter\(s\) but only \d unmasked point\(s\) lie in the window 2–2.2 K/,
    );
  });

  it("rejects a fixed parameter without a value, a bad window and wrong-length arrays by name", () => {
    expect(() => fitHeatCapacity(run, { ...debyeDef, parameters: { nD: { fixed: true } } }, { atomsPerFormulaUnit: 2 })).toThrow(
      /nD is fixed but has no value/,
    );
    expect(() => fitHeatCapacity(run, debyeDef, { atomsPerFormulaUnit: 2, windowK: [300, 2] })).toThrow(/opts\.windowK/);
    expect(() =>
      fitHeatCapacity(run, { ...debyeDef, parameters: { thetaD: { value: 500, upper: 400 } } }, { atomsPerFormulaUnit: 2 }),
    ).toThrow(/thetaD: start value 500 lies outside its bounds/);
    expect(() => fitHeatCapacity({ ...run, sigma: run.sigma.slice(1) }, debyeDef, { atomsPerFormulaUnit: 2 })).toThrow(
      /data\.sigma must have length 120/,
    );
    expect(() => fitHeatCapacity({ ...run, masked: [true] }, debyeDef, { atomsPerFormulaUnit: 2 })).toThrow(/data\.masked/);
  });
});

describe("fitHeatCapacity warnings in plain words", () => {
  it("warns when a parameter ends on its bound", () => {
    const run = syntheticRun(debyeDef, 2, [1.2e-3, 320, 2], { points: 120, tMinK: 2, tMaxK: 300 }, 0.005, createSeededRandom(106));
    const def: ModelDefinition = { ...debyeDef, parameters: { thetaD: { upper: 250 } } };
    const fit = fitHeatCapacity(run, def, { atomsPerFormulaUnit: 2 });
    expect(fit.parameters[1].atBound).toBe(true);
    expect(fit.warnings.some((w) => w.startsWith("thetaD ended on its upper bound"))).toBe(true);
  });

  it("warns when reduced χ² is far above 1 (σ stated ten times too small)", () => {
    const run = syntheticRun(debyeDef, 2, [1.2e-3, 320, 2], { points: 120, tMinK: 2, tMaxK: 300 }, 0.005, createSeededRandom(107));
    const fit = fitHeatCapacity({ ...run, sigma: run.sigma.map((s) => s / 10) }, debyeDef, { atomsPerFormulaUnit: 2 });
    expect(fit.reducedChiSquare).toBeGreaterThan(5);
    expect(fit.warnings.some((w) => w.startsWith("Reduced χ² is"))).toBe(true);
  });

  it("warns about strongly correlated parameters (γ and β over a narrow window)", () => {
    const def: ModelDefinition = { components: [{ kind: "electronic" }, { kind: "t3" }] };
    const run = syntheticRun(def, 1, [1e-3, 5e-5], { points: 40, tMinK: 10, tMaxK: 11 }, 0.001, createSeededRandom(108));
    const fit = fitHeatCapacity(run, def, { atomsPerFormulaUnit: 1 });
    expect(Math.abs(fit.correlation![0][1]!)).toBeGreaterThan(0.95);
    expect(fit.warnings.some((w) => w.startsWith("gamma and beta are strongly correlated"))).toBe(true);
  });

  it("warns when free oscillator atoms do not add up to the formula's n", () => {
    const run = syntheticRun(debyeDef, 2, [1.2e-3, 320, 2], { points: 120, tMinK: 2, tMaxK: 300 }, 0.005, createSeededRandom(109));
    const fit = fitHeatCapacity(run, debyeDef, { atomsPerFormulaUnit: 5 });
    expect(fit.warnings.some((w) => w.includes("oscillator atoms add up to"))).toBe(true);
  });
});
