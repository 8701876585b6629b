import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { fitLeastSquares, type ModelFunction, type ModelJacobian } from "@shared/fitting/least-squares";
import { expectClose } from "../../helpers/expect-close";

interface NistSet {
  name: string;
  difficulty: string;
  start1: number[];
  start2: number[];
  certifiedValues: number[];
  certifiedStandardDeviations: number[];
  residualSumOfSquares: number;
  residualStandardDeviation: number;
  degreesOfFreedom: number;
  x: number[];
  y: number[];
}

const loadNist = (name: string): NistSet =>
  JSON.parse(readFileSync(new URL(`../../../fixtures/fitting/nist-strd/${name}/data.json`, import.meta.url), "utf8"));

// Model equations as printed in each NIST .dat file (see the fixture's "model" field).
const nistModels: Record<string, { f: ModelFunction; jacobian: ModelJacobian }> = {
  misra1a: {
    f: (b, x) => b[0] * (1 - Math.exp(-b[1] * x)),
    jacobian: (b, x) => [1 - Math.exp(-b[1] * x), b[0] * x * Math.exp(-b[1] * x)],
  },
  roszman1: {
    f: (b, x) => b[0] - b[1] * x - Math.atan(b[2] / (x - b[3])) / Math.PI,
    jacobian: (b, x) => {
      const u = x - b[3];
      const den = Math.PI * (u * u + b[2] * b[2]);
      return [1, -x, -u / den, -b[2] / den];
    },
  },
  eckerle4: {
    f: (b, x) => (b[0] / b[1]) * Math.exp(-0.5 * ((x - b[2]) / b[1]) ** 2),
    jacobian: (b, x) => {
      const t = x - b[2];
      const e = Math.exp((-0.5 * t * t) / (b[1] * b[1]));
      return [e / b[1], (-b[0] * e) / b[1] ** 2 + ((b[0] * e) / b[1] ** 4) * t * t, ((b[0] * e) / b[1] ** 3) * t];
    },
  },
};

// NIST StRD certified values carry 11 significant digits; STYLE §6 asks for at least 6, i.e. a relative
// difference ≤ 1e-6 (log relative error ≥ 6, McCullough, Amer. Statist. 53 (1999) 149).
const SIX_DIGITS = { rel: 1e-6 };

describe("fitLeastSquares against NIST StRD nonlinear regression certified values", () => {
  for (const name of ["misra1a", "roszman1", "eckerle4"]) {
    const set = loadNist(name);
    for (const start of ["start1", "start2"] as const) {
      for (const jacobian of ["analytic", "finite-difference"] as const) {
        it(`${set.name} (${set.difficulty} difficulty) from NIST ${start}, ${jacobian} Jacobian: parameters, standard deviations and residual sum of squares to 6 digits (NIST ITL StRD ${set.name}.dat)`, () => {
          const result = fitLeastSquares({ x: set.x, y: set.y, sigma: null }, nistModels[name].f, {
            initialValues: set[start],
            jacobianFunction: jacobian === "analytic" ? nistModels[name].jacobian : undefined,
          });
          expect(result.converged).toBe(true);
          expect(result.stopReason).toBe("chi-square-stationary");
          expect(result.dof).toBe(set.degreesOfFreedom);
          set.certifiedValues.forEach((c, i) => expectClose(result.params[i], c, SIX_DIGITS, `b${i + 1}`));
          set.certifiedStandardDeviations.forEach((c, i) =>
            expectClose(result.stdErrors[i]!, c, SIX_DIGITS, `sd(b${i + 1})`),
          );
          expectClose(result.chiSquare, set.residualSumOfSquares, SIX_DIGITS, "residual sum of squares");
          expectClose(Math.sqrt(result.reducedChiSquare), set.residualStandardDeviation, SIX_DIGITS, "residual SD");
        });
      }
    }
  }
});

// Invented straight-line data (synthetic), with uncertainties spanning two decades.
const lineX = [0.5, 1.1, 2.0, 2.9, 4.2, 5.0, 6.3, 7.1, 8.4, 9.9];
const lineY = [2.31, 3.02, 5.2, 6.41, 9.6, 10.7, 14.2, 14.9, 18.1, 21.5];
const lineSigma = [0.05, 0.08, 0.1, 0.2, 0.3, 0.5, 1, 1.5, 2.5, 5];
const line: ModelFunction = (p, x) => p[0] + p[1] * x;
const lineJacobian: ModelJacobian = (_p, x) => [1, x];

/** Closed-form weighted straight line, Bevington & Robinson, Data Reduction and Error Analysis, 3rd ed., §6.3 (eqs. 6.12 and 6.21–6.22, numbers from memory). */
function closedFormLine(x: number[], y: number[], sigma: number[]) {
  let s = 0, sx = 0, sy = 0, sxx = 0, sxy = 0;
  x.forEach((xi, i) => {
    const w = 1 / sigma[i] ** 2;
    s += w; sx += w * xi; sy += w * y[i]; sxx += w * xi * xi; sxy += w * xi * y[i];
  });
  const delta = s * sxx - sx * sx;
  const a = (sxx * sy - sx * sxy) / delta;
  const b = (s * sxy - sx * sy) / delta;
  const chiSquare = x.reduce((sum, xi, i) => sum + ((y[i] - a - b * xi) / sigma[i]) ** 2, 0);
  return { a, b, sigmaA: Math.sqrt(sxx / delta), sigmaB: Math.sqrt(s / delta), covAB: -sx / delta, chiSquare };
}

