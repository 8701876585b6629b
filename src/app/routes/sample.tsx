import { useState } from "react";
import type { QueryClient } from "@tanstack/react-query";
import { isRouteErrorResponse, useNavigate, useParams, useRouteError, type LoaderFunctionArgs } from "react-router-dom";
import { Alert, ErrorNotice } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { EmptyState } from "@/components/ui/empty-state";
import { NotFoundPanel } from "@/components/ui/not-found-panel";
import { PageHeader } from "@/components/ui/page-header";
import { ResearchDataNotice } from "@/components/ui/safety-note";
import { LoadingBlock } from "@/components/ui/spinner";
import { TextLink } from "@/components/ui/text-link";
import { meQueryOptions, useMembership } from "@/features/auth/api";
import { ImportDialog } from "@/features/imports/components/import-dialog";
import { addendaRunsQueryOptions, useAddendaRuns, useInvalidateRuns } from "@/features/runs/api";
import { batchesQueryOptions, sampleQueryOptions, useBatches, useDeleteSample, useInvalidateSamples, useSample } from "@/features/samples/api";
import { SampleFacts } from "@/features/samples/components/sample-facts";
import { SampleForm } from "@/features/samples/components/sample-form";
import { SampleRuns } from "@/features/samples/components/sample-runs";
import { isApiError } from "@/lib/api-client";

export const loader =
  (queryClient: QueryClient) =>
  async ({ params }: LoaderFunctionArgs) => {
    const labId = params.labId ?? "";
    const me = await queryClient.ensureQueryData(meQueryOptions());
    if (!me?.memberships.some((m) => m.labId === labId)) return null;
    await Promise.all([
      queryClient.prefetchQuery(sampleQueryOptions(labId, params.sampleId ?? "")),
      queryClient.prefetchQuery(batchesQueryOptions(labId)),
      queryClient.prefetchQuery(addendaRunsQueryOptions(labId)),
    ]);
    return null;
  };

/** One sample: what reduction uses, its runs, the upload of a new run; edit for researchers, delete for leads. */
export function Component() {
  const { labId = "", sampleId = "" } = useParams();
  const navigate = useNavigate();
  const membership = useMembership(labId);
  const canWrite = membership?.role === "lead" || membership?.role === "researcher";
  const isLead = membership?.role === "lead";
  const sample = useSample(labId, sampleId);
  const batches = useBatches(labId);
  const addenda = useAddendaRuns(labId);
  const invalidateSamples = useInvalidateSamples(labId);
  const invalidateRuns = useInvalidateRuns(labId);
  const remove = useDeleteSample(labId);
  const [editing, setEditing] = useState(false);
  const [uploading, setUploading] = useState(false);
  const [confirmDelete, setConfirmDelete] = useState(false);

  if (sample.isPending) return <LoadingBlock label="Loading the sample…" />;
  if (sample.isError) {
    if (isApiError(sample.error, 404)) return <NotFoundPanel homeHref={`/labs/${labId}/samples`} />;
    return <ErrorNotice error={sample.error} onRetry={() => void sample.refetch()} />;
  }
  const s = sample.data;
  const runHref = (id: string) => `/labs/${labId}/runs/${id}`;

  return (
    <>
      <title>{`${s.label} · Samples · Thetafold`}</title>
      <p className="mb-2 text-sm">
        <TextLink to={`/labs/${labId}/samples`}>← All samples</TextLink>
      </p>
      <PageHeader
        eyebrow={s.batchCode ? `Batch ${s.batchCode}` : "Sample"}
        title={s.label}
        description={<span className="font-mono">{s.formula}</span>}
        actions={
          canWrite ? (
            <>
              <Button variant="secondary" onClick={() => setEditing(!editing)} aria-expanded={editing}>
                {editing ? "Close editing" : "Edit sample"}
              </Button>
              <Button onClick={() => setUploading(true)}>Upload a run</Button>
            </>
          ) : null
        }
      />

      <div className="grid gap-6 lg:grid-cols-[minmax(0,1fr)_24rem]">
        <Card>
          <CardHeader title="Runs" description="Newest first. Open a run for its curves, points and downloads." />
          <CardBody>
            {s.runs.length > 0 ? (
              <SampleRuns runs={s.runs} renderRunLink={(r) => <TextLink to={runHref(r.id)}>{r.label}</TextLink>} />
            ) : (
              <EmptyState
                title="No runs yet"
                next={
                  canWrite ? (
                    <>
                      <strong className="font-semibold">Next:</strong>{" "}
                      <button type="button" className="font-medium text-frost-ink underline" onClick={() => setUploading(true)}>
                        upload the calorimeter’s export
                      </button>{" "}
                      as it came off the instrument. You check the columns and units and see the reduced curve before anything is stored.
                    </>
                  ) : (
                    <>Researchers and leads upload runs; they appear here.</>
                  )
                }
              >
                <p>Each run is a Cp(T) scan of this sample, kept with its raw file and reduced to molar heat capacity.</p>
              </EmptyState>
            )}
          </CardBody>
        </Card>
        <div className="space-y-6">
          <Card>
            <CardHeader title="Sample" />
            <CardBody>
              {editing ? (
                <SampleForm labId={labId} batches={batches.data ?? []} sample={s} onDone={() => setEditing(false)} onCancel={() => setEditing(false)} />
              ) : (
                <SampleFacts sample={s} />
              )}
            </CardBody>
          </Card>
          {isLead ? (
            <Card>
              <CardHeader title="Delete" description="Removes the sample, its runs, their points and fits. Raw files no other run uses are removed too." />
              <CardBody className="space-y-3">
                {remove.isError ? <ErrorNotice error={remove.error} /> : null}
                {confirmDelete ? (
                  <Alert tone="danger" title={`Delete ${s.label} and its ${s.runs.length} run(s)?`}>
                    <div className="mt-2 flex gap-2">
                      <Button
                        variant="danger"
                        size="sm"
                        pending={remove.isPending}
                        onClick={() => remove.mutate(s.id, { onSuccess: () => navigate(`/labs/${labId}/samples`) })}
                      >
                        Delete for good
                      </Button>
                      <Button variant="quiet" size="sm" onClick={() => setConfirmDelete(false)}>
                        Keep it
                      </Button>
                    </div>
                  </Alert>
                ) : (
                  <Button variant="danger" size="sm" onClick={() => setConfirmDelete(true)}>
                    Delete sample…
                  </Button>
                )}
              </CardBody>
            </Card>
          ) : null}
          <ResearchDataNotice />
        </div>
      </div>

      {uploading ? (
        <ImportDialog
          target={{ kind: "sample", labId, sampleId: s.id }}
          title={`Upload a run of ${s.label}`}
          atomsPerFormulaUnit={s.atomsPerFormulaUnit}
          addendaChoices={(addenda.data ?? []).map((a) => ({ id: a.id, label: a.label, platform: a.platform }))}
          onClose={() => setUploading(false)}
          onCommitted={async () => {
            await Promise.all([invalidateSamples(), invalidateRuns()]);
          }}
          runHref={runHref}
          renderLink={(href, children) => <TextLink to={href}>{children}</TextLink>}
        />
      ) : null}
    </>
  );
}

export function ErrorBoundary() {
  const error = useRouteError();
  if (isRouteErrorResponse(error) && error.status === 404) return <NotFoundPanel />;
  return <ErrorNotice title="This page ran into a problem" error={error} onRetry={() => window.location.reload()} />;
}
