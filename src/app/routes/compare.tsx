import { useParams } from "react-router-dom";
import { EmptyState } from "@/components/ui/empty-state";
import { CompareIcon } from "@/components/ui/icons";
import { MeasuredValue } from "@/components/ui/measured-value";
import { PageHeader } from "@/components/ui/page-header";
import { useMembership } from "@/features/auth/api";

/** Approved fits side by side, by batch or composition. Empty until fits can be approved. */
export function Component() {
  const { labId } = useParams();
  const membership = useMembership(labId);
  return (
    <>
      <title>{`Compare · ${membership?.labName ?? "Lab"} · Thetafold`}</title>
      <PageHeader
        eyebrow={membership?.labName}
        title="Compare"
        description="Characteristic temperatures and coefficients of approved fits, batch against batch."
      />
      <EmptyState
        illustration={<CompareIcon />}
        title="Nothing to compare yet"
        next={
          <>
            <strong className="font-semibold">Next:</strong> fits start as drafts. Once a lead approves them they are
            gathered here; only approved fits are quoted.
          </>
        }
      >
        <p>
          This page will put the Debye and Einstein temperatures, γ and β of each batch in one table and one chart with
          error bars, give a weighted mean per batch, flag runs far from their batch, and overlay C/3nR against T/θ_D of
          the chosen runs on the universal Debye curve.
        </p>
        <p>
          Values are written in the notation you picked in the account menu, for example{" "}
          <MeasuredValue value={342.81} sigma={1.234} unit="K" /> (an illustration, not a result).
        </p>
      </EmptyState>
    </>
  );
}
