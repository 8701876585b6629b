import { useParams } from "react-router-dom";
import { ErrorNotice } from "@/components/ui/alert";
import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { EmptyState } from "@/components/ui/empty-state";
import { BundleIcon } from "@/components/ui/icons";
import { PageHeader } from "@/components/ui/page-header";
import { LoadingBlock } from "@/components/ui/spinner";
import { useMembership } from "@/features/auth/api";
import { useBundles } from "@/features/bundles/api";
import { BuildBundleForm } from "@/features/bundles/components/build-bundle-form";
import { BundleCard } from "@/features/bundles/components/bundle-list";
import { useCompareChoices, useSavedComparisons } from "@/features/compare/api";

/** Dataset bundles: build one from samples or a saved comparison, download it, share it by link. */
export function Component() {
  const { labId = "" } = useParams();
  const membership = useMembership(labId);
  const canWrite = membership?.role === "lead" || membership?.role === "researcher";
  const bundles = useBundles(labId);
  const choices = useCompareChoices(labId);
  const saved = useSavedComparisons(labId);

  return (
    <>
      <title>{`Bundles · ${membership?.labName ?? "Lab"} · Thetafold`}</title>
      <PageHeader
        eyebrow={membership?.labName}
        title="Bundles"
        description="BagIt zips of samples, runs and approved fits that re-compute without Thetafold, for collaborators, co-authors and referees."
      />
      <div className="space-y-6">
        {canWrite && (
          <Card>
            <CardHeader
              title="Build a bundle"
              description="Raw files as uploaded, reduced tables, each fit as JSON, datapackage.json and a README of methods and equations."
            />
            <CardBody>
              {choices.isPending || saved.isPending ? (
                <LoadingBlock label="Loading samples and saved comparisons…" />
              ) : choices.isError ? (
                <ErrorNotice error={choices.error} onRetry={() => choices.refetch()} />
              ) : (
                <BuildBundleForm labId={labId} samples={choices.data.samples} batches={choices.data.batches} comparisons={saved.data ?? []} />
              )}
            </CardBody>
          </Card>
        )}
        {bundles.isPending ? (
          <LoadingBlock label="Loading bundles…" />
        ) : bundles.isError ? (
          <ErrorNotice error={bundles.error} onRetry={() => bundles.refetch()} />
        ) : bundles.data.length === 0 ? (
          <EmptyState
            illustration={<BundleIcon />}
            title="No bundles yet"
            next={
              <>
                <strong className="font-semibold">Next:</strong>{" "}
                {canWrite
                  ? "tick the samples above (or pick a saved comparison), name the bundle and build it. Bundles quote approved fits only, so approve the fits you want to share first."
                  : "researchers and leads of this lab build bundles; you can download every bundle they build here."}
              </>
            }
          >
            <p>
              A bundle is a BagIt zip (RFC 8493) whose manifest lists the SHA-256 of every file, so whoever receives it can check it
              arrived whole. A share link lets someone without an account download it until it expires or is revoked.
            </p>
          </EmptyState>
        ) : (
          <section aria-label="Bundles of this lab" className="space-y-4">
            {bundles.data.map((b) => (
              <BundleCard key={b.id} labId={labId} bundle={b} canShare={canWrite} />
            ))}
          </section>
        )}
      </div>
    </>
  );
}
