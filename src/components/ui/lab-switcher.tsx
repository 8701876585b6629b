import { useId } from "react";
import type { Membership } from "@shared/schemas/auth";

/** Picks the lab to work in; with one lab it just names it. */
export function LabSwitcher({ memberships, currentLabId, onSelect }: { memberships: Membership[]; currentLabId: string | null; onSelect(labId: string): void }) {
  const id = useId();
  const current = memberships.find((m) => m.labId === currentLabId) ?? memberships[0];
  if (!current) return null;
  const dot = <span aria-hidden="true" className="size-2 shrink-0 rounded-full bg-linear-to-br from-frost to-ember" />;
  if (memberships.length === 1) {
    return (
      <span className="flex min-w-0 items-center gap-2 text-sm font-medium text-ink">
        {dot}
        <span className="truncate">{current.labName}</span>
      </span>
    );
  }
  return (
    <div className="flex min-w-0 items-center gap-2">
      {dot}
      <label htmlFor={id} className="sr-only">
        Lab
      </label>
      <select
        id={id}
        value={current.labId}
        onChange={(event) => onSelect(event.target.value)}
        className="h-8 max-w-56 min-w-0 truncate rounded-md border border-line-strong bg-surface pr-7 pl-2 text-sm font-medium text-ink"
      >
        {memberships.map((m) => (
          <option key={m.labId} value={m.labId}>
            {m.labName}
          </option>
        ))}
      </select>
    </div>
  );
}
