import { describe, expect, it } from "vitest";
import { fitLinearLeastSquares, fitLowT, thetaDFromBeta } from "@shared/fitting/linear";
import { expectClose } from "../../helpers/expect-close";
import { createSeededRandom } from "@shared/numerics/seeded-random";

describe("fitLinearLeastSquares", () => {
  it("matches the closed-form weighted straight line (Bevington & Robinson, 3rd ed., §6.3, from memory for equation numbers)", () => {
    // Invented (synthetic) points.
    const x = [1, 2, 3, 4, 5, 6];
    const y = [2.9, 5.2, 6.8, 9.3, 10.9, 13.2];
    const sigma = [0.1, 0.2, 0.2, 0.4, 0.8, 1.6];
    let s = 0, sx = 0, sy = 0, sxx = 0, sxy = 0;
    x.forEach((xi, i) => {
      const w = sigma[i] ** -2;
      s += w; sx += w * xi; sy += w * y[i]; sxx += w * xi * xi; sxy += w * xi * y[i];
    });
    const delta = s * sxx - sx * sx;
    const r = fitLinearLeastSquares(x.map((xi) => [1, xi]), y, sigma);
    expectClose(r.params[0], (sxx * sy - sx * sxy) / delta, { rel: 1e-13 }, "intercept");
    expectClose(r.params[1], (s * sxy - sx * sy) / delta, { rel: 1e-13 }, "slope");
    expectClose(r.stdErrorsUnscaled[0], Math.sqrt(sxx / delta), { rel: 1e-13 }, "sigma intercept");
    expectClose(r.stdErrorsUnscaled[1], Math.sqrt(s / delta), { rel: 1e-13 }, "sigma slope");
    expectClose(r.covarianceUnscaled[0][1], -sx / delta, { rel: 1e-12 }, "covariance");
    expect(r.dof).toBe(4);
  });

  it("throws on wrong-length sigma, σ ≤ 0 and linearly dependent columns", () => {
    const design = [[1, 1], [1, 2], [1, 3]];
    expect(() => fitLinearLeastSquares(design, [1, 2, 3], [1, 1])).toThrow(/sigma must have length 3/);
    expect(() => fitLinearLeastSquares(design, [1, 2, 3], [1, 0, 1])).toThrow(/sigma\[1\]/);
    expect(() => fitLinearLeastSquares([[1, 2], [2, 4], [3, 6]], [1, 2, 3], null)).toThrow(/linearly dependent/);
  });
});

