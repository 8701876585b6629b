import { expectClose } from "../../helpers/expect-close";

/**
 * Compares an analytic jacobian with central finite differences, step h_i = 1e-6·max(|p_i|, 1e-3).
 * Central differences err by ~h² (truncation) plus ~1e-16·|f|/h (rounding): 1e-6 relative is what
 * they can confirm; entries far below |f|/p_i get the rounding bound 1e-14·|f|/h (about 50 ulp of f
 * over the step) or absFloor, whichever is larger, as their absolute tolerance.
 */
export function checkJacobian(
  evaluate: (p: readonly number[], t: number) => number,
  jacobian: (p: readonly number[], t: number) => number[],
  p: readonly number[],
  temperatures: readonly number[],
  names: readonly string[],
  absFloor = 1e-12,
): void {
  for (const t of temperatures) {
    const j = jacobian(p, t);
    const f = Math.abs(evaluate(p, t));
    for (let i = 0; i < p.length; i++) {
      const h = 1e-6 * Math.max(Math.abs(p[i]), 1e-3);
      const up = [...p];
      const dn = [...p];
      up[i] += h;
      dn[i] -= h;
      const fd = (evaluate(up, t) - evaluate(dn, t)) / (2 * h);
      expectClose(j[i], fd, { rel: 1e-6, abs: Math.max(absFloor, (1e-14 * f) / h) }, `∂C/∂${names[i]} at ${t} K`);
    }
  }
}
