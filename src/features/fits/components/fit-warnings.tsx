import type { FitWarning } from "@shared/schemas/fits";
import { Alert } from "@/components/ui/alert";

/** The engine's plain-word warnings about a fit, or a quiet line saying there are none. */
export function FitWarnings({ warnings, converged, stopReason }: { warnings: readonly FitWarning[]; converged: boolean; stopReason: string }) {
  if (converged && warnings.length === 0) {
    return (
      <p role="status" className="text-sm text-ok">
        Converged ({stopReason}); no warnings.
      </p>
    );
  }
  return (
    <Alert tone="caution" title={converged ? "Read these before you save" : "This fit did not converge"} role="status">
      <ul className="list-disc space-y-1 pl-4">
        {!converged && !warnings.some((w) => w.includes("did not converge")) ? (
          <li>The fitter stopped without converging: {stopReason}. Try other start values, a narrower window or fewer free parameters.</li>
        ) : null}
        {warnings.map((w, i) => (
          <li key={i}>{w}</li>
        ))}
      </ul>
    </Alert>
  );
}
