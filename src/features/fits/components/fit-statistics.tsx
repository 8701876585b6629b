import type { FitOutcome } from "@shared/schemas/fits";

const num = (v: number, digits = 5) => (Number.isFinite(v) ? String(Number(v.toPrecision(digits))) : "—");

/** χ², reduced χ², dof, AIC, BIC, points, convergence: one definition list. */
export function FitStatistics({ outcome }: { outcome: Pick<FitOutcome, "chiSquare" | "reducedChiSquare" | "dof" | "aic" | "bic" | "pointsUsed" | "maskedExcluded" | "converged" | "stopReason" | "iterations" | "window" | "elapsedMs"> }) {
  const items: [string, string][] = [
    ["Window", `${num(outcome.window[0], 4)} – ${num(outcome.window[1], 4)} K`],
    ["Points used", `${outcome.pointsUsed}${outcome.maskedExcluded ? ` (${outcome.maskedExcluded} masked left out)` : ""}`],
    ["χ²", num(outcome.chiSquare)],
    ["χ²/dof", `${num(outcome.reducedChiSquare, 4)} (dof ${outcome.dof})`],
    ["AIC", num(outcome.aic, 7)],
    ["BIC", num(outcome.bic, 7)],
    ["Converged", outcome.converged ? `yes — ${outcome.stopReason}` : `no — ${outcome.stopReason}`],
    ["Iterations", outcome.iterations === null ? "—" : String(outcome.iterations)],
    ["Time", `${num(outcome.elapsedMs, 3)} ms`],
  ];
  return (
    <dl className="grid grid-cols-[max-content_1fr] gap-x-4 gap-y-0.5 text-sm">
      {items.map(([k, v]) => (
        <div key={k} className="contents">
          <dt className="text-ink-muted">{k}</dt>
          <dd className="font-mono tabular-nums">{v}</dd>
        </div>
      ))}
    </dl>
  );
}
