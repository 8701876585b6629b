import type { FitState, FitSummary } from "@shared/schemas/fits";
import { Badge, type BadgeTone } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { MeasuredValue } from "@/components/ui/measured-value";
import { modelLabel } from "../utils";

const STATE_BADGE: Record<FitState, { tone: BadgeTone; text: string }> = {
  draft: { tone: "neutral", text: "draft" },
  approved: { tone: "ok", text: "approved" },
  superseded: { tone: "caution", text: "superseded" },
};

const when = (iso: string) => new Date(iso).toLocaleString(undefined, { dateStyle: "medium", timeStyle: "short" });

interface FitHistoryProps {
  fits: readonly FitSummary[];
  /** Leads see an Approve button on drafts. */
  canApprove: boolean;
  onApprove: (fitId: string) => void;
  approvingId: string | null;
  onOpen: (fit: FitSummary) => void;
  openId?: string | null;
}

/** Every fit of the run, newest first, with its state; nothing here is ever overwritten. */
export function FitHistory({ fits, canApprove, onApprove, approvingId, onOpen, openId }: FitHistoryProps) {
  return (
    <ol className="divide-y divide-line" aria-label="Fits of this run, newest first">
      {fits.map((f) => {
        const badge = STATE_BADGE[f.state];
        const thetaD = f.parameters.find((p) => p.name === "thetaD");
        const gamma = f.parameters.find((p) => p.name === "gamma");
        return (
          <li key={f.id} className={`flex flex-wrap items-center gap-x-3 gap-y-1 py-2 ${openId === f.id ? "bg-sunken" : ""}`} data-fit-id={f.id}>
            <Badge tone={badge.tone}>{badge.text}</Badge>
            {!f.converged ? <Badge tone="caution">not converged</Badge> : null}
            <span className="font-medium">{modelLabel(f.model)}</span>
            <span className="font-mono text-xs text-ink-muted">
              {Number(f.window[0].toPrecision(4))}–{Number(f.window[1].toPrecision(4))} K · BIC {Number(f.bic.toPrecision(6))}
            </span>
            {thetaD ? (
              <span className="text-sm">
                θ_D <MeasuredValue value={thetaD.value} sigma={thetaD.stderr ?? undefined} unit="K" />
              </span>
            ) : null}
            {gamma ? (
              <span className="text-sm">
                γ <MeasuredValue value={gamma.value * 1000} sigma={gamma.stderr === null ? undefined : gamma.stderr * 1000} unit="mJ/(mol·K²)" />
              </span>
            ) : null}
            <span className="w-full text-xs text-ink-muted">
              saved by {f.createdBy?.displayName ?? "a former member"} on {when(f.createdAt)}
              {f.approvedAt ? ` · approved by ${f.approvedBy?.displayName ?? "a former member"} on ${when(f.approvedAt)}` : ""}
              {f.supersededAt ? ` · superseded on ${when(f.supersededAt)}` : ""}
              {f.notes ? ` · “${f.notes}”` : ""}
            </span>
            <span className="flex w-full gap-2">
              <Button size="sm" variant="secondary" onClick={() => onOpen(f)}>
                Open
              </Button>
              {canApprove && f.state === "draft" ? (
                <Button size="sm" onClick={() => onApprove(f.id)} pending={approvingId === f.id} disabled={!f.converged} title={f.converged ? undefined : "A fit that did not converge cannot be approved"}>
                  Approve
                </Button>
              ) : null}
            </span>
          </li>
        );
      })}
    </ol>
  );
}
