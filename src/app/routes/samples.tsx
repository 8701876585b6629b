import { useParams } from "react-router-dom";
import { EmptyState } from "@/components/ui/empty-state";
import { SampleIcon } from "@/components/ui/icons";
import { PageHeader } from "@/components/ui/page-header";
import { useMembership } from "@/features/auth/api";

/** The lab's samples. Until sample entry lands, it says what a sample holds and how the list gets filled. */
export function Component() {
  const { labId } = useParams();
  const membership = useMembership(labId);
  const canWrite = membership?.role === "lead" || membership?.role === "researcher";
  return (
    <>
      <title>{`Samples · ${membership?.labName ?? "Lab"} · Thetafold`}</title>
      <PageHeader
        eyebrow={membership?.labName}
        title="Samples"
        description="Every piece of material the lab measures, with its calorimeter runs, reductions and fits."
      />
      <EmptyState
        illustration={<SampleIcon />}
        title="No samples in this lab yet"
        next={
          canWrite ? (
            <>
              <strong className="font-semibold">Next:</strong> adding samples and uploading runs comes with the next
              release of Thetafold. Keep the calorimeter's export files as they are: they are read as exported, header
              lines and all, and stored unchanged.
            </>
          ) : (
            <>
              <strong className="font-semibold">Next:</strong> researchers and leads of this lab add samples; they appear
              here for you to read as soon as they do.
            </>
          )
        }
      >
        <p>
          A sample records a label, its batch, the formula (from which molar mass and atoms per formula unit follow), the
          mass with its uncertainty, and notes. Its Cp(T) runs, the addenda they were corrected with, and the fitted
          models are kept with it.
        </p>
      </EmptyState>
    </>
  );
}
