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

/**
 * Householder QR factorisation of a tall n×k matrix A (n ≥ k), returning R and, optionally, Qᵀb.
 * O(n·k²) with no n×n or n×k output: the fitter only needs R (JᵀJ = RᵀR) and Qᵀb.
 * @param a n×k matrix, row-major (a[i·k + j]); not modified
 * @param n rows
 * @param k columns
 * @param b optional right-hand side of length n; not modified
 * @returns r: the k×k upper-triangular factor; qtb: the first k entries of Qᵀb, and rss: Σ of the squares of
 *   its remaining n − k entries (the residual sum of squares of the least-squares solution), when b is given
 * @see Golub & Van Loan, Matrix Computations, 4th ed., Algorithm 5.2.1
 */
export function householderQR(
  a: ArrayLike<number>,
  n: number,
  k: number,
  b?: ArrayLike<number>,
): { r: number[][]; qtb: number[] | null; rss: number | null } {
  const w = Float64Array.from(a as ArrayLike<number>);
  const v = b === undefined ? null : Float64Array.from(b as ArrayLike<number>);
  for (let j = 0; j < k; j++) {
    let norm = 0;
    for (let i = j; i < n; i++) norm += w[i * k + j] * w[i * k + j];
    norm = Math.sqrt(norm);
    if (norm === 0) continue;
    // Reflect column j onto −sign(a_jj)·‖a_j‖·e_j (the sign avoids cancellation in v = a − α e).
    const alpha = w[j * k + j] > 0 ? -norm : norm;
    const head = w[j * k + j] - alpha;
    // Householder vector u = (head, a_{j+1..n−1, j}); τ = 2/‖u‖² = −1/(α·head).
    const tau = -1 / (alpha * head);
    for (let c = j + 1; c < k; c++) {
      let dot = head * w[j * k + c];
      for (let i = j + 1; i < n; i++) dot += w[i * k + j] * w[i * k + c];
      dot *= tau;
      w[j * k + c] -= dot * head;
      for (let i = j + 1; i < n; i++) w[i * k + c] -= dot * w[i * k + j];
    }
    if (v !== null) {
      let dot = head * v[j];
      for (let i = j + 1; i < n; i++) dot += w[i * k + j] * v[i];
      dot *= tau;
      v[j] -= dot * head;
      for (let i = j + 1; i < n; i++) v[i] -= dot * w[i * k + j];
    }
    w[j * k + j] = alpha;
  }
  const r = Array.from({ length: k }, (_, i) => Array.from({ length: k }, (__, j) => (j >= i ? w[i * k + j] : 0)));
  if (v === null) return { r, qtb: null, rss: null };
  let rss = 0;
  for (let i = k; i < n; i++) rss += v[i] * v[i];
  return { r, qtb: Array.from(v.subarray(0, k)), rss };
}

/**
 * Least-squares solution of A·x ≈ b by Householder QR and back substitution, without covariance: for
 * cheap screening solves. Columns should be scaled to comparable norms by the caller.
 * @param a n×k matrix, row-major; not modified
 * @param n rows (≥ k)
 * @param k columns
 * @param b right-hand side of length n; not modified
 * @returns x with the residual sum of squares |b − A·x|², or null when a diagonal entry of R is below
 *   1e-12 of the largest (dependent columns)
 */
export function leastSquaresSolve(
  a: ArrayLike<number>,
  n: number,
  k: number,
  b: ArrayLike<number>,
): { x: number[]; rss: number } | null {
  if (n < k) return null;
  const { r, qtb, rss } = householderQR(a, n, k, b);
  const largest = Math.max(...r.map((row, i) => Math.abs(row[i])));
  if (!(largest > 0)) return null;
  const x = new Array<number>(k);
  for (let i = k - 1; i >= 0; i--) {
    if (!(Math.abs(r[i][i]) > 1e-12 * largest)) return null;
    let sum = qtb![i];
    for (let j = i + 1; j < k; j++) sum -= r[i][j] * x[j];
    x[i] = sum / r[i][i];
  }
  return { x, rss: rss! };
}
