import { useParams } from "react-router-dom";
import { EmptyState } from "@/components/ui/empty-state";
import { BundleIcon } from "@/components/ui/icons";
import { PageHeader } from "@/components/ui/page-header";
import { useMembership } from "@/features/auth/api";

/** Dataset bundles and their share links. Empty until bundles can be built. */
export function Component() {
  const { labId } = useParams();
  const membership = useMembership(labId);
  return (
    <>
      <title>{`Bundles · ${membership?.labName ?? "Lab"} · Thetafold`}</title>
      <PageHeader
        eyebrow={membership?.labName}
        title="Bundles"
        description="Packages of samples, runs and fits for collaborators, co-authors and referees."
      />
      <EmptyState
        illustration={<BundleIcon />}
        title="No bundles yet"
        next={
          <>
            <strong className="font-semibold">Next:</strong> bundles quote approved fits, so approve the fits you want to
            share first. A share link can then be sent by e-mail, limited in time and withdrawn at any moment.
          </>
        }
      >
        <p>
          A bundle is a BagIt zip that recomputes without Thetafold: the raw files exactly as uploaded, reduced tables as
          CSV, each fit as JSON with its model, window, parameters and covariance, a datapackage.json describing the
          tables, and a README of methods, units and equations.
        </p>
      </EmptyState>
    </>
  );
}
