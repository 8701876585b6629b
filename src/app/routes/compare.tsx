import { useSearchParams, useParams } from "react-router-dom";
import type { Comparison, CompareGroupBy } from "@shared/schemas/compare";
import { Alert, ErrorNotice } from "@/components/ui/alert";
import { buttonClasses } from "@/components/ui/button";
import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { EmptyState } from "@/components/ui/empty-state";
import { CompareIcon } from "@/components/ui/icons";
import { PageHeader } from "@/components/ui/page-header";
import { LoadingBlock } from "@/components/ui/spinner";
import { useMembership } from "@/features/auth/api";
import {
  compareCsvUrl,
  useCompareChoices,
  useCompareCurves,
  useComparison,
  useSavedComparisons,
  type CompareSelection,
} from "@/features/compare/api";
import { CollapseChart, CT3Chart, ParameterChart } from "@/features/compare/components/compare-charts";
import { CompareControls } from "@/features/compare/components/compare-controls";
import { CompareRowsTable, GroupStatsTable } from "@/features/compare/components/compare-tables";
import { SaveComparisonForm } from "@/features/compare/components/save-comparison-form";
import { idList, parameterLabel } from "@/features/compare/utils";

function selectionFrom(params: URLSearchParams): CompareSelection {
  const groupBy: CompareGroupBy = params.get("groupBy") === "x" ? "x" : "batch";
  return {
    parameter: params.get("parameter") || "thetaD",
    groupBy,
    batchIds: idList(params.get("batchIds")),
    sampleIds: idList(params.get("sampleIds")),
  };
}

/** Approved fits side by side: the chosen parameter by batch or along x, with weighted means, flags and the collapse plot. */
export function Component() {
  const { labId = "" } = useParams();
  const membership = useMembership(labId);
  const canWrite = membership?.role === "lead" || membership?.role === "researcher";
  const [params, setParams] = useSearchParams();
  const selection = selectionFrom(params);
  const savedId = params.get("saved");

  const choices = useCompareChoices(labId);
  const saved = useSavedComparisons(labId);
  const result = useComparison(labId, selection);
  const hasRows = (result.data?.rows.length ?? 0) > 0;
  const curves = useCompareCurves(labId, selection, hasRows);

  const update = (next: CompareSelection, saved: string | null = null) => {
    const q = new URLSearchParams({ parameter: next.parameter, groupBy: next.groupBy });
    if (next.batchIds.length) q.set("batchIds", next.batchIds.join(","));
    if (next.sampleIds.length) q.set("sampleIds", next.sampleIds.join(","));
    if (saved) q.set("saved", saved);
    setParams(q, { replace: true });
  };
  const loadSaved = (c: Comparison | null) => {
    if (!c) update(selection);
    else update({ parameter: c.parameter, groupBy: c.groupBy, batchIds: c.selection.batchIds, sampleIds: c.selection.sampleIds }, c.id);
  };

  const r = result.data;
  return (
    <>
      <title>{`Compare · ${membership?.labName ?? "Lab"} · Thetafold`}</title>
      <PageHeader
        eyebrow={membership?.labName}
        title="Compare"
        description="Characteristic temperatures and coefficients of approved fits, batch against batch or along a composition series."
        actions={
          hasRows ? (
            <a className={buttonClasses("secondary")} href={compareCsvUrl(labId, selection)} download>
              Export CSV
            </a>
          ) : undefined
        }
      />
      <div className="grid gap-6 lg:grid-cols-[18rem_minmax(0,1fr)]">
        <div className="space-y-6">
          <Card>
            <CardHeader title="What to compare" />
            <CardBody>
              {choices.isPending ? (
                <LoadingBlock label="Loading batches and samples…" />
              ) : choices.isError ? (
                <ErrorNotice error={choices.error} onRetry={() => choices.refetch()} />
              ) : (
                <CompareControls
                  selection={selection}
                  onChange={(s) => update(s)}
                  batches={choices.data.batches}
                  samples={choices.data.samples}
                  saved={saved.data ?? []}
                  savedId={savedId}
                  onLoadSaved={loadSaved}
                  available={r?.availableParameters ?? []}
                />
              )}
            </CardBody>
          </Card>
          {canWrite && hasRows && (
            <Card>
              <CardHeader title="Keep this selection" />
              <CardBody>
                <SaveComparisonForm labId={labId} selection={selection} onSaved={(id) => update(selection, id)} />
              </CardBody>
            </Card>
          )}
        </div>

        <div className="min-w-0 space-y-6">
          {result.isPending ? (
            <LoadingBlock label="Gathering approved fits…" />
          ) : result.isError ? (
            <ErrorNotice error={result.error} onRetry={() => result.refetch()} />
          ) : !r || r.rows.length === 0 ? (
            <EmptyState
              illustration={<CompareIcon />}
              title={`No approved fits with ${parameterLabel(selection.parameter)}`}
              next={
                <>
                  <strong className="font-semibold">Next:</strong>{" "}
                  {membership?.role === "lead"
                    ? "open a run's fits and approve the drafts you want to quote; they appear here at once."
                    : "fit the runs of these samples and ask the lab lead to approve the fits; only approved fits are compared."}{" "}
                  Or widen the choice on the left: nothing ticked compares the whole lab.
                </>
              }
            >
              <p>
                This page puts the chosen parameter of every approved fit in one table and chart, with the inverse-variance weighted
                mean of each batch, its plain mean and spread, and a flag on fits far from their batch.
              </p>
            </EmptyState>
          ) : (
            <>
              {r.notes.length > 0 && (
                <Alert tone="caution" title="Read with care" role="note">
                  <ul className="list-disc space-y-1 pl-4">
                    {r.notes.map((n, i) => (
                      <li key={i}>{n.message}</li>
                    ))}
                  </ul>
                </Alert>
              )}
              <Card>
                <CardHeader
                  title={`${parameterLabel(r.parameter)} by ${r.groupBy === "batch" ? "batch" : "composition x"}`}
                  description={`${r.rows.length} approved fit${r.rows.length === 1 ? "" : "s"} in ${r.groups.length} group${r.groups.length === 1 ? "" : "s"}.`}
                />
                <CardBody>
                  <ParameterChart result={r} />
                </CardBody>
              </Card>
              <Card>
                <CardHeader title="Per group" />
                <CardBody className="px-0">
                  <GroupStatsTable result={r} />
                </CardBody>
              </Card>
              <Card>
                <CardHeader title="Every fit" />
                <CardBody className="px-0">
                  <CompareRowsTable result={r} />
                </CardBody>
              </Card>
              <Card>
                <CardHeader title="Collapse onto the Debye curve" description="C/(3nR) against T/θ_D of every chosen run." />
                <CardBody>
                  {curves.isPending ? (
                    <LoadingBlock label="Loading the runs' points…" />
                  ) : curves.isError ? (
                    <ErrorNotice error={curves.error} onRetry={() => curves.refetch()} />
                  ) : (
                    <CollapseChart curves={curves.data} />
                  )}
                </CardBody>
              </Card>
              <Card>
                <CardHeader title="C/T³ against T" description="Overlay of the chosen runs at low temperature." />
                <CardBody>{curves.data ? <CT3Chart curves={curves.data} /> : <LoadingBlock label="Loading the runs' points…" />}</CardBody>
              </Card>
              <p className="text-xs text-ink-muted">Research data, not certified property data for engineering design.</p>
            </>
          )}
        </div>
      </div>
    </>
  );
}
