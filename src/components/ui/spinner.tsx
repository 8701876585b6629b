import { cn } from "@/lib/cn";

/** A small turning arc; decorative, so callers say in words what is happening. */
export function Spinner({ size = "md", className }: { size?: "sm" | "md"; className?: string }) {
  return (
    <svg
      aria-hidden="true"
      viewBox="0 0 24 24"
      className={cn("animate-spin", size === "sm" ? "size-4" : "size-5", className)}
      fill="none"
    >
      <circle cx="12" cy="12" r="9" stroke="currentColor" strokeOpacity="0.25" strokeWidth="3" />
      <path d="M21 12a9 9 0 0 0-9-9" stroke="currentColor" strokeWidth="3" strokeLinecap="round" />
    </svg>
  );
}

/** A quiet placeholder with a spoken label while a section loads. */
export function LoadingBlock({ label }: { label: string }) {
  return (
    <div role="status" className="flex items-center gap-2 py-6 text-sm text-ink-muted">
      <Spinner size="sm" />
      <span>{label}</span>
    </div>
  );
}
