import { describe, expect, it } from "vitest";
import { monotoneInterpolator } from "@shared/numerics/monotone-interpolation";
import { expectClose } from "../../helpers/expect-close";

// The RPN 14 data set of Fritsch & Carlson, SIAM J. Numer. Anal. 17 (1980) 238, Table 1
// (doi:10.1137/0717021), values from memory: monotone, flat at both ends, steep in the middle, the
// classic case where an ordinary cubic spline overshoots.
const RPN14_X = [7.99, 8.09, 8.19, 8.7, 9.2, 10, 12, 15, 20];
const RPN14_Y = [0, 2.76429e-5, 4.37498e-2, 0.169183, 0.469428, 0.94374, 0.998636, 0.999919, 0.999994];

function dense(xs: readonly number[], perInterval: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < xs.length - 1; i++) {
    for (let k = 0; k < perInterval; k++) out.push(xs[i] + ((xs[i + 1] - xs[i]) * k) / perInterval);
  }
  out.push(xs[xs.length - 1]);
  return out;
}

describe("monotoneInterpolator (PCHIP)", () => {
  it("returns the knot values exactly", () => {
    const f = monotoneInterpolator(RPN14_X, RPN14_Y);
    RPN14_X.forEach((x, i) => expect(f(x)).toBe(RPN14_Y[i]));
  });

  it("reproduces linear data on unequal spacing to rel 1e-14 (a cubic Hermite with slopes δ is the line; common practice, no source)", () => {
    const xs = [1, 1.5, 4, 4.2, 9, 30];
    const line = (x: number) => 3.25 * x - 7.5;
    const f = monotoneInterpolator(xs, xs.map(line));
    for (const s of f.slopes) expectClose(s, 3.25, { rel: 1e-14 }, "slope");
    for (const x of dense(xs, 17)) expectClose(f(x), line(x), { rel: 1e-14, abs: 1e-13 }, `x=${x}`);
  });

  it("keeps the Fritsch–Carlson RPN 14 data monotone with no overshoot between knots", () => {
    const f = monotoneInterpolator(RPN14_X, RPN14_Y);
    const xs = dense(RPN14_X, 200);
    let prev = -Infinity;
    for (const x of xs) {
      const y = f(x);
      expect(y).toBeGreaterThanOrEqual(prev);
      prev = y;
    }
    for (let i = 0; i < RPN14_X.length - 1; i++) {
      for (const x of dense([RPN14_X[i], RPN14_X[i + 1]], 100)) {
        const y = f(x);
        expect(y).toBeGreaterThanOrEqual(RPN14_Y[i]);
        expect(y).toBeLessThanOrEqual(RPN14_Y[i + 1]);
      }
    }
  });

  it("keeps decreasing data decreasing and puts a zero slope at a local extremum (Fritsch & Carlson 1980, step 3)", () => {
    const xs = [0, 1, 2, 3, 5];
    const ys = [10, 6, 5.5, 1, 0.2];
    const f = monotoneInterpolator(xs, ys);
    let prev = Infinity;
    for (const x of dense(xs, 50)) {
      expect(f(x)).toBeLessThanOrEqual(prev);
      prev = f(x);
    }
    const peak = monotoneInterpolator([0, 1, 2], [0, 1, 0]);
    expect(peak.slopes[1]).toBe(0);
    for (const x of dense([0, 1, 2], 50)) expect(peak(x)).toBeLessThanOrEqual(1);
  });

  it("matches a case worked by hand: xs 0,1,3, ys 0,1,2", () => {
    // h = (1, 2), δ = (1, 0.5).
    // Interior slope, weighted harmonic mean (Fritsch & Butland 1984, as in Moler, Numerical Computing
    // with MATLAB §3.4): w1 = 2h1 + h0 = 5, w2 = h1 + 2h0 = 4, d1 = (w1 + w2)/(w1/δ0 + w2/δ1) = 9/13.
    // End slopes, three-point formula: d0 = ((2h0 + h1)δ0 − h0δ1)/(h0 + h1) = 3.5/3 = 7/6;
    // d2 = ((2h1 + h0)δ1 − h1δ0)/(h0 + h1) = 0.5/3 = 1/6 (same sign as δ, below 3δ: kept).
    // Hermite cubic (Fritsch & Carlson 1980, eq. 1) at t = 1/2 has basis 1/2, 1/8, 1/2, −1/8:
    // f(0.5) = 1/2·0 + 1/8·1·7/6 + 1/2·1 − 1/8·1·9/13 = 349/624;
    // f(2)   = 1/2·1 + 1/8·2·9/13 + 1/2·2 − 1/8·2·1/6 = 509/312.
    const f = monotoneInterpolator([0, 1, 3], [0, 1, 2]);
    expectClose(f.slopes[0], 7 / 6, { rel: 1e-15 }, "d0");
    expectClose(f.slopes[1], 9 / 13, { rel: 1e-15 }, "d1");
    expectClose(f.slopes[2], 1 / 6, { rel: 1e-15 }, "d2");
    expectClose(f(0.5), 349 / 624, { rel: 1e-15 }, "f(0.5)");
    expectClose(f(2), 509 / 312, { rel: 1e-15 }, "f(2)");
  });

  it("is the straight line for two points and NaN outside the knots (no extrapolation)", () => {
    const f = monotoneInterpolator([2, 6], [1, 3]);
    expectClose(f(3), 1.5, { rel: 1e-15 });
    expect(f(1.999)).toBeNaN();
    expect(f(6.001)).toBeNaN();
    expect(f(Number.NaN)).toBeNaN();
  });

  it("throws RangeError for mismatched lengths, fewer than 2 points and non-increasing xs", () => {
    expect(() => monotoneInterpolator([1, 2], [1])).toThrow(RangeError);
    expect(() => monotoneInterpolator([1], [1])).toThrow(RangeError);
    expect(() => monotoneInterpolator([1, 1, 2], [1, 2, 3])).toThrow(RangeError);
    expect(() => monotoneInterpolator([1, 3, 2], [1, 2, 3])).toThrow(RangeError);
  });
});
