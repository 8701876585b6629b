import type { ReactNode } from "react";

interface EmptyStateProps {
  title: ReactNode;
  /** What will be here once there is something. */
  children: ReactNode;
  /** What to do next, in a sentence or two (and a button when the action exists). */
  next?: ReactNode;
  illustration?: ReactNode;
}

/** A page or section with nothing in it yet: what belongs here and how it gets filled. */
export function EmptyState({ title, children, next, illustration }: EmptyStateProps) {
  return (
    <div className="rounded-card border border-dashed border-line-strong bg-surface/60 px-6 py-10 sm:px-10">
      <div className="mx-auto flex max-w-xl flex-col items-center gap-4 text-center">
        {illustration}
        <h2 className="text-lg font-semibold text-ink">{title}</h2>
        <div className="space-y-2 text-sm text-ink-muted">{children}</div>
        {next && <div className="w-full rounded-lg bg-sunken px-4 py-3 text-left text-sm text-ink">{next}</div>}
      </div>
    </div>
  );
}
