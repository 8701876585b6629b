import { describe, expect, it } from "vitest";
import {
  combineInQuadrature,
  deviationsInSigma,
  flagOutliers,
  unweightedMean,
  weightedMean,
} from "@shared/stats/weighted-mean";
import { expectClose } from "../../helpers/expect-close";

describe("weightedMean", () => {
  // J. R. Taylor, An Introduction to Error Analysis, 2nd ed. (1997), §7.2, worked example: three
  // measurements of one resistance, 11 ± 1, 12 ± 1 and 10 ± 3 ohms, combine to 11.4 ± 0.7 ohms (from memory;
  // the same numbers are quoted with that book's answer on macosa.dima.unige.it/om/esr/pro/6a_19s.htm).
  it("reproduces Taylor §7.2's resistance example, 11.4 ± 0.7 ohm", () => {
    const r = weightedMean([11, 12, 10], [1, 1, 3]);
    expect(r.mean.toFixed(1)).toBe("11.4");
    expect(r.sigma.toFixed(1)).toBe("0.7");
    // Exact rational forms of the same sums (weights 1, 1, 1/9): mean = 217/19, σ = 3/√19.
    expectClose(r.mean, 217 / 19, { rel: 1e-15 }, "mean");
    expectClose(r.sigma, 3 / Math.sqrt(19), { rel: 1e-15 }, "sigma");
    expect(r.n).toBe(3);
  });

  it("gives the plain mean and σ/√n when all σ are equal (Taylor eq. 7.10 with equal weights, eq. 4.14)", () => {
    const r = weightedMean([4, 6, 8, 10], [2, 2, 2, 2]);
    expectClose(r.mean, 7, { rel: 1e-15 });
    expectClose(r.sigma, 2 / Math.sqrt(4), { rel: 1e-15 });
    // χ² = Σ (x − 7)²/4 = (9 + 1 + 1 + 9)/4 = 5 (direct arithmetic)
    expectClose(r.chiSquare, 5, { rel: 1e-15 });
    expectClose(r.reducedChiSquare, 5 / 3, { rel: 1e-15 });
  });

  it("leaves the mean unchanged and scales σ by k when every σ is scaled by k (follows from eqs. 7.10, 7.12)", () => {
    const v = [342.1, 338.4, 345.9];
    const s = [1.2, 0.8, 2.5];
    const a = weightedMean(v, s);
    const b = weightedMean(
      v,
      s.map((x) => x * 7),
    );
    expectClose(b.mean, a.mean, { rel: 1e-14 });
    expectClose(b.sigma, a.sigma * 7, { rel: 1e-14 });
    expectClose(b.chiSquare, a.chiSquare / 49, { rel: 1e-12 });
  });

  it("returns the value itself and its σ for one measurement, with NaN reduced χ²", () => {
    const r = weightedMean([300], [4]);
    expect(r.mean).toBe(300);
    expect(r.sigma).toBe(4);
    expect(r.reducedChiSquare).toBeNaN();
  });

  it("refuses empty input, mismatched lengths, σ ≤ 0 and non-finite numbers", () => {
    expect(() => weightedMean([], [])).toThrow(RangeError);
    expect(() => weightedMean([1, 2], [1])).toThrow(RangeError);
    expect(() => weightedMean([1, 2], [1, 0])).toThrow(/sigmas\[1\]/);
    expect(() => weightedMean([1, 2], [1, -1])).toThrow(RangeError);
    expect(() => weightedMean([1, Number.NaN], [1, 1])).toThrow(TypeError);
    expect(() => weightedMean([1, 2], [1, Number.POSITIVE_INFINITY])).toThrow(TypeError);
  });
});

describe("unweightedMean", () => {
  // Taylor, 2nd ed., §4.2–4.4: sample standard deviation with N − 1 (eq. 4.9) and σ/√N (eq. 4.14). The values
  // here are checked by hand: mean 5, squared deviations 9+1+1+9 = 20, s = √(20/3).
  it("gives the mean, the N − 1 standard deviation and the standard deviation of the mean", () => {
    const r = unweightedMean([2, 4, 6, 8]);
    expectClose(r.mean, 5, { rel: 1e-15 });
    expectClose(r.spread, Math.sqrt(20 / 3), { rel: 1e-15 });
    expectClose(r.standardError, Math.sqrt(20 / 3) / 2, { rel: 1e-15 });
  });

  it("has no spread for a single value", () => {
    const r = unweightedMean([7]);
    expect(r.mean).toBe(7);
    expect(r.spread).toBeNaN();
    expect(r.standardError).toBeNaN();
  });

  it("refuses empty and non-finite input", () => {
    expect(() => unweightedMean([])).toThrow(RangeError);
    expect(() => unweightedMean([1, Number.NaN])).toThrow(TypeError);
  });
});

describe("flagOutliers", () => {
  it("flags a value planted 5σ from three consistent ones and nothing else (common practice, no source: the 3σ rule)", () => {
    // Three values at 300 ± 1 and one at 305 ± 1: the weighted mean is 301.25, so the planted value lies
    // 3.75σ away and the others 1.25σ (direct arithmetic).
    const r = flagOutliers([300, 300, 300, 305], [1, 1, 1, 1]);
    expect(r.map((x) => x.flagged)).toEqual([false, false, false, true]);
    expectClose(r[3].deviationSigma, 3.75, { rel: 1e-14 });
    expectClose(r[0].deviationSigma, 1.25, { rel: 1e-14 });
  });

  it("does not flag a value exactly at the threshold, nor a group of one", () => {
    // 0 and 6 with σ 1 and 1: mean 3, each 3σ away: not beyond 3σ.
    expect(flagOutliers([0, 6], [1, 1]).map((x) => x.flagged)).toEqual([false, false]);
    expect(flagOutliers([1000], [0.001])[0].flagged).toBe(false);
  });

  it("measures distance in each value's own σ", () => {
    expect(deviationsInSigma([10, 20], [2, 5], 12)).toEqual([1, 1.6]);
    expect(() => deviationsInSigma([1], [0], 0)).toThrow(RangeError);
  });
});

describe("combineInQuadrature", () => {
  it("adds independent σ in quadrature (GUM eq. 10) and treats missing parts as 0", () => {
    expect(combineInQuadrature(3, 4)).toBe(5);
    expect(combineInQuadrature(3, null, undefined)).toBe(3);
    expect(combineInQuadrature()).toBe(0);
  });
});
