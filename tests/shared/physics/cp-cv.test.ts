import { describe, expect, it } from "vitest";
import { cpMinusCvDilation, cpMinusCvNernstLindemann, nernstLindemannConstant } from "@shared/physics/cp-cv";
import { expectClose } from "../../helpers/expect-close";

// Copper near room temperature, all from memory: linear expansivity 16.5e-6 /K (CRC Handbook), so
// α_V = 3 × 16.5e-6 /K; bulk modulus 1.37e11 Pa (Kittel ISSP 8th ed., Table 3.3); molar volume
// 63.546 g/mol ÷ 8.96 g/cm³ = 7.092e-6 m³/mol (CRC density); Cp(298.15 K) = 24.44 J/(mol·K) (CODATA key values).
const alphaV = 3 * 16.5e-6;
const bulk = 1.37e11;
const vm = 63.546e-3 / 8.96e3;

describe("cpMinusCvDilation", () => {
  it("is α_V² B V_m T (definition, hand-worked: Cu at 298.15 K gives 0.710 J/(mol·K))", () => {
    expectClose(cpMinusCvDilation(alphaV, bulk, vm, 298.15), 0.70985, { rel: 1e-4 }); // hand value to 5 digits
  });

  it("is a few percent of Cp for a metal at room temperature (Cu: 2.9%; common practice, no source)", () => {
    const ratio = cpMinusCvDilation(alphaV, bulk, vm, 298.15) / 24.44;
    expect(ratio).toBeGreaterThan(0.02);
    expect(ratio).toBeLessThan(0.04);
  });

  it("returns NaN for negative or non-finite B, V_m or T", () => {
    expect(cpMinusCvDilation(alphaV, -1, vm, 300)).toBeNaN();
    expect(cpMinusCvDilation(alphaV, bulk, -vm, 300)).toBeNaN();
    expect(cpMinusCvDilation(alphaV, bulk, vm, -1)).toBeNaN();
    expect(cpMinusCvDilation(Number.NaN, bulk, vm, 300)).toBeNaN();
    expect(cpMinusCvDilation(alphaV, Number.POSITIVE_INFINITY, vm, 300)).toBeNaN();
  });
});

describe("Nernst–Lindemann form", () => {
  it("agrees with the dilation form at the reference state its constant came from", () => {
    const a = nernstLindemannConstant(alphaV, bulk, vm, 24.44);
    expectClose(cpMinusCvNernstLindemann(a, 24.44, 298.15), cpMinusCvDilation(alphaV, bulk, vm, 298.15), { rel: 1e-15 });
  });

  it("is A Cp² T (definition)", () => {
    expectClose(cpMinusCvNernstLindemann(2e-5, 20, 150), 2e-5 * 400 * 150, { rel: 1e-15 });
  });

  it("returns NaN for invalid inputs", () => {
    expect(nernstLindemannConstant(alphaV, bulk, vm, 0)).toBeNaN();
    expect(cpMinusCvNernstLindemann(2e-5, 20, -1)).toBeNaN();
    expect(cpMinusCvNernstLindemann(Number.NaN, 20, 10)).toBeNaN();
  });
});
