import type { ReactNode } from "react";
import { cn } from "@/lib/cn";
import { Button } from "./button";

export type AlertTone = "danger" | "ok" | "info" | "caution";

const TONES: Record<AlertTone, string> = {
  danger: "border-danger/40 bg-danger-soft text-ink [&_[data-accent]]:bg-danger",
  ok: "border-ok/40 bg-ok-soft text-ink [&_[data-accent]]:bg-ok",
  info: "border-frost/40 bg-frost-soft text-ink [&_[data-accent]]:bg-frost",
  caution: "border-caution/40 bg-caution-soft text-ink [&_[data-accent]]:bg-caution",
};

interface AlertProps {
  tone: AlertTone;
  title?: ReactNode;
  children?: ReactNode;
  action?: ReactNode;
  className?: string;
  /** "alert" interrupts the screen reader (errors after a submit); "status" waits its turn (confirmations). */
  role?: "alert" | "status" | "note";
}

/** A framed message with a coloured edge; the words carry the meaning, the colour only repeats it. */
export function Alert({ tone, title, children, action, className, role }: AlertProps) {
  return (
    <div
      role={role ?? (tone === "danger" ? "alert" : "status")}
      className={cn("relative flex gap-3 overflow-hidden rounded-lg border py-3 pr-3 pl-4 text-sm", TONES[tone], className)}
    >
      <span data-accent aria-hidden="true" className="absolute inset-y-0 left-0 w-1" />
      <div className="min-w-0 flex-1 space-y-1">
        {title && <p className="font-semibold">{title}</p>}
        {children && <div className="text-ink">{children}</div>}
      </div>
      {action && <div className="shrink-0 self-center">{action}</div>}
    </div>
  );
}

/** A failed read or write, said inline, with a retry when one makes sense. */
export function ErrorNotice({ error, onRetry, title }: { error: unknown; onRetry?: () => void; title?: string }) {
  const message = error instanceof Error ? error.message : "Something went wrong.";
  return (
    <Alert
      tone="danger"
      title={title}
      action={
        onRetry && (
          <Button variant="secondary" size="sm" onClick={onRetry}>
            Try again
          </Button>
        )
      }
    >
      {message}
    </Alert>
  );
}
