/*
 * Dense k×k helpers for the fitter's inner loop, where k (free parameters) is at most a dozen or so.
 * Plain arrays keep the per-iteration cost down; the covariance itself goes through ml-matrix
 * (least-squares.ts).
 */

/**
 * Solves A·x = b for a symmetric positive-definite A by Cholesky factorisation.
 * @param a k×k matrix, row-major as nested arrays (not modified)
 * @param b right-hand side of length k (not modified)
 * @returns the solution, or null when A is not numerically positive definite (a pivot ≤ 0 or not finite)
 * @see Golub & Van Loan, Matrix Computations, 4th ed., Algorithm 4.2.1
 */
export function choleskySolve(a: readonly (readonly number[])[], b: readonly number[]): number[] | null {
  const k = b.length;
  const l: number[][] = [];
  for (let i = 0; i < k; i++) {
    l.push(new Array<number>(k).fill(0));
    for (let j = 0; j <= i; j++) {
      let sum = a[i][j];
      for (let m = 0; m < j; m++) sum -= l[i][m] * l[j][m];
      if (i === j) {
        if (!(sum > 0) || !Number.isFinite(sum)) return null;
        l[i][i] = Math.sqrt(sum);
      } else {
        l[i][j] = sum / l[j][j];
      }
    }
  }
  const z = new Array<number>(k);
  for (let i = 0; i < k; i++) {
    let sum = b[i];
    for (let m = 0; m < i; m++) sum -= l[i][m] * z[m];
    z[i] = sum / l[i][i];
  }
  const x = new Array<number>(k);
  for (let i = k - 1; i >= 0; i--) {
    let sum = z[i];
    for (let m = i + 1; m < k; m++) sum -= l[m][i] * x[m];
    x[i] = sum / l[i][i];
  }
  return x;
}
