import { expect } from "vitest";

export type Tolerance = { rel: number } | { abs: number } | { rel: number; abs: number };

/**
 * Asserts |actual − expected| ≤ max(abs, rel·|expected|). Physics tests use this instead of toBeCloseTo.
 * @param label names the value in the failure message (e.g. "debye x=0.5")
 */
export function expectClose(actual: number, expected: number, tol: Tolerance, label = ""): void {
  const rel = "rel" in tol ? tol.rel : 0;
  const abs = "abs" in tol ? tol.abs : 0;
  const allowed = Math.max(abs, rel * Math.abs(expected));
  const diff = Math.abs(actual - expected);
  if (!(diff <= allowed) || Number.isNaN(actual) !== Number.isNaN(expected)) {
    const relErr = expected !== 0 ? diff / Math.abs(expected) : Number.POSITIVE_INFINITY;
    expect.fail(
      `${label ? label + ": " : ""}expected ${expected}, got ${actual} (diff ${diff.toExponential(3)}, rel ${relErr.toExponential(3)}, allowed ${allowed.toExponential(3)})`,
    );
  }
}

/** Relative difference |a − b| / |b|. */
export function relativeError(actual: number, expected: number): number {
  return Math.abs(actual - expected) / Math.abs(expected);
}
