import type { ReactNode } from "react";

/** The title block at the top of a page; the h1 takes focus after navigation so keyboard users start there. */
export function PageHeader({ title, description, actions, eyebrow }: { title: ReactNode; description?: ReactNode; actions?: ReactNode; eyebrow?: ReactNode }) {
  return (
    <div className="mb-6 flex flex-wrap items-end justify-between gap-4">
      <div className="min-w-0 space-y-1">
        {eyebrow && <p className="text-xs font-semibold tracking-wide text-ember-ink uppercase">{eyebrow}</p>}
        <h1 tabIndex={-1} data-page-title className="text-2xl font-semibold tracking-tight text-ink focus:outline-none">
          {title}
        </h1>
        {description && <p className="max-w-2xl text-sm text-ink-muted">{description}</p>}
      </div>
      {actions && <div className="flex items-center gap-2">{actions}</div>}
    </div>
  );
}
