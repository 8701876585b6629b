/*
 * Monotone piecewise-cubic Hermite interpolation (PCHIP): between data points the interpolant never
 * overshoots, so an interpolated heat capacity stays between its neighbours (no spurious wiggles when
 * subtracting addenda or integrating C/T).
 * Slopes: Fritsch & Carlson, SIAM J. Numer. Anal. 17 (1980) 238, doi:10.1137/0717021, with the
 * weighted harmonic mean of Fritsch & Butland (1984) for interior points and the one-sided
 * three-point end formula with its shape-preserving limits (as in Moler, "Numerical Computing with
 * MATLAB", section 3.4, pchip).
 * Valid for strictly increasing xs; outside [xs[0], xs[n-1]] it returns NaN (no extrapolation).
 */

/** A monotone cubic through (xs[i], ys[i]). */
export interface MonotoneInterpolant {
  (x: number): number;
  /** Knot slopes, one per point. */
  readonly slopes: readonly number[];
}

function endSlope(h0: number, h1: number, d0: number, d1: number): number {
  const s = ((2 * h0 + h1) * d0 - h0 * d1) / (h0 + h1);
  if (Math.sign(s) !== Math.sign(d0)) return 0;
  if (Math.sign(d0) !== Math.sign(d1) && Math.abs(s) > Math.abs(3 * d0)) return 3 * d0;
  return s;
}

/**
 * Builds the monotone interpolant.
 * @param xs strictly increasing abscissae (e.g. temperature in K), at least 2
 * @param ys ordinates, same length
 * @throws RangeError when lengths differ, fewer than 2 points, or xs is not strictly increasing
 */
export function monotoneInterpolator(xs: readonly number[], ys: readonly number[]): MonotoneInterpolant {
  const n = xs.length;
  if (ys.length !== n) throw new RangeError(`monotoneInterpolator: xs has ${n} values but ys has ${ys.length}`);
  if (n < 2) throw new RangeError("monotoneInterpolator: needs at least 2 points");
  const h: number[] = [];
  const delta: number[] = [];
  for (let i = 0; i < n - 1; i++) {
    const dx = xs[i + 1] - xs[i];
    if (!(dx > 0)) throw new RangeError(`monotoneInterpolator: xs must be strictly increasing (index ${i + 1})`);
    h.push(dx);
    delta.push((ys[i + 1] - ys[i]) / dx);
  }
  const d = new Array<number>(n).fill(0);
  if (n === 2) {
    d[0] = d[1] = delta[0];
  } else {
    for (let k = 1; k < n - 1; k++) {
      if (delta[k - 1] * delta[k] > 0) {
        const w1 = 2 * h[k] + h[k - 1];
        const w2 = h[k] + 2 * h[k - 1];
        d[k] = (w1 + w2) / (w1 / delta[k - 1] + w2 / delta[k]);
      }
    }
    d[0] = endSlope(h[0], h[1], delta[0], delta[1]);
    d[n - 1] = endSlope(h[n - 2], h[n - 3], delta[n - 2], delta[n - 3]);
  }
  const f = ((x: number): number => {
    if (!(x >= xs[0] && x <= xs[n - 1])) return Number.NaN;
    let lo = 0;
    let hi = n - 1;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (xs[mid] <= x) lo = mid;
      else hi = mid;
    }
    const t = (x - xs[lo]) / h[lo];
    const t2 = t * t;
    const t3 = t2 * t;
    return (
      (2 * t3 - 3 * t2 + 1) * ys[lo] +
      (t3 - 2 * t2 + t) * h[lo] * d[lo] +
      (-2 * t3 + 3 * t2) * ys[lo + 1] +
      (t3 - t2) * h[lo] * d[lo + 1]
    );
  }) as MonotoneInterpolant;
  Object.defineProperty(f, "slopes", { value: d });
  return f;
}
