import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { DEFAULT_TABLE_TEMPERATURES, lowTIntegrals, thermoFunctions, thermoTable } from "@shared/physics/thermo";
import { GAS_CONSTANT } from "@shared/physics/constants";
import { einsteinFunction } from "@shared/physics/einstein";
import { debyeLowTLimit } from "@shared/physics/debye";
import { expectClose } from "../../helpers/expect-close";

const R = GAS_CONSTANT;

describe("lowTIntegrals", () => {
  it("integrates γT + βT³ + δT⁵ in closed form: S = γT + βT³/3 + δT⁵/5, H = γT²/2 + βT⁴/4 + δT⁶/6", () => {
    const m = { gamma: 1.2e-3, beta: 3e-5, delta: -2e-9 };
    const t = 4;
    const r = lowTIntegrals(m, t);
    expectClose(r.S, 1.2e-3 * 4 + (3e-5 * 64) / 3 - (2e-9 * 1024) / 5, { rel: 1e-15 });
    expectClose(r.H, (1.2e-3 * 16) / 2 + (3e-5 * 256) / 4 - (2e-9 * 4096) / 6, { rel: 1e-15 });
  });

  it("gives the same numbers when the same polynomial is passed as a function (numerical branch)", () => {
    const m = { gamma: 1.2e-3, beta: 3e-5, delta: 2e-9 };
    const f = (t: number) => m.gamma * t + m.beta * t ** 3 + m.delta * t ** 5;
    for (const t of [0.5, 3, 12]) {
      const a = lowTIntegrals(m, t);
      const b = lowTIntegrals(f, t);
      expectClose(b.S, a.S, { rel: 1e-14 });
      expectClose(b.H, a.H, { rel: 1e-14 });
    }
  });

  it("integrates an Einstein solid to its closed-form entropy and energy (S/3R = x/(eˣ−1) − ln(1 − e^{−x}), H/3R = θ/(eˣ−1); Kittel ISSP ch. 5)", () => {
    const theta = 40;
    const c = (t: number) => 3 * R * einsteinFunction(theta / t);
    for (const t of [5, 20, 60]) {
      const x = theta / t;
      const r = lowTIntegrals(c, t);
      expectClose(r.S, 3 * R * (x / Math.expm1(x) - Math.log(-Math.expm1(-x))), { rel: 1e-13 });
      expectClose(r.H, (3 * R * theta) / Math.expm1(x), { rel: 1e-13 });
    }
  });

  it("refuses a model whose C/T diverges at 0 K (nuclear A/T² tail) and negative temperatures", () => {
    expect(() => lowTIntegrals((t) => 1e-4 / (t * t), 2)).toThrow(RangeError);
    expect(() => lowTIntegrals((t) => 1e-3, 2)).toThrow(RangeError);
    expect(() => lowTIntegrals({ gamma: 1, beta: 0 }, -1)).toThrow(RangeError);
    expect(lowTIntegrals({ gamma: 1, beta: 1 }, 0)).toEqual({ S: 0, H: 0 });
  });
});

describe("thermoFunctions on data", () => {
  it("integrates piecewise-linear data exactly, near T = 0 (log branch) and far from it (Gauss–Legendre branch)", () => {
    // Two points make the monotone interpolant a straight line C = a + bT: ΔS = a ln(T/T₀) + b (T − T₀).
    const a = 0.7;
    const b = 0.03;
    for (const [t0, t1] of [
      [0.5, 10],
      [5, 6],
    ]) {
      const f = thermoFunctions([t0, t1], [a + b * t0, a + b * t1], { gamma: 0, beta: 0 });
      for (const t of [t0 + 0.3 * (t1 - t0), t1]) {
        expectClose(f(t).S - f(t0).S, a * Math.log(t / t0) + b * (t - t0), { rel: 1e-14 });
        expectClose(f(t).H - f(t0).H, a * (t - t0) + (b * (t * t - t0 * t0)) / 2, { rel: 1e-14 });
      }
    }
  });

  it("converges to the closed form of γT + βT³ sampled at 2000 points from 2 to 300 K", () => {
    const g = 1e-3;
    const beta = 2e-5;
    const ts = Array.from({ length: 2000 }, (_, i) => 2 * 150 ** (i / 1999));
    const cs = ts.map((t) => g * t + beta * t ** 3);
    const [r100, r300] = thermoTable(ts, cs, { gamma: g, beta }, [100, 300]);
    // rel 1e-10: the monotone interpolant's slopes are not the exact derivative, an O(h⁴) error in the integrals.
    expectClose(r100.S, g * 100 + (beta * 1e6) / 3, { rel: 1e-10 });
    expectClose(r300.S, g * 300 + (beta * 300 ** 3) / 3, { rel: 1e-10 });
    expectClose(r300.H, (g * 300 ** 2) / 2 + (beta * 300 ** 4) / 4, { rel: 1e-10 });
  });

  it("reproduces the Einstein-solid entropy from sampled data with the Einstein model below the first point", () => {
    const theta = 150;
    const c = (t: number) => 3 * R * einsteinFunction(theta / t);
    const ts = Array.from({ length: 1000 }, (_, i) => 2 * 150 ** (i / 999));
    const row = thermoTable(ts, ts.map(c), c, [298.15])[0];
    const x = theta / 298.15;
    expectClose(row.S, 3 * R * (x / Math.expm1(x) - Math.log(-Math.expm1(-x))), { rel: 1e-9 }); // O(h⁴), as above
    expectClose(row.H, (3 * R * theta) / Math.expm1(x), { rel: 1e-9 });
  });

  it("uses only the low-T model below the first point and refuses temperatures above the data", () => {
    const f = thermoFunctions([2, 3, 4], [1e-3, 2e-3, 4e-3], { gamma: 5e-4, beta: 0 });
    expectClose(f(1).S, 5e-4, { rel: 1e-15 });
    expect(f(0)).toEqual({ S: 0, H: 0 });
    expect(() => f(4.0001)).toThrow(RangeError);
    expect(() => f(-1)).toThrow(RangeError);
  });

  it("refuses bad input with a RangeError", () => {
    const low = { gamma: 0, beta: 1e-5 };
    expect(() => thermoFunctions([1, 2], [1], low)).toThrow(RangeError);
    expect(() => thermoFunctions([1], [1], low)).toThrow(RangeError);
    expect(() => thermoFunctions([2, 1], [1, 1], low)).toThrow(RangeError);
    expect(() => thermoFunctions([0, 1], [0, 1], low)).toThrow(/> 0 K/);
    expect(() => thermoFunctions([1, 2], [1, Number.NaN], low)).toThrow(/heat capacity 1/);
  });
});

