import type { ReactNode } from "react";
import { cn } from "@/lib/cn";

export type BadgeTone = "ember" | "frost" | "neutral" | "ok" | "caution";

const TONES: Record<BadgeTone, string> = {
  ember: "bg-ember-soft text-ember-ink border-ember/30",
  frost: "bg-frost-soft text-frost-ink border-frost/30",
  neutral: "bg-sunken text-ink-muted border-line",
  ok: "bg-ok-soft text-ok border-ok/30",
  caution: "bg-caution-soft text-caution border-caution/30",
};

export function Badge({ tone = "neutral", children, className }: { tone?: BadgeTone; children: ReactNode; className?: string }) {
  return (
    <span className={cn("inline-flex items-center rounded-full border px-2 py-0.5 text-xs font-medium", TONES[tone], className)}>
      {children}
    </span>
  );
}