describe("fitLeastSquares on a weighted straight line", () => {
  const exact = closedFormLine(lineX, lineY, lineSigma);

  it("matches the closed-form weighted least-squares line, its errors and covariance (Bevington & Robinson §6.3)", () => {
    const r = fitLeastSquares({ x: lineX, y: lineY, sigma: lineSigma }, line, {
      initialValues: [0, 0],
      jacobianFunction: lineJacobian,
    });
    expect(r.converged).toBe(true);
    expectClose(r.params[0], exact.a, { rel: 1e-12 }, "intercept");
    expectClose(r.params[1], exact.b, { rel: 1e-12 }, "slope");
    expectClose(r.stdErrorsUnscaled[0]!, exact.sigmaA, { rel: 1e-12 }, "sigma intercept");
    expectClose(r.stdErrorsUnscaled[1]!, exact.sigmaB, { rel: 1e-12 }, "sigma slope");
    expectClose(r.covarianceUnscaled![0][1], exact.covAB, { rel: 1e-12 }, "covariance");
    expectClose(r.chiSquare, exact.chiSquare, { rel: 1e-12 }, "chi-square");
    expect(r.dof).toBe(8);
    expectClose(r.covariance![1][1], exact.sigmaB ** 2 * (exact.chiSquare / 8), { rel: 1e-12 }, "scaled variance = s²·C");
    expectClose(r.correlation![0][1]!, exact.covAB / (exact.sigmaA * exact.sigmaB), { rel: 1e-12 }, "correlation");
  });

  it("matches the closed form with the finite-difference Jacobian", () => {
    const r = fitLeastSquares({ x: lineX, y: lineY, sigma: lineSigma }, line, { initialValues: [0, 0] });
    // Central differences carry a rounding error of about ε·|f|/h ≈ 1e-10 relative into J.
    expectClose(r.params[0], exact.a, { rel: 1e-8 }, "intercept");
    expectClose(r.params[1], exact.b, { rel: 1e-8 }, "slope");
    expectClose(r.stdErrorsUnscaled[1]!, exact.sigmaB, { rel: 1e-8 }, "sigma slope");
  });

  it("ml-levenberg-marquardt's own weights option is not trusted: unequal σ still give the closed-form answer (STYLE §5)", () => {
    // Closed form above is the reference; σ spread over two decades is where a 1/σ vs 1/σ² mix-up shows.
    const r = fitLeastSquares({ x: lineX, y: lineY, sigma: lineSigma }, line, { initialValues: [10, -1] });
    expectClose(r.params[1], exact.b, { rel: 1e-8 }, "slope");
  });

  it("scaling every σ by k leaves params unchanged and divides chiSquare by k² (STYLE §6)", () => {
    const base = fitLeastSquares({ x: lineX, y: lineY, sigma: lineSigma }, line, {
      initialValues: [0, 0],
      jacobianFunction: lineJacobian,
    });
    for (const k of [0.01, 3, 1e4]) {
      const scaled = fitLeastSquares({ x: lineX, y: lineY, sigma: lineSigma.map((s) => s * k) }, line, {
        initialValues: [0, 0],
        jacobianFunction: lineJacobian,
      });
      expectClose(scaled.params[0], base.params[0], { rel: 1e-12 }, `intercept k=${k}`);
      expectClose(scaled.params[1], base.params[1], { rel: 1e-12 }, `slope k=${k}`);
      expectClose(scaled.chiSquare, base.chiSquare / (k * k), { rel: 1e-12 }, `chi-square k=${k}`);
      expectClose(scaled.stdErrorsUnscaled[1]!, base.stdErrorsUnscaled[1]! * k, { rel: 1e-12 }, `unscaled error k=${k}`);
      expectClose(scaled.stdErrors[1]!, base.stdErrors[1]!, { rel: 1e-12 }, `scaled error k=${k}`);
    }
  });

  it("holds a fixed parameter: the slope fixed, the intercept is the weighted mean of y − b·x (closed form)", () => {
    const slope = 2;
    const r = fitLeastSquares({ x: lineX, y: lineY, sigma: lineSigma }, line, {
      initialValues: [0, slope],
      fixed: [false, true],
      jacobianFunction: lineJacobian,
    });
    const w = lineSigma.map((s) => 1 / (s * s));
    const sw = w.reduce((a, b) => a + b, 0);
    const mean = lineX.reduce((sum, xi, i) => sum + w[i] * (lineY[i] - slope * xi), 0) / sw;
    expectClose(r.params[0], mean, { rel: 1e-12 }, "intercept");
    expect(r.params[1]).toBe(slope);
    expectClose(r.stdErrorsUnscaled[0]!, 1 / Math.sqrt(sw), { rel: 1e-12 }, "error of a weighted mean");
    expect(r.stdErrors[1]).toBeNull();
    expect(r.covariance![1]).toEqual([0, 0]);
    expect(r.correlation![0][1]).toBeNull();
    expect(r.dof).toBe(lineX.length - 1);
    expect(r.freeParameterCount).toBe(1);
  });

  it("respects a bound: with the intercept capped below its optimum it ends on the cap, slope at the conditional optimum", () => {
    const cap = exact.a - 0.3;
    const r = fitLeastSquares({ x: lineX, y: lineY, sigma: lineSigma }, line, {
      initialValues: [0, 0],
      upperBounds: [cap, Infinity],
      jacobianFunction: lineJacobian,
    });
    expect(r.params[0]).toBe(cap);
    expect(r.atBound).toEqual([true, false]);
    // d χ²/d b = 0 with a = cap: b = Σw x (y − cap) / Σw x²
    let num = 0, den = 0;
    lineX.forEach((xi, i) => {
      const w = 1 / lineSigma[i] ** 2;
      num += w * xi * (lineY[i] - cap);
      den += w * xi * xi;
    });
    expectClose(r.params[1], num / den, { rel: 1e-10 }, "slope");
    expect(r.converged).toBe(true);
  });

  it("states the information criteria it used: AIC = χ² + 2k, BIC = χ² + k ln N with known σ (Burnham & Anderson 2002 §2.2; Schwarz 1978)", () => {
    const r = fitLeastSquares({ x: lineX, y: lineY, sigma: lineSigma }, line, { initialValues: [0, 0] });
    expect(r.informationCriteria).toBe("known-sigma");
    expectClose(r.aic, r.chiSquare + 4, { rel: 1e-15 }, "AIC");
    expectClose(r.bic, r.chiSquare + 2 * Math.log(10), { rel: 1e-15 }, "BIC");
    const u = fitLeastSquares({ x: lineX, y: lineY, sigma: null }, line, { initialValues: [0, 0] });
    expect(u.informationCriteria).toBe("estimated-sigma");
    expectClose(u.aic, 10 * Math.log(u.chiSquare / 10) + 6, { rel: 1e-14 }, "AIC, σ estimated");
  });
});

