import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import {
  debyeFunction,
  debyeFunctionDerivative,
  debyeLowTLimit,
  debyeValueAndSlope,
  evaluate,
  jacobian,
  params,
  type DebyeDimension,
} from "@shared/physics/debye";
import { GAS_CONSTANT } from "@shared/physics/constants";
import { einsteinFunction } from "@shared/physics/einstein";
import { expectClose } from "../../helpers/expect-close";

type Row = { x: number } & Record<string, number>;
const fixture = JSON.parse(
  readFileSync(new URL("../../../fixtures/physics/debye/data.json", import.meta.url), "utf8"),
) as { data: Row[] };
const DIMENSIONS: DebyeDimension[] = [1, 2, 3];

describe("debyeFunction: published values", () => {
  it("gives C_V/3R = 0.952 at θ_D/T = 1 (Debye-function tables, from memory)", () => {
    expectClose(debyeFunction(1), 0.952, { rel: 6e-4 }); // the table value has 3 digits
  });

  it("gives the T³-law coefficient 12π⁴/5 = 233.78 (Kittel, Introduction to Solid State Physics, 8th ed., ch. 5, T³ law '≈ 234 N k_B (T/θ)³', from memory)", () => {
    const x = 1e3;
    // C/(nR) at T/θ = 1e-3 divided by (T/θ)³: 3·D_3(x)·x³
    expectClose(3 * debyeFunction(x) * x ** 3, 233.78, { rel: 5e-5 }); // 233.78 is given to 5 digits
    expectClose(debyeLowTLimit(1, 1, 1) / GAS_CONSTANT, 233.78, { rel: 5e-5 });
  });
});

describe("debyeFunction against mpmath 1.3.0 (fixtures/physics/debye)", () => {
  const regions: [string, number, number][] = [
    ["1e-4 ≤ x < 1e-2", 0, 1e-2],
    ["1e-2 ≤ x < 1", 1e-2, 1],
    ["1 ≤ x ≤ 4 (top of the Chebyshev branch)", 1, 4.000000000000001],
    ["4 < x < 10 (large-x form, many tail terms)", 4.000000000000001, 10],
    ["10 ≤ x < 100", 10, 100],
    ["100 ≤ x ≤ 1e3", 100, 1001],
  ];
  for (const d of DIMENSIONS) {
    for (const [name, lo, hi] of regions) {
      it(`matches D_${d}(x) and D_${d}'(x) to rel 1e-15 for ${name}`, () => {
        const rows = fixture.data.filter((r) => r.x >= lo && r.x < hi);
        expect(rows.length).toBeGreaterThan(5);
        for (const r of rows) {
          expectClose(debyeFunction(r.x, d), r[`d${d}`], { rel: 1e-15 }, `D_${d}(${r.x})`);
          expectClose(debyeFunctionDerivative(r.x, d), r[`derivative_d${d}`], { rel: 1e-15 }, `D_${d}'(${r.x})`);
        }
      });
    }
  }
});

describe("debyeFunction identities", () => {
  // ∫₀^∞ t^{d+1} eᵗ/(eᵗ−1)² dt = Γ(d+2) ζ(d+1); Γ(3) = 2, Γ(4) = 6, Γ(5) = 24;
  // ζ(2) = π²/6, ζ(3) = 1.2020569031595942 (Apéry's constant, OEIS A002117), ζ(4) = π⁴/90.
  const limits: [DebyeDimension, number][] = [
    [1, 2 * (Math.PI ** 2 / 6)],
    [2, 6 * 1.2020569031595942],
    [3, 24 * (Math.PI ** 4 / 90)],
  ];
  for (const [d, full] of limits) {
    it(`reaches the large-x limit d·Γ(d+2)ζ(d+1)/x^d for d = ${d}`, () => {
      for (const x of [60, 200, 1000, 1e5]) {
        expectClose(debyeFunction(x, d), (d * full) / x ** d, { rel: 2e-15 }, `x=${x}`); // π powers round twice
      }
    });
  }

  it("is the T³ law (12π⁴/5) n R (T/θ)³ at low T for d = 3", () => {
    const thetaD = 343;
    for (const t of [0.05, 0.5, 2]) {
      expectClose(evaluate([thetaD, 1], t), debyeLowTLimit(t, thetaD, 1), { rel: 1e-14 });
      expectClose(debyeLowTLimit(t, thetaD, 1), ((12 * Math.PI ** 4) / 5) * GAS_CONSTANT * (t / thetaD) ** 3, {
        rel: 1e-15,
      });
    }
  });

  it("tends to 1 at high T with first correction −x²/20 and then +x⁴/560 (d = 3; Bernoulli series, B_2 = 1/6, B_4 = −1/30)", () => {
    for (const x of [1e-3, 1e-2, 0.1]) {
      expectClose(debyeFunction(x), 1 - (x * x) / 20 + x ** 4 / 560, { rel: 1e-15 + x ** 6 / 1e4 });
    }
    const x = 1e-2;
    // (1 − D)/x² → 1/20 − x²/560: 1 − D ≈ 5e-6 keeps only ~11 digits (cancellation), and the omitted x⁴ term is 1e-11.
    expectClose((1 - debyeFunction(x)) / (x * x), 1 / 20 - (x * x) / 560, { rel: 1e-9 });
  });

  it("obeys D_d'(x) = (d/x)(E(x) − D_d(x)) where the derivative comes from its own Chebyshev series (x ≤ 4)", () => {
    for (const d of DIMENSIONS) {
      for (const x of [0.8, 1.5, 2.5, 3.9]) {
        // The right side cancels by up to a factor ~30 near x = 0.8 (E − D ≈ −x²/18 for d = 1): allow 5e-14.
        expectClose(debyeFunctionDerivative(x, d), (d / x) * (einsteinFunction(x) - debyeFunction(x, d)), {
          rel: 5e-14,
        });
      }
    }
  });

  it("has a derivative that matches central finite differences, including across the x = 4 branch point", () => {
    for (const d of DIMENSIONS) {
      for (const x of [0.3, 2, 3.99999, 4.00001, 12, 80]) {
        const h = 1e-5 * x;
        const fd = (debyeFunction(x + h, d) - debyeFunction(x - h, d)) / (2 * h);
        expectClose(debyeFunctionDerivative(x, d), fd, { rel: 1e-8 }); // FD truncation ~h², rounding ~1e-16/h
      }
    }
  });

  it("is continuous across the x = 4 branch point and decreases monotonically", () => {
    for (const d of DIMENSIONS) {
      const below = debyeFunction(4, d);
      const above = debyeFunction(4.000000000000001, d);
      expectClose(above, below, { rel: 1e-15 });
      let prev = 1;
      for (let i = 0; i <= 400; i++) {
        const v = debyeFunction(10 ** (-4 + (7 * i) / 400), d);
        expect(v).toBeLessThanOrEqual(prev);
        prev = v;
      }
    }
  });
});

