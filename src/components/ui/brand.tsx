import { useId } from "react";
import { cn } from "@/lib/cn";

/** The Thetafold mark: a heat-capacity curve rising from cold (frost) to hot (ember) towards its plateau. */
export function BrandMark({ className }: { className?: string }) {
  const gradientId = useId();
  return (
    <svg aria-hidden="true" viewBox="0 0 32 32" className={cn("size-8", className)}>
      <defs>
        <linearGradient id={gradientId} x1="0" x2="1" y1="0" y2="0">
          <stop offset="0" stopColor="var(--color-frost)" />
          <stop offset="1" stopColor="var(--color-ember)" />
        </linearGradient>
      </defs>
      <rect width="32" height="32" rx="8" fill="var(--color-ink)" />
      <path d="M6 9.5h20" stroke="var(--color-canvas)" strokeOpacity="0.35" strokeWidth="1.2" strokeDasharray="2 2" />
      <path d="M6 25c4 0 5-14 20-15" stroke={`url(#${gradientId})`} strokeWidth="3" fill="none" strokeLinecap="round" />
    </svg>
  );
}

export function Wordmark({ className }: { className?: string }) {
  return (
    <span className={cn("inline-flex items-center gap-2 font-semibold tracking-tight text-ink", className)}>
      <BrandMark className="size-7" />
      <span>Thetafold</span>
    </span>
  );
}

/**
 * The reduced Debye curve C/3nR against T/θ_D (0.02 to 1.5), drawn under the Dulong–Petit plateau.
 * Decorative; points precomputed from the Debye integral (Simpson, 400 steps) on a 400 × 240 box.
 */
const DEBYE_PATH =
  "M5.3 239.9 L11.9 238.6 L18.5 234.7 L25.1 227.0 L31.6 215.3 L38.2 200.8 L44.8 185.0 L51.4 169.3 L58.0 154.6 " +
  "L64.5 141.4 L71.1 129.6 L77.7 119.3 L84.3 110.4 L90.8 102.6 L97.4 95.9 L104.0 90.0 L110.6 84.9 L117.2 80.4 " +
  "L123.7 76.5 L130.3 73.1 L136.9 70.0 L143.5 67.3 L150.0 64.9 L156.6 62.8 L163.2 60.8 L169.8 59.1 L176.4 57.5 " +
  "L182.9 56.1 L189.5 54.9 L196.1 53.7 L202.7 52.6 L209.2 51.7 L215.8 50.8 L222.4 49.9 L229.0 49.2 L235.6 48.5 " +
  "L242.1 47.9 L248.7 47.3 L255.3 46.7 L261.9 46.2 L268.4 45.7 L275.0 45.3 L281.6 44.9 L288.2 44.5 L294.8 44.1 " +
  "L301.3 43.8 L307.9 43.5 L314.5 43.1 L321.1 42.9 L327.6 42.6 L334.2 42.3 L340.8 42.1 L347.4 41.9 L354.0 41.7 " +
  "L360.5 41.5 L367.1 41.3 L373.7 41.1 L380.3 40.9 L386.8 40.8 L393.4 40.6 L400.0 40.5";

export function DebyeCurveArt({ className }: { className?: string }) {
  const gradientId = useId();
  return (
    <svg aria-hidden="true" viewBox="-12 0 424 262" className={cn("w-full", className)}>
      <defs>
        <linearGradient id={gradientId} x1="0" x2="1" y1="0" y2="0">
          <stop offset="0" stopColor="var(--color-frost)" />
          <stop offset="0.55" stopColor="var(--color-ember)" />
          <stop offset="1" stopColor="var(--color-ember-strong)" />
        </linearGradient>
      </defs>
      <path d="M0 0V240H400" stroke="var(--color-line-strong)" strokeWidth="1.5" fill="none" />
      <path d="M0 36H400" stroke="var(--color-ink-muted)" strokeWidth="1.2" strokeDasharray="5 5" />
      <text x="398" y="28" textAnchor="end" fill="var(--color-ink-muted)" fontSize="13" fontFamily="var(--font-mono)">
        3nR
      </text>
      <text x="398" y="258" textAnchor="end" fill="var(--color-ink-muted)" fontSize="13" fontFamily="var(--font-mono)">
        T/θ
      </text>
      <path d={DEBYE_PATH} stroke={`url(#${gradientId})`} strokeWidth="3" fill="none" strokeLinecap="round" />
    </svg>
  );
}