describe("fitLeastSquares input checks and honest stopping", () => {
  const data = { x: lineX, y: lineY, sigma: lineSigma };

  it("throws a RangeError naming sigma when sigma has the wrong length (STYLE §5)", () => {
    expect(() => fitLeastSquares({ ...data, sigma: lineSigma.slice(1) }, line, { initialValues: [0, 0] })).toThrow(
      /data\.sigma must have length 10/,
    );
    expect(() => fitLeastSquares({ ...data, sigma: lineSigma.slice(1) }, line, { initialValues: [0, 0] })).toThrow(RangeError);
  });

  it("rejects σ ≤ 0, non-finite y, a start outside its bounds and too few points", () => {
    const zero = lineSigma.slice();
    zero[3] = 0;
    expect(() => fitLeastSquares({ ...data, sigma: zero }, line, { initialValues: [0, 0] })).toThrow(/data\.sigma\[3\]/);
    const bad = lineY.slice();
    bad[2] = NaN;
    expect(() => fitLeastSquares({ ...data, y: bad }, line, { initialValues: [0, 0] })).toThrow(/data\.y\[2\]/);
    expect(() => fitLeastSquares(data, line, { initialValues: [5, 0], upperBounds: [1, 10] })).toThrow(/outside its bounds/);
    expect(() => fitLeastSquares({ x: [1, 2], y: [1, 2], sigma: null }, line, { initialValues: [0, 0] })).toThrow(
      /more points than free parameters/,
    );
    expect(() => fitLeastSquares(data, line, { initialValues: [0, 0], fixed: [true] })).toThrow(/options\.fixed/);
    expect(() => fitLeastSquares(data, (p, x) => p[0] / (x - 2), { initialValues: [1] })).toThrow(/not finite at the initial values/);
  });

  it("reports max-iterations and converged false when cut short, instead of claiming success", () => {
    const set = loadNist("eckerle4");
    const r = fitLeastSquares({ x: set.x, y: set.y, sigma: null }, nistModels.eckerle4.f, {
      initialValues: set.start1,
      maxIterations: 3,
    });
    expect(r.converged).toBe(false);
    expect(r.stopReason).toBe("max-iterations");
  });

  it("gives null covariance when two parameters cannot be separated (p0 + p1 as one offset)", () => {
    const r = fitLeastSquares(data, (p, x) => p[0] + p[1] + p[2] * x, { initialValues: [1, 1, 1] });
    expect(r.covariance).toBeNull();
    expect(r.stdErrors).toEqual([null, null, null]);
    // The sum is still determined: it equals the closed-form intercept.
    const exact = closedFormLine(lineX, lineY, lineSigma);
    expectClose(r.params[0] + r.params[1], exact.a, { rel: 1e-8 }, "p0 + p1");
  });
});