describe("debyeFunction special values", () => {
  it("returns NaN for NaN, negative x and dimensions other than 1, 2, 3", () => {
    for (const d of DIMENSIONS) {
      expect(debyeFunction(Number.NaN, d)).toBeNaN();
      expect(debyeFunction(-1e-3, d)).toBeNaN();
      expect(debyeFunction(Number.NEGATIVE_INFINITY, d)).toBeNaN();
      expect(debyeFunctionDerivative(Number.NaN, d)).toBeNaN();
      expect(debyeFunctionDerivative(-3, d)).toBeNaN();
    }
    expect(debyeFunction(1, 4 as DebyeDimension)).toBeNaN();
    expect(debyeFunction(1, 0 as DebyeDimension)).toBeNaN();
    expect(debyeFunctionDerivative(1, 2.5 as DebyeDimension)).toBeNaN();
    expect(debyeLowTLimit(1, 100, 1, 4 as DebyeDimension)).toBeNaN();
  });

  it("is 1 at x = 0 (the T → ∞ limit) with zero slope, and 0 at +Infinity", () => {
    for (const d of DIMENSIONS) {
      expect(debyeFunction(0, d)).toBe(1);
      expect(debyeFunctionDerivative(0, d)).toBe(0);
      expect(debyeFunction(Number.POSITIVE_INFINITY, d)).toBe(0);
      expect(debyeFunctionDerivative(Number.POSITIVE_INFINITY, d)).toBe(0);
    }
  });

  it("stays finite and non-negative from x = 1e-300 to 1e300, with no overflow in x^d", () => {
    for (const d of DIMENSIONS) {
      for (let e = -300; e <= 300; e += 7) {
        const v = debyeFunction(10 ** e, d);
        expect(Number.isFinite(v) && v >= 0 && v <= 1).toBe(true);
        expect(Number.isNaN(debyeFunctionDerivative(10 ** e, d))).toBe(false);
      }
    }
    // 3·Γ(5)ζ(4)/x³ at x = 1e102 is 7.79e-305, still a normal double although x³ overflows.
    expectClose(debyeFunction(1e102, 3), (3 * 24 * (Math.PI ** 4 / 90)) / 1e306, { rel: 1e-14 });
  });
});

describe("debyeValueAndSlope", () => {
  it("returns exactly debyeFunction and debyeFunctionDerivative, on both branches and at the special values", () => {
    for (const d of DIMENSIONS) {
      for (const x of [0, 1e-3, 2, 4, 4.5, 30, 800, Number.POSITIVE_INFINITY]) {
        expect(debyeValueAndSlope(x, d)).toEqual([debyeFunction(x, d), debyeFunctionDerivative(x, d)]);
      }
      expect(debyeValueAndSlope(-1, d).every(Number.isNaN)).toBe(true);
    }
  });
});

describe("Debye component", () => {
  it("names its parameters thetaD (K) and nD", () => {
    expect(params.map((p) => p.name)).toEqual(["thetaD", "nD"]);
    expect(params[0].unit).toBe("K");
    expect(params[1].unit).toBe("1");
  });

  it("tends to the Dulong–Petit value 3 n_D R at high T for every dimension", () => {
    for (const d of DIMENSIONS) expectClose(evaluate([300, 2], 1e8, d), 6 * GAS_CONSTANT, { rel: 1e-12 });
  });

  it("has an analytic jacobian that matches central finite differences", () => {
    const p = [250, 1.7];
    for (const d of DIMENSIONS) {
      for (const t of [1.5, 20, 62.4, 300]) {
        const j = jacobian(p, t, d);
        for (let i = 0; i < 2; i++) {
          const h = 1e-6 * p[i];
          const up = [...p];
          const dn = [...p];
          up[i] += h;
          dn[i] -= h;
          const fd = (evaluate(up, t, d) - evaluate(dn, t, d)) / (2 * h);
          expectClose(j[i], fd, { rel: 1e-7 }, `d=${d} ∂/∂${params[i].name} at ${t} K`); // FD error
        }
      }
    }
  });
});
