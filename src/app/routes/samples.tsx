import { useEffect, useState } from "react";
import type { QueryClient } from "@tanstack/react-query";
import { useNavigate, useParams, useSearchParams, type LoaderFunctionArgs } from "react-router-dom";
import { SampleSortSchema, type SampleSort } from "@shared/schemas/samples";
import { ErrorNotice } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { EmptyState } from "@/components/ui/empty-state";
import { SampleIcon } from "@/components/ui/icons";
import { PageHeader } from "@/components/ui/page-header";
import { LoadingBlock } from "@/components/ui/spinner";
import { TextLink } from "@/components/ui/text-link";
import { meQueryOptions, useMembership } from "@/features/auth/api";
import { ImportDialog } from "@/features/imports/components/import-dialog";
import { addendaRunsQueryOptions, useAddendaRuns, useInvalidateRuns } from "@/features/runs/api";
import { batchesQueryOptions, samplesQueryOptions, useBatches, useSamples, type SampleFilters } from "@/features/samples/api";
import { BatchForm } from "@/features/samples/components/batch-form";
import { SampleForm } from "@/features/samples/components/sample-form";
import { SampleTable } from "@/features/samples/components/sample-table";
import { SAMPLE_SORT_OPTIONS } from "@/features/samples/utils";

function filtersFrom(params: URLSearchParams): SampleFilters {
  const sort = SampleSortSchema.safeParse(params.get("sort"));
  return {
    q: params.get("q") || undefined,
    batchId: params.get("batch") || undefined,
    sort: sort.success ? sort.data : undefined,
    order: params.get("order") === "desc" ? "desc" : undefined,
  };
}

export const loader =
  (queryClient: QueryClient) =>
  async ({ params, request }: LoaderFunctionArgs) => {
    const labId = params.labId ?? "";
    const me = await queryClient.ensureQueryData(meQueryOptions());
    if (!me?.memberships.some((m) => m.labId === labId)) return null;
    const filters = filtersFrom(new URL(request.url).searchParams);
    // prefetch: a failed list shows inline with a retry instead of replacing the page.
    await Promise.all([
      queryClient.prefetchQuery(samplesQueryOptions(labId, filters)),
      queryClient.prefetchQuery(batchesQueryOptions(labId)),
      queryClient.prefetchQuery(addendaRunsQueryOptions(labId)),
    ]);
    return null;
  };

type Panel = "none" | "sample" | "batch";

