import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import {
  einsteinFunction,
  einsteinFunctionDerivative,
  einsteinValueAndSlope,
  evaluate,
  jacobian,
  params,
} from "@shared/physics/einstein";
import { GAS_CONSTANT } from "@shared/physics/constants";
import { expectClose } from "../../helpers/expect-close";

interface Row {
  x: number;
  value: number;
  derivative: number;
}
const fixture = JSON.parse(
  readFileSync(new URL("../../../fixtures/physics/einstein/data.json", import.meta.url), "utf8"),
) as { data: Row[] };

describe("einsteinFunction: published coefficients", () => {
  // E(x) = 1 − Σ_k (2k−1) B_2k x^{2k}/(2k)! = 1 − x²/12 + x⁴/240 − …, with the Bernoulli numbers
  // B_2 = 1/6, B_4 = −1/30 (Abramowitz & Stegun, Table 23.2).
  it("follows 1 − x²/12 + x⁴/240 at small x (A&S Table 23.2 Bernoulli numbers)", () => {
    for (const x of [1e-3, 1e-2, 0.05]) {
      expectClose(einsteinFunction(x), 1 - (x * x) / 12 + (x ** 4) / 240, { rel: 1e-15 + x ** 6 / 6000 });
    }
  });
});

describe("einsteinFunction against mpmath 1.3.0 (fixtures/physics/einstein)", () => {
  const regions: [string, number, number][] = [
    ["x < 1e-2", 0, 1e-2],
    ["1e-2 ≤ x < 1", 1e-2, 1],
    ["1 ≤ x < 10", 1, 10],
    ["10 ≤ x < 100", 10, 100],
    ["100 ≤ x ≤ 700", 100, 700.0000000000001],
  ];
  for (const [name, lo, hi] of regions) {
    it(`matches E(x) and E'(x) to rel 1e-15 for ${name}`, () => {
      const rows = fixture.data.filter((r) => r.x >= lo && r.x < hi);
      expect(rows.length).toBeGreaterThan(5);
      for (const r of rows) {
        expectClose(einsteinFunction(r.x), r.value, { rel: 1e-15 }, `E(${r.x})`);
        expectClose(einsteinFunctionDerivative(r.x), r.derivative, { rel: 1e-15 }, `E'(${r.x})`);
      }
    });
  }

  it("is finite and non-negative up to x = 1e3, and 0 where the true value underflows", () => {
    for (const r of fixture.data.filter((row) => row.x > 700)) {
      const v = einsteinFunction(r.x);
      expect(Number.isFinite(v) && v >= 0).toBe(true);
      if (r.value === 0) expectClose(v, 0, { abs: 1e-300 });
      else expectClose(v, r.value, { rel: 1e-15 }, `E(${r.x})`);
    }
  });
});

describe("einsteinFunction identities", () => {
  it("equals 2(ln 2)² at x = ln 2 and (3/4)(ln 3)² at x = ln 3 (closed form with eˣ = 2, 3)", () => {
    // rel 1e-15, not 1 ulp: ln 2 and ln 3 are rounded to doubles, so eˣ is 2 and 3 only to about 1e-16.
    expectClose(einsteinFunction(Math.LN2), 2 * Math.LN2 * Math.LN2, { rel: 1e-15 });
    const l3 = Math.log(3);
    expectClose(einsteinFunction(l3), 0.75 * l3 * l3, { rel: 1e-15 });
  });

  it("equals (x/2)²/sinh²(x/2) (the same function written with sinh)", () => {
    for (const x of [0.3, 1.7, 6, 40, 300]) {
      const s = x / 2 / Math.sinh(x / 2);
      expectClose(einsteinFunction(x), s * s, { rel: 1e-15 });
    }
  });

  it("has a derivative that matches central finite differences", () => {
    for (const x of [0.2, 0.999, 1.001, 3, 25]) {
      const h = 1e-5 * x;
      const fd = (einsteinFunction(x + h) - einsteinFunction(x - h)) / (2 * h);
      expectClose(einsteinFunctionDerivative(x), fd, { rel: 1e-8 }); // FD truncation ~h², rounding ~1e-16/h
    }
  });
});

describe("einsteinFunction special values", () => {
  it("returns NaN for NaN and negative x, 1 at x = 0 (T → ∞ limit), 0 at +Infinity", () => {
    expect(einsteinFunction(Number.NaN)).toBeNaN();
    expect(einsteinFunction(-1)).toBeNaN();
    expect(einsteinFunction(Number.NEGATIVE_INFINITY)).toBeNaN();
    expect(einsteinFunction(0)).toBe(1);
    expect(einsteinFunction(Number.POSITIVE_INFINITY)).toBe(0);
    expect(einsteinFunctionDerivative(Number.NaN)).toBeNaN();
    expect(einsteinFunctionDerivative(-2)).toBeNaN();
    expect(einsteinFunctionDerivative(0)).toBe(0);
    expect(einsteinFunctionDerivative(Number.POSITIVE_INFINITY)).toBe(0);
  });

  it("stays finite without NaN from x = 1e-300 to 1e300", () => {
    for (let e = -300; e <= 300; e += 7) {
      const x = 10 ** e;
      expect(Number.isNaN(einsteinFunction(x))).toBe(false);
      expect(Number.isNaN(einsteinFunctionDerivative(x))).toBe(false);
    }
    expect(einsteinFunction(1e-300)).toBe(1);
    expect(einsteinFunction(1e300)).toBe(0);
  });
});

describe("einsteinValueAndSlope", () => {
  it("returns exactly einsteinFunction and einsteinFunctionDerivative, including special values", () => {
    for (const x of [0, 1e-4, 0.999, 1, 7, 650, 2000, Number.POSITIVE_INFINITY]) {
      expect(einsteinValueAndSlope(x)).toEqual([einsteinFunction(x), einsteinFunctionDerivative(x)]);
    }
    expect(einsteinValueAndSlope(Number.NaN).every(Number.isNaN)).toBe(true);
  });
});

describe("Einstein component", () => {
  it("names its parameters thetaE (K) and nE", () => {
    expect(params.map((p) => p.name)).toEqual(["thetaE", "nE"]);
    expect(params[0].unit).toBe("K");
  });

  it("tends to 3 n_E R at high T (Dulong–Petit)", () => {
    expectClose(evaluate([100, 2], 1e7), 6 * GAS_CONSTANT, { rel: 1e-10 });
  });

  it("has an analytic jacobian that matches central finite differences", () => {
    const p = [180, 1.5];
    for (const t of [2, 20, 90, 400]) {
      const j = jacobian(p, t);
      for (let i = 0; i < 2; i++) {
        const h = 1e-6 * p[i];
        const up = [...p];
        const dn = [...p];
        up[i] += h;
        dn[i] -= h;
        const fd = (evaluate(up, t) - evaluate(dn, t)) / (2 * h);
        expectClose(j[i], fd, { rel: 1e-7, abs: 1e-280 }, `∂/∂${params[i].name} at ${t} K`); // FD error
      }
    }
  });
});
