import { useId, useState } from "react";
import type { RunPoint } from "@shared/schemas/runs";
import { Button } from "@/components/ui/button";
import { cn } from "@/lib/cn";
import { formatCell } from "../utils";

const PAGE_SIZE = 100;

interface PointTableProps {
  points: readonly RunPoint[];
  cpUnit: "J/(mol*K)" | "J/K";
  /** Researchers and leads may mask; guests see the flags only. */
  canEdit: boolean;
  onMask: (indices: number[], masked: boolean) => void;
  pending?: boolean;
}

/**
 * Every point of the run, 100 to a page, each with a mask switch (a checkbox: Space toggles it). Masking sets a
 * point aside for fits and views without deleting it; unmask to bring it back.
 */
export function PointTable({ points, cpUnit, canEdit, onMask, pending = false }: PointTableProps) {
  const [page, setPage] = useState(0);
  const [onlyMasked, setOnlyMasked] = useState(false);
  const [rangeFrom, setRangeFrom] = useState("");
  const [rangeTo, setRangeTo] = useState("");
  const filterId = useId();
  const rows = onlyMasked ? points.filter((p) => p.masked) : points;
  const pages = Math.max(1, Math.ceil(rows.length / PAGE_SIZE));
  const current = Math.min(page, pages - 1);
  const shown = rows.slice(current * PAGE_SIZE, (current + 1) * PAGE_SIZE);
  const perAtom = cpUnit !== "J/K";
  const unit = cpUnit === "J/K" ? "J/K" : "J/(mol·K)";

  const rangeIndices = (): number[] | null => {
    const lo = Number(rangeFrom);
    const hi = Number(rangeTo === "" ? rangeFrom : rangeTo);
    if (!Number.isFinite(lo) || !Number.isFinite(hi) || rangeFrom === "") return null;
    const [a, b] = lo <= hi ? [lo, hi] : [hi, lo];
    const inRange = points.filter((p) => p.temperatureK >= a && p.temperatureK <= b).map((p) => p.index);
    return inRange.length > 0 ? inRange : null;
  };
  const chosen = rangeIndices();

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-end gap-3">
        <label htmlFor={filterId} className="flex items-center gap-2 text-sm text-ink">
          <input id={filterId} type="checkbox" checked={onlyMasked} onChange={(e) => { setOnlyMasked(e.target.checked); setPage(0); }} />
          Show masked points only
        </label>
        {canEdit ? (
          <form
            className="flex flex-wrap items-end gap-2"
            aria-label="Mask or unmask a temperature range"
            onSubmit={(e) => e.preventDefault()}
          >
            <label className="text-sm text-ink">
              <span className="block text-xs text-ink-muted">From T (K)</span>
              <input className="h-8 w-24 rounded-md border border-line-strong bg-surface px-2 font-mono text-sm" inputMode="decimal" value={rangeFrom} onChange={(e) => setRangeFrom(e.target.value)} />
            </label>
            <label className="text-sm text-ink">
              <span className="block text-xs text-ink-muted">to T (K)</span>
              <input className="h-8 w-24 rounded-md border border-line-strong bg-surface px-2 font-mono text-sm" inputMode="decimal" value={rangeTo} onChange={(e) => setRangeTo(e.target.value)} />
            </label>
            <Button size="sm" variant="secondary" disabled={!chosen || pending} onClick={() => chosen && onMask(chosen, true)}>
              Mask {chosen ? chosen.length : ""} in range
            </Button>
            <Button size="sm" variant="quiet" disabled={!chosen || pending} onClick={() => chosen && onMask(chosen, false)}>
              Unmask range
            </Button>
          </form>
        ) : null}
      </div>
      <div className="overflow-x-auto rounded-lg border border-line">
        <table className="w-full text-sm">
          <caption className="sr-only">Reduced points of the run, in temperature order</caption>
          <thead className="bg-sunken text-left text-xs text-ink-muted">
            <tr>
              <th scope="col" className="px-3 py-2">#</th>
              <th scope="col" className="px-3 py-2">T (K)</th>
              <th scope="col" className="px-3 py-2">{cpUnit === "J/K" ? "C" : "Cp"} ({unit})</th>
              <th scope="col" className="px-3 py-2">σ ({unit})</th>
              {perAtom ? <th scope="col" className="px-3 py-2">per mole of atoms</th> : null}
              <th scope="col" className="px-3 py-2">file line</th>
              <th scope="col" className="px-3 py-2">rows averaged</th>
              <th scope="col" className="px-3 py-2">masked</th>
            </tr>
          </thead>
          <tbody>
            {shown.map((p) => (
              <tr key={p.index} className={cn("border-t border-line font-mono", p.masked && "bg-danger-soft/60 text-ink-muted")}>
                <td className="px-3 py-1.5">{p.index}</td>
                <td className="px-3 py-1.5">{formatCell(p.temperatureK)}</td>
                <td className={cn("px-3 py-1.5", p.masked && "line-through decoration-danger/60")}>{formatCell(p.cp)}</td>
                <td className="px-3 py-1.5">{formatCell(p.cpSigma)}</td>
                {perAtom ? <td className="px-3 py-1.5">{formatCell(p.cpPerAtom)}</td> : null}
                <td className="px-3 py-1.5">{p.sourceLine}</td>
                <td className="px-3 py-1.5">{p.rowsAveraged}</td>
                <td className="px-3 py-1.5">
                  <input
                    type="checkbox"
                    checked={p.masked}
                    disabled={!canEdit || pending}
                    aria-label={`Mask point ${p.index} at ${formatCell(p.temperatureK)} K`}
                    onChange={(e) => onMask([p.index], e.target.checked)}
                  />
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {rows.length === 0 ? <p className="text-sm text-ink-muted">No masked points. Tick a point’s box to set it aside.</p> : null}
      {pages > 1 ? (
        <nav aria-label="Pages of points" className="flex items-center gap-2 text-sm">
          <Button size="sm" variant="secondary" disabled={current === 0} onClick={() => setPage(current - 1)}>
            Previous
          </Button>
          <span className="text-ink-muted">
            Page {current + 1} of {pages} ({rows.length} points)
          </span>
          <Button size="sm" variant="secondary" disabled={current >= pages - 1} onClick={() => setPage(current + 1)}>
            Next
          </Button>
        </nav>
      ) : null}
    </div>
  );
}