/** The lab's samples: search, sort, batch filter; new batches and samples; the platform addenda runs. */
export function Component() {
  const { labId = "" } = useParams();
  const navigate = useNavigate();
  const membership = useMembership(labId);
  const canWrite = membership?.role === "lead" || membership?.role === "researcher";
  const [params, setParams] = useSearchParams();
  const filters = filtersFrom(params);
  const [search, setSearch] = useState(filters.q ?? "");
  const [panel, setPanel] = useState<Panel>("none");
  const [addendaUpload, setAddendaUpload] = useState(false);
  const samples = useSamples(labId, filters);
  const batches = useBatches(labId);
  const addenda = useAddendaRuns(labId);
  const invalidateRuns = useInvalidateRuns(labId);
  const filtered = Boolean(filters.q || filters.batchId);

  const setFilter = (key: string, value: string | undefined) => {
    const next = new URLSearchParams(params);
    if (value) next.set(key, value);
    else next.delete(key);
    setParams(next, { replace: true });
  };

  // Search as you type, a moment after the last key.
  useEffect(() => {
    const t = setTimeout(() => {
      if ((filters.q ?? "") !== search.trim()) setFilter("q", search.trim() || undefined);
    }, 250);
    return () => clearTimeout(t);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [search]);

  const sampleHref = (id: string) => `/labs/${labId}/samples/${id}`;

  return (
    <>
      <title>{`Samples · ${membership?.labName ?? "Lab"} · Thetafold`}</title>
      <PageHeader
        eyebrow={membership?.labName}
        title="Samples"
        description="Every piece of material the lab measures, with its calorimeter runs. Open a sample to upload a run."
        actions={
          canWrite ? (
            <>
              <Button variant="secondary" onClick={() => setPanel(panel === "batch" ? "none" : "batch")} aria-expanded={panel === "batch"}>
                New batch
              </Button>
              <Button onClick={() => setPanel(panel === "sample" ? "none" : "sample")} aria-expanded={panel === "sample"}>
                New sample
              </Button>
            </>
          ) : null
        }
      />

      {panel === "batch" ? (
        <Card className="mb-6">
          <CardHeader title="New batch" description="A synthesis batch groups samples made together; its code is unique in the lab." />
          <CardBody>
            <BatchForm labId={labId} onDone={() => setPanel("sample")} onCancel={() => setPanel("none")} />
          </CardBody>
        </Card>
      ) : null}
      {panel === "sample" ? (
        <Card className="mb-6">
          <CardHeader title="New sample" description="Label, batch, formula and mass. Molar mass and atoms per formula unit follow from the formula." />
          <CardBody>
            <SampleForm labId={labId} batches={batches.data ?? []} onDone={(s) => navigate(sampleHref(s.id))} onCancel={() => setPanel("none")} />
          </CardBody>
        </Card>
      ) : null}

      <div className="mb-4 flex flex-wrap items-end gap-3" role="search" aria-label="Find samples">
        <label className="text-sm text-ink">
          <span className="block text-xs text-ink-muted">Search</span>
          <input
            type="search"
            className="h-9 w-64 rounded-md border border-line-strong bg-surface px-3 text-sm"
            placeholder="Label, formula, batch, notes"
            value={search}
            onChange={(e) => setSearch(e.target.value)}
          />
        </label>
        <label className="text-sm text-ink">
          <span className="block text-xs text-ink-muted">Batch</span>
          <select className="h-9 rounded-md border border-line-strong bg-surface px-2 text-sm" value={filters.batchId ?? ""} onChange={(e) => setFilter("batch", e.target.value || undefined)}>
            <option value="">All batches</option>
            <option value="none">No batch</option>
            {batches.data?.map((b) => (
              <option key={b.id} value={b.id}>
                {b.code} ({b.sampleCount})
              </option>
            ))}
          </select>
        </label>
        <label className="text-sm text-ink">
          <span className="block text-xs text-ink-muted">Sort by</span>
          <select className="h-9 rounded-md border border-line-strong bg-surface px-2 text-sm" value={filters.sort ?? "label"} onChange={(e) => setFilter("sort", e.target.value as SampleSort)}>
            {SAMPLE_SORT_OPTIONS.map((o) => (
              <option key={o.value} value={o.value}>
                {o.label}
              </option>
            ))}
          </select>
        </label>
        <Button variant="secondary" size="sm" onClick={() => setFilter("order", filters.order === "desc" ? undefined : "desc")} aria-label={filters.order === "desc" ? "Sorted descending; sort ascending" : "Sorted ascending; sort descending"}>
          {filters.order === "desc" ? "↓ descending" : "↑ ascending"}
        </Button>
      </div>

      {samples.isPending ? <LoadingBlock label="Loading samples…" /> : null}
      {samples.isError ? <ErrorNotice error={samples.error} onRetry={() => void samples.refetch()} /> : null}
      {samples.data && samples.data.length > 0 ? (
        <SampleTable samples={samples.data} renderLink={(s) => <TextLink to={sampleHref(s.id)}>{s.label}</TextLink>} />
      ) : null}
      {samples.data && samples.data.length === 0 && filtered ? (
        <EmptyState title="No sample matches" next={<Button variant="secondary" size="sm" onClick={() => { setSearch(""); setParams({}, { replace: true }); }}>Clear the search and filters</Button>}>
          <p>Nothing in this lab matches the search or the batch chosen.</p>
        </EmptyState>
      ) : null}
      {samples.data && samples.data.length === 0 && !filtered ? (
        <EmptyState
          illustration={<SampleIcon />}
          title="No samples in this lab yet"
          next={
            canWrite ? (
              <>
                <strong className="font-semibold">Next:</strong> add a batch if the samples belong to one, then{" "}
                <button type="button" className="font-medium text-frost-ink underline" onClick={() => setPanel("sample")}>
                  add a sample
                </button>{" "}
                and upload its calorimeter export from the sample’s page.
              </>
            ) : (
              <>
                <strong className="font-semibold">Next:</strong> researchers and leads of this lab add samples; they appear here for you to read.
              </>
            )
          }
        >
          <p>A sample records its label, batch, formula (molar mass and atoms per formula unit follow from it), mass and notes, and keeps its runs.</p>
        </EmptyState>
      ) : null}

      <Card className="mt-8">
        <CardHeader
          title="Addenda runs"
          description="Heat capacity of an empty platform with its grease, per instrument platform; subtract one from a gross sample run when you upload it."
          actions={
            canWrite ? (
              <Button variant="secondary" size="sm" onClick={() => setAddendaUpload(true)}>
                Upload an addenda run
              </Button>
            ) : null
          }
        />
        <CardBody>
          {addenda.isError ? <ErrorNotice error={addenda.error} onRetry={() => void addenda.refetch()} /> : null}
          {addenda.data && addenda.data.length === 0 ? (
            <p className="text-sm text-ink-muted">No addenda runs yet. {canWrite ? "Upload the platform’s empty run (in J/K, mJ/K or µJ/K) to subtract it from gross sample runs." : ""}</p>
          ) : null}
          {addenda.data && addenda.data.length > 0 ? (
            <ul className="divide-y divide-line text-sm">
              {addenda.data.map((a) => (
                <li key={a.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
                  <span>
                    <span className="font-medium">{a.platform}</span> · <TextLink to={`/labs/${labId}/runs/${a.id}`}>{a.label}</TextLink>
                  </span>
                  <span className="font-mono text-xs text-ink-muted">
                    {a.pointCount} points, {Number(a.tMinK.toPrecision(3))}–{Number(a.tMaxK.toPrecision(4))} K
                  </span>
                </li>
              ))}
            </ul>
          ) : null}
        </CardBody>
      </Card>

      {addendaUpload ? (
        <ImportDialog
          target={{ kind: "addenda", labId }}
          title="Upload an addenda run"
          atomsPerFormulaUnit={null}
          onClose={() => setAddendaUpload(false)}
          onCommitted={() => invalidateRuns()}
          runHref={(id) => `/labs/${labId}/runs/${id}`}
          renderLink={(href, children) => <TextLink to={href}>{children}</TextLink>}
        />
      ) : null}
    </>
  );
}
