import { describe, expect, it } from "vitest";
import { betaFromThetaD, thetaDCurve, thetaDFromBeta, thetaDFromPoint } from "@shared/physics/theta-d";
import * as debye from "@shared/physics/debye";
import { GAS_CONSTANT } from "@shared/physics/constants";
import { expectClose } from "../../helpers/expect-close";

const R = GAS_CONSTANT;

describe("thetaDFromBeta: textbook elements", () => {
  it("gives θ_D = 91 K for potassium from C/T = 2.08 + 2.57 T² mJ/(mol·K²) (Kittel, ISSP 8th ed.: ch. 6 figure of potassium C/T against T², and ch. 5 Table 1 θ_D = 91 K; from memory)", () => {
    expectClose(thetaDFromBeta(2.57e-3, 1), 91, { rel: 6e-3 }); // the table rounds θ_D to 1 K
  });

  it("scales as n^{1/3} with atoms per formula unit (definition θ_D³ ∝ n/β)", () => {
    expectClose(thetaDFromBeta(1e-4, 8), 2 * thetaDFromBeta(1e-4, 1), { rel: 1e-15 });
  });

  it("inverts betaFromThetaD, and β·θ³ = (12π⁴/5)R = 233.78 R (T³ law, Kittel ISSP 8th ed. ch. 5, from memory)", () => {
    expectClose(betaFromThetaD(1, 1) / R, 233.78, { rel: 5e-5 }); // 233.78 has 5 digits
    for (const t of [91, 343, 2230]) expectClose(thetaDFromBeta(betaFromThetaD(t, 3), 3), t, { rel: 1e-15 });
  });

  it("returns NaN for β ≤ 0 or n ≤ 0", () => {
    expect(thetaDFromBeta(0, 1)).toBeNaN();
    expect(thetaDFromBeta(-1e-4, 1)).toBeNaN();
    expect(thetaDFromBeta(1e-4, 0)).toBeNaN();
    expect(betaFromThetaD(0, 1)).toBeNaN();
  });
});

describe("thetaDFromPoint", () => {
  it("recovers θ_D of generated Debye data (d = 1, 2, 3) for T from θ/1000 to 2θ", () => {
    for (const d of [1, 2, 3] as const) {
      for (const thetaD of [40, 343, 1860]) {
        for (let e = -3; e <= 0.3; e += 0.1) {
          const t = thetaD * 10 ** e;
          const r = thetaDFromPoint(debye.evaluate([thetaD, 2], t, d), t, 2, d);
          expect(r.thetaD).not.toBeNull();
          // rel 1e-12: at T = 2θ, 1 − D ≈ 1/80 and the inversion amplifies the rounding of C by ~40.
          expectClose(r.thetaD as number, thetaD, { rel: 1e-12 }, `d=${d} θ=${thetaD} T=${t}`);
        }
      }
    }
  });

  it("matches the T³ law in the T³ region: C = βT³ at T = θ/500 gives θ_D from β", () => {
    const beta = betaFromThetaD(300, 1);
    const t = 0.6;
    const r = thetaDFromPoint(beta * t ** 3, t, 1);
    expectClose(r.thetaD as number, 300, { rel: 1e-12 }); // D_3 equals the T³ law to ~e^{-500} there
  });

  it("says there is no solution for C ≥ 3nR (above-limit) and C ≤ 0 (not-positive)", () => {
    expect(thetaDFromPoint(3 * R * 1.0001, 300, 1)).toEqual({ thetaD: null, reason: "above-limit" });
    expect(thetaDFromPoint(3 * R, 300, 1)).toEqual({ thetaD: null, reason: "above-limit" });
    expect(thetaDFromPoint(Number.POSITIVE_INFINITY, 300, 1)).toEqual({ thetaD: null, reason: "above-limit" });
    expect(thetaDFromPoint(0, 10, 1)).toEqual({ thetaD: null, reason: "not-positive" });
    expect(thetaDFromPoint(-1e-3, 10, 1)).toEqual({ thetaD: null, reason: "not-positive" });
  });

  it("throws RangeError on NaN heat capacity, non-positive T or n, and other dimensions", () => {
    expect(() => thetaDFromPoint(Number.NaN, 10, 1)).toThrow(RangeError);
    expect(() => thetaDFromPoint(1, 0, 1)).toThrow(RangeError);
    expect(() => thetaDFromPoint(1, 10, 0)).toThrow(RangeError);
    expect(() => thetaDFromPoint(1, Number.POSITIVE_INFINITY, 1)).toThrow(RangeError);
    expect(() => thetaDFromPoint(1, 10, 1, 4 as never)).toThrow(RangeError);
  });
});

describe("thetaDCurve", () => {
  it("is flat at θ_D for generated γT + Debye data after subtracting γT (synthetic run)", () => {
    const gamma = 1.3e-3;
    const thetaD = 265;
    const n = 3;
    const ts = Array.from({ length: 60 }, (_, i) => 2 + i * 5);
    const cs = ts.map((t) => gamma * t + debye.evaluate([thetaD, n], t));
    const curve = thetaDCurve(ts, cs, { gamma, atomsN: n });
    expect(curve).toHaveLength(60);
    for (const [i, p] of curve.entries()) {
      expect(p.temperatureK).toBe(ts[i]);
      expect(p.thetaD).not.toBeNull();
      expectClose(p.thetaD as number, thetaD, { rel: 1e-11 }, `T=${p.temperatureK}`); // C − γT loses ~1 digit at 2 K
    }
  });

  it("marks points whose lattice part is not positive or above 3nR, and keeps the others", () => {
    const curve = thetaDCurve([2, 10, 300], [2e-3, 0.05, 30], { gamma: 1e-3, atomsN: 1 });
    expect(curve[0]).toMatchObject({ temperatureK: 2, thetaD: null, reason: "not-positive" });
    expect(curve[1].thetaD).not.toBeNull();
    expect(curve[2]).toMatchObject({ thetaD: null, reason: "above-limit" });
  });

  it("throws RangeError on different lengths and names the point it refuses", () => {
    expect(() => thetaDCurve([1, 2], [1], { atomsN: 1 })).toThrow(RangeError);
    expect(() => thetaDCurve([1, -2], [1e-3, 1e-3], { atomsN: 1 })).toThrow(/point 1/);
  });
});