describe("fitLowT: C/T = γ + βT² (+ δT⁴) against T²", () => {
  // Synthetic exact data with γ, β, δ of the size found in simple metals.
  const gamma = 6.95e-4; // J/(mol·K²)
  const beta = 4.8e-5; // J/(mol·K⁴)
  const delta = 2.0e-8; // J/(mol·K⁶)
  const t = Array.from({ length: 25 }, (_, i) => 1.8 + 0.35 * i);

  it("recovers γ and β exactly (to rounding) from exact γT + βT³ data", () => {
    const c = t.map((ti) => gamma * ti + beta * ti ** 3);
    const r = fitLowT(t, c, null);
    expectClose(r.gamma, gamma, { rel: 1e-12 }, "gamma");
    expectClose(r.beta, beta, { rel: 1e-12 }, "beta");
    expect(r.delta).toBeNull();
    expect(r.parameterNames).toEqual(["gamma", "beta"]);
    expectClose(r.chiSquare, 0, { abs: 1e-25 }, "chi-square of exact data");
  });

  it("recovers γ, β and δ exactly from exact γT + βT³ + δT⁵ data with withT5", () => {
    const c = t.map((ti) => gamma * ti + beta * ti ** 3 + delta * ti ** 5);
    const r = fitLowT(t, c, null, { withT5: true });
    expectClose(r.gamma, gamma, { rel: 1e-10 }, "gamma"); // T⁴ column is nearly collinear with T²: a few digits go to conditioning
    expectClose(r.beta, beta, { rel: 1e-10 }, "beta");
    expectClose(r.delta!, delta, { rel: 1e-9 }, "delta");
  });

  it("keeps only T ≤ tMaxK and says which points it used", () => {
    const c = t.map((ti) => gamma * ti + beta * ti ** 3);
    const r = fitLowT(t, c, null, { tMaxK: 5 });
    expect(r.pointsUsed).toEqual(t.map((ti, i) => (ti <= 5 ? i : -1)).filter((i) => i >= 0));
    expect(r.temperatureRangeK[1]).toBeLessThanOrEqual(5);
    expect(() => fitLowT(t, c, null, { tMaxK: 2 })).toThrow(/needs more than 2 points at or below 2 K/);
  });

  it("synthetic noisy run (seed 20261201): γ and β within 3σ of their stated standard errors, χ²_red near 1", () => {
    const random = createSeededRandom(20261201);
    const c0 = t.map((ti) => gamma * ti + beta * ti ** 3);
    const sigma = c0.map((ci) => 0.005 * ci);
    const c = c0.map((ci, i) => ci + sigma[i] * random.normal());
    const r = fitLowT(t, c, sigma);
    expect(Math.abs(r.gamma - gamma)).toBeLessThan(3 * r.stdErrorsUnscaled[0]);
    expect(Math.abs(r.beta - beta)).toBeLessThan(3 * r.stdErrorsUnscaled[1]);
    // χ² with 23 dof lies in [9.260, 44.18] with 99% probability (0.5% and 99.5% quantiles from the
    // regularised incomplete gamma function, mpmath 1.3.0 gammainc + findroot).
    expect(r.chiSquare).toBeGreaterThan(9.26);
    expect(r.chiSquare).toBeLessThan(44.18);
  });

  it("propagates σ(C) to σ(C/T) = σ(C)/T: doubling every σ doubles the unscaled errors and quarters χ²", () => {
    const random = createSeededRandom(7);
    const sigma = t.map((ti) => 1e-4 * ti);
    const c = t.map((ti, i) => gamma * ti + beta * ti ** 3 + sigma[i] * random.normal());
    const a = fitLowT(t, c, sigma);
    const b = fitLowT(t, c, sigma.map((s) => 2 * s));
    expectClose(b.stdErrorsUnscaled[1], 2 * a.stdErrorsUnscaled[1], { rel: 1e-12 }, "sigma beta");
    expectClose(b.chiSquare, a.chiSquare / 4, { rel: 1e-12 }, "chi-square");
    expectClose(b.beta, a.beta, { rel: 1e-12 }, "beta");
  });

  it("refuses T ≤ 0 and mismatched lengths by name", () => {
    expect(() => fitLowT([0, 1, 2], [1, 2, 3], null)).toThrow(/temperatureK\[0\]/);
    expect(() => fitLowT([1, 2, 3], [1, 2], null)).toThrow(/heatCapacity must have length 3/);
    expect(() => fitLowT([1, 2, 3], [1, 2, 3], [1, 1])).toThrow(/sigma must have length 3/);
  });
});

describe("thetaDFromBeta: θ_D = (12π⁴nR/5β)^{1/3}", () => {
  // Reference values: mpmath 1.3.0 at mp.dps = 30, R = 1.380649e-23 × 6.02214076e23 (CODATA 2018 exact),
  // θ = cbrt(12π⁴nR/(5β)) and dθ/dβ by mp.diff.
  const cases = [
    { beta: 4.8e-5, n: 1, theta: 343.40074002447230727, dTheta: -2384727.3612810576894 },
    { beta: 1.0e-3, n: 5, theta: 213.40518839453013788, dTheta: -71135.062798176712625 },
    { beta: 2.5e-6, n: 2, theta: 1158.5416057017350265, dTheta: -154472214.0935646702 },
  ];
  for (const c of cases) {
    it(`β = ${c.beta} J/(mol·K⁴), n = ${c.n}: θ_D and σ(θ_D) match mpmath 1.3.0 to rel 1e-14`, () => {
      const sigmaBeta = 0.01 * c.beta;
      const r = thetaDFromBeta(c.beta, c.n, sigmaBeta);
      expectClose(r.thetaD, c.theta, { rel: 1e-14 }, "thetaD");
      expectClose(r.sigmaThetaD!, Math.abs(c.dTheta) * sigmaBeta, { rel: 1e-13 }, "sigma thetaD");
    });
  }

  it("β = 0.048 mJ/(mol·K⁴) for copper gives about 343 K (Kittel, Introduction to Solid State Physics, 8th ed., Table 5.1: θ_D(Cu) = 343 K; β of Cu from memory)", () => {
    expect(Math.abs(thetaDFromBeta(4.8e-5, 1).thetaD - 343)).toBeLessThan(1);
  });

  it("has no Debye temperature for β ≤ 0 and needs n > 0", () => {
    expect(() => thetaDFromBeta(0, 1)).toThrow(/beta must be/);
    expect(() => thetaDFromBeta(-1e-5, 1)).toThrow(RangeError);
    expect(() => thetaDFromBeta(1e-5, 0)).toThrow(/atomsN/);
    expect(thetaDFromBeta(1e-5, 1).sigmaThetaD).toBeNull();
  });
});
