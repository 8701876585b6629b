import type { Role } from "@shared/schemas/auth";

export const ROLE_LABELS: Record<Role, string> = { lead: "Lead", researcher: "Researcher", guest: "Guest" };

/** What each role may do, in the words of the role table (for hints beside role pickers). */
export const ROLE_SUMMARIES: Record<Role, string> = {
  lead: "everything in the lab: members, roles, approving fits, deleting",
  researcher: "creates samples, uploads runs, fits and builds bundles",
  guest: "reads samples, runs, fits and comparisons and downloads bundles; changes nothing",
};

export const ROLE_OPTIONS = (["lead", "researcher", "guest"] as const).map((role) => ({ value: role, label: ROLE_LABELS[role] }));

const dateFormat = new Intl.DateTimeFormat(undefined, { dateStyle: "medium" });
const dateTimeFormat = new Intl.DateTimeFormat(undefined, { dateStyle: "medium", timeStyle: "short" });

export function formatDate(iso: string): string {
  const date = new Date(iso);
  return Number.isNaN(date.getTime()) ? iso : dateFormat.format(date);
}

export function formatDateTime(iso: string): string {
  const date = new Date(iso);
  return Number.isNaN(date.getTime()) ? iso : dateTimeFormat.format(date);
}
