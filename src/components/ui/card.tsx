import type { ReactNode } from "react";
import { cn } from "@/lib/cn";

/** A raised panel on the canvas. */
export function Card({ children, className }: { children: ReactNode; className?: string }) {
  return <section className={cn("rounded-card border border-line bg-surface shadow-card", className)}>{children}</section>;
}

/** A card's title row; `id` lets the card's section be named by its heading. */
export function CardHeader({ title, description, actions, id }: { title: ReactNode; description?: ReactNode; actions?: ReactNode; id?: string }) {
  return (
    <header className="flex flex-wrap items-start justify-between gap-3 border-b border-line px-5 py-4">
      <div className="min-w-0 space-y-0.5">
        <h2 id={id} className="text-base font-semibold text-ink">
          {title}
        </h2>
        {description && <p className="text-sm text-ink-muted">{description}</p>}
      </div>
      {actions}
    </header>
  );
}

export function CardBody({ children, className }: { children: ReactNode; className?: string }) {
  return <div className={cn("px-5 py-4", className)}>{children}</div>;
}