describe("thermoTable", () => {
  it("defaults to the round temperatures inside the data range, including 298.15 K", () => {
    const ts = [1.8, 50, 150, 305];
    const rows = thermoTable(ts, [1e-3, 5, 15, 24], { gamma: 6e-4, beta: 0 });
    const expected = DEFAULT_TABLE_TEMPERATURES.filter((t) => t >= 1.8 && t <= 305);
    expect(rows.map((r) => r.T)).toEqual(expected);
    expect(expected).toContain(298.15);
    expect(expected[0]).toBe(2);
    for (let i = 1; i < rows.length; i++) {
      expect(rows[i].S).toBeGreaterThan(rows[i - 1].S);
      expect(rows[i].H).toBeGreaterThan(rows[i - 1].H);
    }
  });

  it("names the entry of `at` that lies above the data", () => {
    expect(() => thermoTable([2, 10], [1, 2], { gamma: 0.5, beta: 0 }, [5, 11])).toThrow(/at\[1\]/);
  });
});

describe("copper: S and H − H(0) at 298.15 K from a published Cp curve", () => {
  const fixture = JSON.parse(
    readFileSync(new URL("../../../fixtures/physics/copper/data.json", import.meta.url), "utf8"),
  ) as {
    data: {
      specificHeatFit: { log10Coefficients: number[] };
      molarMassGPerMol: number;
      codataKeyValues: { entropy: { value: number }; enthalpyIncrementFromZero: { value: number }; heatCapacity: { value: number } };
    };
  };
  const { specificHeatFit, molarMassGPerMol, codataKeyValues } = fixture.data;
  // NIST OFHC copper fit (fixtures/physics/copper): c_p in J/(kg·K) → C in J/(mol·K).
  const cp = (t: number) => {
    const l = Math.log10(t);
    let s = 0;
    for (let i = specificHeatFit.log10Coefficients.length - 1; i >= 0; i--) s = s * l + specificHeatFit.log10Coefficients[i];
    return 10 ** s * molarMassGPerMol * 1e-3;
  };
  // 4 K to 298.15 K, 300 points log-spaced (the fit's own range is 4–300 K).
  const ts = Array.from({ length: 300 }, (_, i) => 4 * (298.15 / 4) ** (i / 299));
  // Below 4 K: γT + βT³ with Cu γ = 0.695 mJ/(mol·K²) (Kittel ISSP 8th ed., ch. 6 table of γ) and β from
  // θ_D = 343 K (Kittel ISSP ch. 5 Table 1), both from memory; that part contributes only ~0.01% of S(298.15).
  const lowT = { gamma: 0.695e-3, beta: debyeLowTLimit(1, 343, 1) };

  it("matches the CODATA key values S° = 33.15 J/(mol·K) and H° − H°(0) = 5.004 kJ/mol within 2%", () => {
    const [row] = thermoTable(ts, ts.map(cp), lowT, [298.15]);
    // 2%: the NIST fit gives Cp(298.15 K) = 24.74 J/(mol·K), 1.2% above the CODATA 24.44, and it carries
    // that offset through the upper half of the range; the integration itself is exact to ~1e-8 here.
    expectClose(cp(298.15), codataKeyValues.heatCapacity.value, { rel: 0.02 });
    expectClose(row.S, codataKeyValues.entropy.value, { rel: 0.02 });
    expectClose(row.H, codataKeyValues.enthalpyIncrementFromZero.value, { rel: 0.02 });
  });

  it("integrates that curve as mpmath 1.3.0 does (mp.quad of the same fit and low-T polynomial, 20 digits)", () => {
    const [row] = thermoTable(ts, ts.map(cp), lowT, [298.15]);
    // mpmath: quad(lowT/T, [0, 4]) + quad(cp/T, [4, 20, 50, 100, 298.15]) = 33.448155365365…, and the same
    // for H = 5059.3245158595…; rel 3e-8 covers the interpolation error of 300 points (measured 6e-9 on S,
    // 1.2e-8 on H; it falls as h⁴).
    expectClose(row.S, 33.448155365365, { rel: 3e-8 });
    expectClose(row.H, 5059.3245158595, { rel: 3e-8 });
  });
});
