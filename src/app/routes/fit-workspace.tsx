import type { QueryClient } from "@tanstack/react-query";
import { isRouteErrorResponse, useParams, useRouteError, type LoaderFunctionArgs } from "react-router-dom";
import { ErrorNotice } from "@/components/ui/alert";
import { EmptyState } from "@/components/ui/empty-state";
import { NotFoundPanel } from "@/components/ui/not-found-panel";
import { PageHeader } from "@/components/ui/page-header";
import { LoadingBlock } from "@/components/ui/spinner";
import { TextLink } from "@/components/ui/text-link";
import { isApiError } from "@/lib/api-client";
import { useMembership } from "@/features/auth/api";
import { fitHistoryQueryOptions } from "@/features/fits/api";
import { FitWorkspace } from "@/features/fits/components/fit-workspace";
import { runQueryOptions, useRun } from "@/features/runs/api";

/** Starts loading the run and its fits while the page module itself loads. */
export const loader =
  (queryClient: QueryClient) =>
  async ({ params }: LoaderFunctionArgs) => {
    const labId = params.labId ?? "";
    const runId = params.runId ?? "";
    void queryClient.prefetchQuery(fitHistoryQueryOptions(labId, runId));
    await queryClient.prefetchQuery(runQueryOptions(labId, runId));
    return null;
  };

/** The fit workspace of one run: window, model, fit, judge, save; leads approve. */
export function Component() {
  const { labId = "", runId = "" } = useParams();
  const membership = useMembership(labId);
  const run = useRun(labId, runId);
  const canWrite = membership?.role === "lead" || membership?.role === "researcher";
  const canApprove = membership?.role === "lead";

  if (run.isPending) return <LoadingBlock label="Loading the run" />;
  if (run.error) {
    if (isApiError(run.error, 404)) return <NotFoundPanel />;
    return <ErrorNotice title="The run could not be loaded" error={run.error} onRetry={() => run.refetch()} />;
  }
  const r = run.data;
  const sampleLabel = r.sample?.label ?? r.platform;
  const title = `Fit · ${sampleLabel}${r.label ? ` — ${r.label}` : ""}`;
  const n = r.atomsPerFormulaUnit ?? Number.NaN;
  return (
    <>
      <title>{`${title} · ${membership?.labName ?? "Lab"} · Thetafold`}</title>
      <PageHeader
        eyebrow={membership?.labName}
        title={title}
        description={
          <>
            {r.sample ? `${r.sample.formula}, n = ${Number.isFinite(n) ? n : "?"} atoms per formula unit · ` : ""}
            {r.pointCount} points, {Number(r.tMinK.toPrecision(4))}–{Number(r.tMaxK.toPrecision(4))} K
            {r.fieldT !== null ? ` · ${Number(r.fieldT.toPrecision(3))} T` : ""} ·{" "}
            <TextLink to={`/labs/${encodeURIComponent(labId)}/runs/${encodeURIComponent(runId)}`}>back to the run</TextLink>
          </>
        }
      />
      {r.kind !== "sample" ? (
        <EmptyState title="Addenda runs are not fitted">
          <p>This is the heat capacity of a platform and its grease, in J/K. It is subtracted from sample runs; fit those instead.</p>
        </EmptyState>
      ) : !Number.isFinite(n) ? (
        <EmptyState title="The atom count is missing">
          <p>Set the sample's formula or its atoms per formula unit, then come back: the Dulong–Petit limit and θ_D need it.</p>
        </EmptyState>
      ) : (
        <FitWorkspace
          labId={labId}
          run={{
            id: r.id,
            label: r.label,
            atomsPerFormulaUnit: n,
            points: r.points.map((p) => ({ temperatureK: p.temperatureK, cp: p.cp, sigma: p.cpSigma, masked: p.masked })),
          }}
          canWrite={canWrite}
          canApprove={canApprove}
        />
      )}
    </>
  );
}

export function ErrorBoundary() {
  const error = useRouteError();
  if (isRouteErrorResponse(error) && error.status === 404) return <NotFoundPanel />;
  return <ErrorNotice title="The fit workspace ran into a problem" error={error} onRetry={() => window.location.reload()} />;
}
