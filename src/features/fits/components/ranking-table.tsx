import type { RankResult } from "@shared/schemas/fits";
import { MeasuredValue } from "@/components/ui/measured-value";
import { Button } from "@/components/ui/button";

const num = (v: number, d = 6) => String(Number(v.toPrecision(d)));

/** Evidence wording for ΔBIC, after Kass & Raftery, J. Am. Stat. Assoc. 90 (1995) 773, section 3.2. */
function evidence(deltaBic: number): string {
  if (deltaBic === 0) return "preferred";
  if (deltaBic < 2) return "about as good";
  if (deltaBic < 6) return "positively worse";
  if (deltaBic < 10) return "strongly worse";
  return "very strongly worse";
}

/** Candidates ordered by BIC, lowest first, with ΔBIC and the characteristic temperatures. */
export function RankingTable({ result, onUse }: { result: RankResult; onUse?: (index: number) => void }) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-sm" aria-label="Candidate models ordered by BIC">
        <thead className="bg-sunken text-left text-xs text-ink-muted">
          <tr>
            <th scope="col" className="px-2 py-1 font-medium">
              #
            </th>
            <th scope="col" className="px-2 py-1 font-medium">
              Model
            </th>
            <th scope="col" className="px-2 py-1 font-medium">
              BIC
            </th>
            <th scope="col" className="px-2 py-1 font-medium">
              ΔBIC
            </th>
            <th scope="col" className="px-2 py-1 font-medium">
              χ²/dof
            </th>
            <th scope="col" className="px-2 py-1 font-medium">
              θ_D
            </th>
            <th scope="col" className="px-2 py-1 font-medium">
              Notes
            </th>
            {onUse ? <th scope="col" className="px-2 py-1" /> : null}
          </tr>
        </thead>
        <tbody>
          {result.entries.map((e, i) => {
            const thetaD = e.outcome?.parameters.find((p) => p.name === "thetaD");
            return (
              <tr key={`${e.label}-${i}`} className="border-t border-line" data-rank={i + 1}>
                <td className="px-2 py-1 font-mono">{e.outcome?.converged ? i + 1 : "—"}</td>
                <th scope="row" className="px-2 py-1 text-left font-normal">
                  {e.label}
                </th>
                <td className="px-2 py-1 font-mono tabular-nums">{e.outcome ? num(e.outcome.bic, 7) : "—"}</td>
                <td className="px-2 py-1 font-mono tabular-nums">
                  {e.deltaBic === null ? "—" : (
                    <span title={evidence(e.deltaBic)}>
                      {num(e.deltaBic, 4)} <span className="font-sans text-xs text-ink-muted">{evidence(e.deltaBic)}</span>
                    </span>
                  )}
                </td>
                <td className="px-2 py-1 font-mono tabular-nums">{e.outcome ? num(e.outcome.reducedChiSquare, 4) : "—"}</td>
                <td className="px-2 py-1">{thetaD ? <MeasuredValue value={thetaD.value} sigma={thetaD.stderr ?? undefined} unit="K" /> : "—"}</td>
                <td className="px-2 py-1 text-xs">
                  {e.error ? (
                    <span className="text-danger">{e.error}</span>
                  ) : e.outcome && !e.outcome.converged ? (
                    <span className="text-caution">did not converge</span>
                  ) : e.outcome && e.outcome.warnings.length > 0 ? (
                    <span className="text-caution">{e.outcome.warnings.length} warning{e.outcome.warnings.length > 1 ? "s" : ""}</span>
                  ) : (
                    ""
                  )}
                </td>
                {onUse ? (
                  <td className="px-2 py-1">
                    <Button size="sm" variant="quiet" onClick={() => onUse(i)} aria-label={`Use ${e.label} in the composer`}>
                      Use
                    </Button>
                  </td>
                ) : null}
              </tr>
            );
          })}
        </tbody>
      </table>
      <p className="mt-1 text-xs text-ink-muted">
        {result.pointsUsed} points, {num(result.window[0], 4)}–{num(result.window[1], 4)} K. Lower BIC is better; a difference above 6 is
        strong evidence (Kass and Raftery 1995). Candidates that did not converge, or could not be fitted, are listed last and not ranked.
      </p>
    </div>
  );
}
