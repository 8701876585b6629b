import type { ReactNode } from "react";
import type { RunSummary } from "@shared/schemas/runs";
import { Badge } from "@/components/ui/badge";

function field(fieldT: number | null): string | null {
  if (fieldT === null) return null;
  return Math.abs(fieldT) < 5e-4 ? "0 T" : `${Number(fieldT.toPrecision(4))} T`;
}

/** A sample's runs, newest first: label (a link to the run page), range, points, field, warnings. */
export function SampleRuns({ runs, renderRunLink }: { runs: readonly RunSummary[]; renderRunLink: (run: RunSummary) => ReactNode }) {
  return (
    <ul className="divide-y divide-line rounded-lg border border-line">
      {runs.map((r) => (
        <li key={r.id} className="flex flex-wrap items-center justify-between gap-3 px-4 py-3">
          <div className="min-w-0 space-y-0.5">
            <p className="font-medium text-ink">{renderRunLink(r)}</p>
            <p className="text-xs text-ink-muted">
              {r.fileName} · uploaded {new Date(r.createdAt).toLocaleString()}
              {r.createdByName ? ` by ${r.createdByName}` : ""}
            </p>
          </div>
          <div className="flex flex-wrap items-center gap-2 text-xs">
            <span className="font-mono text-ink">
              {Number(r.tMinK.toPrecision(3))}–{Number(r.tMaxK.toPrecision(4))} K
            </span>
            <Badge>{r.pointCount} points</Badge>
            {field(r.fieldT) ? <Badge tone="frost">{field(r.fieldT)}</Badge> : null}
            {r.addendaRunId ? <Badge>addenda subtracted</Badge> : null}
            {r.maskedCount > 0 ? <Badge tone="caution">{r.maskedCount} masked</Badge> : null}
            {r.warnings.length > 0 ? <Badge tone="caution">{r.warnings.length} warning{r.warnings.length > 1 ? "s" : ""}</Badge> : null}
          </div>
        </li>
      ))}
    </ul>
  );
}
