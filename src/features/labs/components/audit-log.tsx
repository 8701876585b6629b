import type { AuditEntry } from "@shared/schemas/labs";
import { formatDateTime } from "../utils";

/** "member.role_changed" → "member role changed": the server's action names, made readable without renaming them. */
function readableAction(action: string): string {
  return action.replace(/[._-]+/g, " ").trim();
}

function detailsText(details: AuditEntry["details"]): string {
  if (!details) return "";
  return Object.entries(details)
    .map(([key, value]) => `${key}: ${typeof value === "string" ? value : JSON.stringify(value)}`)
    .join(" · ");
}

/** Who changed what in the lab, newest first. */
export function AuditLog({ entries }: { entries: AuditEntry[] }) {
  if (entries.length === 0) {
    return <p className="px-5 py-4 text-sm text-ink-muted">Nothing recorded yet. Invitations, role changes and removals are logged here.</p>;
  }
  const sorted = [...entries].sort((a, b) => b.createdAt.localeCompare(a.createdAt));
  return (
    // Focusable so the scrolled list can be read with the arrow keys (WCAG 2.1.1).
    <div className="max-h-96 overflow-auto" tabIndex={0} role="region" aria-label="Audit log entries">
      <table className="w-full text-left text-sm">
        <caption className="sr-only">Audit log of this lab</caption>
        <thead className="sticky top-0 bg-sunken text-xs tracking-wide text-ink-muted uppercase">
          <tr>
            <th scope="col" className="px-5 py-2 font-medium">
              When
            </th>
            <th scope="col" className="px-3 py-2 font-medium">
              Who
            </th>
            <th scope="col" className="px-3 py-2 font-medium">
              What
            </th>
            <th scope="col" className="px-5 py-2 font-medium">
              Concerning
            </th>
          </tr>
        </thead>
        <tbody className="divide-y divide-line">
          {sorted.map((entry) => (
            <tr key={entry.id} className="align-top">
              <td className="px-5 py-2 font-mono text-xs whitespace-nowrap text-ink-muted">{formatDateTime(entry.createdAt)}</td>
              <td className="px-3 py-2 text-ink">{entry.userEmail ?? "system"}</td>
              <td className="px-3 py-2 text-ink">{readableAction(entry.action)}</td>
              <td className="px-5 py-2 text-ink-muted">
                <span className="text-ink">{entry.target}</span>
                {entry.details && <span className="block text-xs">{detailsText(entry.details)}</span>}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
