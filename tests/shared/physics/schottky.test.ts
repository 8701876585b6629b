import { describe, expect, it } from "vitest";
import { evaluate, jacobian, params } from "@shared/physics/schottky";
import { GAS_CONSTANT } from "@shared/physics/constants";
import { expectClose } from "../../helpers/expect-close";
import { checkJacobian } from "./jacobian-check";

const R = GAS_CONSTANT;

/** ∫ f(T) dT over [a, b] by composite Simpson in ln T (integrand f(T)·T), n even. */
function integrateLog(f: (t: number) => number, a: number, b: number, n = 4000): number {
  const la = Math.log(a);
  const h = (Math.log(b) - la) / n;
  let s = 0;
  for (let i = 0; i <= n; i++) {
    const t = Math.exp(la + i * h);
    const w = i === 0 || i === n ? 1 : i % 2 === 1 ? 4 : 2;
    s += w * f(t) * t;
  }
  return (s * h) / 3;
}

describe("two-level Schottky anomaly: published values", () => {
  it("peaks at C ≈ 0.439 R near T ≈ 0.417 Δ for equal degeneracies (Gopal, Specific Heats at Low Temperatures, 1966, from memory)", () => {
    const gap = 10;
    let best = 0;
    let bestT = 0;
    for (let t = 3; t <= 6; t += 1e-4) {
      const c = evaluate([gap, 1, 1], t);
      if (c > best) {
        best = c;
        bestT = t;
      }
    }
    expectClose(best / R, 0.439, { rel: 1.2e-3 }); // the quoted peak has 3 digits
    expectClose(bestT / gap, 0.417, { rel: 1.2e-3 }); // likewise
  });
});

describe("two-level Schottky anomaly: identities", () => {
  it("carries the entropy R ln(1 + g₁/g₀) per centre (∫C/T dT from 0 to ∞; Boltzmann's S = R ln of the level count)", () => {
    for (const g of [1, 1 / 3, 2]) {
      const s = integrateLog((t) => evaluate([20, 1, g], t) / t, 0.05, 1e5);
      expectClose(s, R * Math.log(1 + 1 / g), { rel: 1e-7 }); // Simpson on 4000 log steps; tails below 1e-9
    }
  });

  it("is symmetric under w → 1/w: g and e^{−2Δ/T}/g give the same value", () => {
    const t = 7;
    const gap = 12;
    const g = 0.4;
    expectClose(evaluate([gap, 1, g], t), evaluate([gap, 1, Math.exp((-2 * gap) / t) / g], t), { rel: 1e-13 });
  });

  it("scales linearly with n_S", () => {
    expectClose(evaluate([15, 2.5, 3], 6), 2.5 * evaluate([15, 1, 3], 6), { rel: 1e-15 });
  });
});

describe("two-level Schottky anomaly: special values", () => {
  it("does not overflow: Δ/T up to 1e300 and g up to 1e300 give finite values, 0 where exponentially small", () => {
    expect(evaluate([1e5, 1, 1], 1e-3)).toBe(0);
    expect(evaluate([1e5, 1, 1], 1e-300)).toBe(0);
    expect(jacobian([1e5, 1, 1], 1e-300)).toEqual([0, 0, 0]);
    for (const g of [1e-300, 1e-20, 1e20, 1e300]) {
      for (const t of [0.01, 1, 100]) {
        const v = evaluate([50, 1, g], t);
        expect(Number.isFinite(v) && v >= 0).toBe(true);
        expect(jacobian([50, 1, g], t).every(Number.isFinite)).toBe(true);
      }
    }
  });

  it("vanishes at Δ = 0 and at high T (C ~ n_S R g (Δ/T)²/(1+g)²)", () => {
    expect(evaluate([0, 1, 2], 5)).toBe(0);
    const t = 1e4;
    expectClose(evaluate([3, 1, 2], t), (R * 2 * (3 / t) ** 2) / 9, { rel: 1e-3 }); // next order is Δ/T
  });

  it("declares gap in K, nS and gRatio dimensionless", () => {
    expect(params.map((p) => [p.name, p.unit])).toEqual([
      ["gap", "K"],
      ["nS", "1"],
      ["gRatio", "1"],
    ]);
  });
});

describe("two-level Schottky anomaly: jacobian", () => {
  it("matches central finite differences on both sides of the peak and for g above and below 1", () => {
    for (const g of [0.2, 1, 3]) {
      checkJacobian(evaluate, jacobian, [8, 0.05, g], [0.5, 2, 3.3, 10, 60], ["gap", "nS", "gRatio"], 1e-20);
    }
  });
});
