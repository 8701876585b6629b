import type { ComparisonResult } from "@shared/schemas/compare";
import { Badge } from "@/components/ui/badge";
import { MeasuredValue } from "@/components/ui/measured-value";
import { cn } from "@/lib/cn";
import { parameterSymbol, shortNumber, sigmaText, windowText } from "../utils";

const TH = "px-3 py-2 text-left text-xs font-semibold tracking-wide text-ink-muted uppercase";
const TD = "px-3 py-2 align-top";

/** Per-group statistics: weighted mean ± σ, χ²_red, plain mean, spread, n and flags. */
export function GroupStatsTable({ result }: { result: ComparisonResult }) {
  const unit = result.unit ?? "";
  const sym = parameterSymbol(result.parameter);
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-sm text-ink" aria-label={`${sym} per ${result.groupBy === "batch" ? "batch" : "composition"}`}>
        <thead className="border-b border-line">
          <tr>
            <th scope="col" className={TH}>
              {result.groupBy === "batch" ? "Batch" : "Composition"}
            </th>
            <th scope="col" className={TH}>
              n
            </th>
            <th scope="col" className={TH}>
              Weighted mean
            </th>
            <th scope="col" className={TH} title="χ² of the rows about the weighted mean over n − 1">
              χ²/(n−1)
            </th>
            <th scope="col" className={TH} title="Plain mean, with the standard deviation of the mean s/√n">
              Unweighted mean
            </th>
            <th scope="col" className={TH} title="Sample standard deviation s (n − 1)">
              Spread s
            </th>
            <th scope="col" className={TH}>
              Flagged
            </th>
          </tr>
        </thead>
        <tbody className="divide-y divide-line">
          {result.groups.map((g) => (
            <tr key={g.key}>
              <th scope="row" className={cn(TD, "text-left font-medium")}>
                {g.label}
                {(g.modelsDiffer || g.windowsDiffer) && (
                  <Badge tone="caution" className="ml-2">
                    not comparable as such
                  </Badge>
                )}
              </th>
              <td className={cn(TD, "font-mono")}>{g.n}</td>
              <td className={TD}>
                {g.weightedMean != null ? <MeasuredValue value={g.weightedMean} sigma={g.weightedSigma ?? undefined} unit={unit} /> : <span className="text-ink-muted">no σ</span>}
              </td>
              <td className={cn(TD, "font-mono")}>{g.reducedChiSquare != null ? shortNumber(g.reducedChiSquare) : "–"}</td>
              <td className={TD}>
                <MeasuredValue value={g.unweightedMean} sigma={g.standardError ?? undefined} unit={unit} />
              </td>
              <td className={cn(TD, "font-mono whitespace-nowrap")}>{g.spread != null ? sigmaText(g.spread, unit) : <span className="text-ink-muted">–</span>}</td>
              <td className={cn(TD, "font-mono")}>{g.flaggedCount > 0 ? <span className="font-semibold text-danger">{g.flaggedCount}</span> : "0"}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/** One row per approved fit: value with statistical σ, systematic σ apart, model and window, flag. */
export function CompareRowsTable({ result }: { result: ComparisonResult }) {
  const groups = new Map(result.groups.map((g) => [g.key, g]));
  const sym = parameterSymbol(result.parameter);
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-sm text-ink" aria-label={`${sym} of each approved fit`}>
        <thead className="border-b border-line">
          <tr>
            <th scope="col" className={TH}>
              Sample
            </th>
            <th scope="col" className={TH}>
              {result.groupBy === "batch" ? "Batch" : "x"}
            </th>
            <th scope="col" className={TH}>
              Run
            </th>
            <th scope="col" className={TH}>
              {sym} ± statistical σ
            </th>
            <th scope="col" className={TH}>
              Systematic σ (mass)
            </th>
            <th scope="col" className={TH}>
              From mean
            </th>
            <th scope="col" className={TH}>
              Model
            </th>
            <th scope="col" className={TH}>
              Window
            </th>
          </tr>
        </thead>
        <tbody className="divide-y divide-line">
          {result.rows.map((r) => (
            <tr key={r.fitId} className={cn(r.flagged && "bg-danger-soft")} data-flagged={r.flagged || undefined}>
              <th scope="row" className={cn(TD, "text-left font-medium")}>
                {r.sampleLabel}
                {r.flagged && (
                  <span className="ml-2 inline-flex items-center gap-1 text-xs font-semibold text-danger">
                    <span aria-hidden="true">▲</span> more than {result.thresholdSigma}σ from {groups.get(r.groupKey)?.label ?? "its group"}
                  </span>
                )}
              </th>
              <td className={TD}>{result.groupBy === "batch" ? (r.batchCode ?? "–") : r.x != null ? `${r.xName || "x"} = ${r.x}` : "–"}</td>
              <td className={cn(TD, "text-ink-muted")}>{r.runLabel}</td>
              <td className={TD}>
                <MeasuredValue value={r.value} sigma={r.sigmaStat ?? undefined} unit={r.unit} />
                {r.derivedFrom && <span className="ml-1 text-xs text-ink-muted">(from β)</span>}
              </td>
              <td className={cn(TD, "font-mono whitespace-nowrap")}>{r.sigmaSys != null ? sigmaText(r.sigmaSys, r.unit) : <span className="text-ink-muted">–</span>}</td>
              <td className={cn(TD, "font-mono")}>{r.deviationSigma != null ? `${shortNumber(r.deviationSigma)}σ` : "–"}</td>
              <td className={TD}>{r.model}</td>
              <td className={cn(TD, "font-mono whitespace-nowrap")}>{windowText(r.windowMinK, r.windowMaxK)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="mt-2 px-3 text-xs text-ink-muted">
        Each row weighs 1/σ² in its group with σ = statistical ⊕ systematic (the mass error of one sample is independent of
        the next). “From mean” is |value − weighted mean| in that σ; beyond {result.thresholdSigma}σ a row is flagged.
      </p>
    </div>
  );
}
