import { useMemo, useState } from "react";
import type { QueryClient } from "@tanstack/react-query";
import { isRouteErrorResponse, Link, useParams, useRouteError, type LoaderFunctionArgs } from "react-router-dom";
import type { RunDetail } from "@shared/schemas/runs";
import { Alert, ErrorNotice } from "@/components/ui/alert";
import { buttonClasses } from "@/components/ui/button";
import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { NotFoundPanel } from "@/components/ui/not-found-panel";
import { PageHeader } from "@/components/ui/page-header";
import { ResearchDataNotice, SafetyNote } from "@/components/ui/safety-note";
import { LoadingBlock } from "@/components/ui/spinner";
import { TextLink } from "@/components/ui/text-link";
import { meQueryOptions, useMembership } from "@/features/auth/api";
import { runDownloads, runQueryOptions, useMaskPoints, useRun } from "@/features/runs/api";
import { PointTable } from "@/features/runs/components/point-table";
import { RunChart } from "@/features/runs/components/run-chart";
import { formatCell, RUN_VIEWS } from "@/features/runs/utils";
import { useInvalidateSamples } from "@/features/samples/api";
import { isApiError } from "@/lib/api-client";

export const loader =
  (queryClient: QueryClient) =>
  async ({ params }: LoaderFunctionArgs) => {
    const labId = params.labId ?? "";
    const me = await queryClient.ensureQueryData(meQueryOptions());
    if (!me?.memberships.some((m) => m.labId === labId)) return null;
    await queryClient.prefetchQuery(runQueryOptions(labId, params.runId ?? ""));
    return null;
  };

const UNIT_NAMES: Record<string, string> = { uJ: "µJ" };
const unitText = (u: string) => u.replace("uJ", UNIT_NAMES.uJ).replace("*", "·");

function MappingSummary({ run }: { run: RunDetail }) {
  const m = run.mapping;
  const parts = [
    `temperature “${m.columns.temperature}” in ${m.units.temperature === "C" ? "°C" : "K"}`,
    `heat capacity “${m.columns.heatCapacity}” in ${unitText(m.units.heatCapacity)}`,
    m.columns.sigma ? `uncertainty “${m.columns.sigma}”${m.sigmaScale && m.sigmaScale !== "absolute" ? ` (${m.sigmaScale})` : ""}` : null,
    m.columns.field ? `field “${m.columns.field}” in ${m.units.field}` : null,
    m.columns.addenda ? `addenda column “${m.columns.addenda}” subtracted` : null,
  ].filter(Boolean);
  return <p className="text-sm text-ink">Read as: {parts.join("; ")}.</p>;
}

/** One run: the three standard views, every point with its mask switch, the downloads, and how the file was read. */
export function Component() {
  const { labId = "", runId = "" } = useParams();
  const membership = useMembership(labId);
  const canWrite = membership?.role === "lead" || membership?.role === "researcher";
  const run = useRun(labId, runId);
  const invalidateSamples = useInvalidateSamples(labId);
  const mask = useMaskPoints(labId, runId, () => void invalidateSamples());
  const [logT, setLogT] = useState(false);
  const [logCp, setLogCp] = useState(false);
  const [lowTMax, setLowTMax] = useState("15");
  const lowLimit = Number(lowTMax) > 0 ? Number(lowTMax) : 15;
  const points = run.data?.points;
  const lowT = useMemo(() => (points ?? []).filter((p) => p.temperatureK <= lowLimit), [points, lowLimit]);

  if (run.isPending) return <LoadingBlock label="Loading the run…" />;
  if (run.isError) {
    if (isApiError(run.error, 404)) return <NotFoundPanel homeHref={`/labs/${labId}/samples`} />;
    return <ErrorNotice error={run.error} onRetry={() => void run.refetch()} />;
  }
  const r = run.data;
  const n = r.atomsPerFormulaUnit;
  const fieldShown = r.fieldT !== null || Boolean(r.mapping.columns.field);

  return (
    <>
      <title>{`${r.label} · Run · Thetafold`}</title>
      <p className="mb-2 text-sm">
        {r.sample ? <TextLink to={`/labs/${labId}/samples/${r.sample.id}`}>← {r.sample.label}</TextLink> : <TextLink to={`/labs/${labId}/samples`}>← Samples and addenda runs</TextLink>}
      </p>
      <PageHeader
        eyebrow={r.kind === "addenda" ? `Addenda run · platform ${r.platform}` : r.sample ? `Run of ${r.sample.label} (${r.sample.formula})` : "Run"}
        title={r.label}
        description={`${r.pointCount} points from ${formatCell(r.tMinK)} to ${formatCell(r.tMaxK)} K${r.maskedCount > 0 ? `, ${r.maskedCount} masked` : ""}.`}
        actions={
          <>
            {r.kind === "sample" ? (
              <Link className={buttonClasses("primary")} to={`/labs/${labId}/runs/${r.id}/fit`}>
                Fit a model
              </Link>
            ) : null}
            <a className={buttonClasses("secondary")} href={runDownloads.raw(labId, r.id)} download>
              Raw file
            </a>
            <a className={buttonClasses("secondary")} href={runDownloads.reducedCsv(labId, r.id)} download>
              Reduced CSV
            </a>
          </>
        }
      />
      {r.warnings.length > 0 ? (
        <Alert tone="caution" title="Plausibility warnings from the import" className="mb-6" role="note">
          <ul className="list-disc pl-5">
            {r.warnings.map((w) => (
              <li key={w}>{w}</li>
            ))}
          </ul>
        </Alert>
      ) : null}

      <div className="space-y-6">
        <Card>
          <CardHeader
            title={RUN_VIEWS[0].label}
            description={r.kind === "addenda" ? "Total heat capacity of the platform and grease." : RUN_VIEWS[0].description}
            actions={
              <div className="flex gap-4 text-sm text-ink">
                <label className="flex items-center gap-2">
                  <input type="checkbox" checked={logT} onChange={(e) => setLogT(e.target.checked)} />
                  log T
                </label>
                <label className="flex items-center gap-2">
                  <input type="checkbox" checked={logCp} onChange={(e) => setLogCp(e.target.checked)} />
                  log {r.kind === "addenda" ? "C" : "Cp"}
                </label>
              </div>
            }
          />
          <CardBody>
            <RunChart points={r.points} view="cp" atomsPerFormulaUnit={n} cpUnit={r.cpUnit} logX={logT} logY={logCp} />
          </CardBody>
        </Card>
        <div className="grid gap-6 xl:grid-cols-2">
          <Card>
            <CardHeader
              title={RUN_VIEWS[1].label}
              description={RUN_VIEWS[1].description}
              actions={
                <label className="text-sm text-ink">
                  <span className="mr-2 text-xs text-ink-muted">up to T (K)</span>
                  <input className="h-8 w-20 rounded-md border border-line-strong bg-surface px-2 font-mono text-sm" inputMode="decimal" value={lowTMax} onChange={(e) => setLowTMax(e.target.value)} aria-label="Highest temperature in the C/T against T² view, K" />
                </label>
              }
            />
            <CardBody>
              {lowT.length > 0 ? (
                <RunChart points={lowT} view="ct" atomsPerFormulaUnit={n} cpUnit={r.cpUnit} height={280} />
              ) : (
                <p className="text-sm text-ink-muted">No points at or below {lowLimit} K; raise the limit.</p>
              )}
            </CardBody>
          </Card>
          {r.kind === "sample" ? (
            <Card>
              <CardHeader title={RUN_VIEWS[2].label} description={`${RUN_VIEWS[2].description} n = ${formatCell(n)}.`} />
              <CardBody>
                <RunChart points={r.points} view="reduced" atomsPerFormulaUnit={n} cpUnit={r.cpUnit} height={280} />
              </CardBody>
            </Card>
          ) : null}
        </div>

        <Card>
          <CardHeader title="Points" description="Mask a point to set it aside from views and fits; it stays stored and exported with its flag." />
          <CardBody>
            {mask.isError ? <ErrorNotice error={mask.error} /> : null}
            <PointTable points={r.points} cpUnit={r.cpUnit} canEdit={canWrite} pending={mask.isPending} onMask={(indices, masked) => mask.mutate({ indices, masked })} />
          </CardBody>
        </Card>

        <div className="grid gap-6 lg:grid-cols-[minmax(0,1fr)_26rem]">
          <Card>
            <CardHeader title="How the file was read" />
            <CardBody className="space-y-3 text-sm">
              <MappingSummary run={r} />
              <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-2">
                <div>
                  <dt className="text-xs text-ink-muted">Raw file</dt>
                  <dd className="break-all">{r.fileName}</dd>
                </div>
                <div>
                  <dt className="text-xs text-ink-muted">SHA-256</dt>
                  <dd className="font-mono text-xs break-all">{r.fileSha256}</dd>
                </div>
                {r.kind === "sample" ? (
                  <>
                    <div>
                      <dt className="text-xs text-ink-muted">Mass used</dt>
                      <dd className="font-mono">{formatCell(r.massMg)} mg</dd>
                    </div>
                    <div>
                      <dt className="text-xs text-ink-muted">Molar mass used</dt>
                      <dd className="font-mono">{formatCell(r.molarMassGPerMol)} g/mol</dd>
                    </div>
                  </>
                ) : null}
                {r.addendaRun ? (
                  <div>
                    <dt className="text-xs text-ink-muted">Addenda subtracted</dt>
                    <dd>
                      <TextLink to={`/labs/${labId}/runs/${r.addendaRun.id}`}>{r.addendaRun.label}</TextLink> (platform {r.addendaRun.platform})
                    </dd>
                  </div>
                ) : null}
                {r.platform ? (
                  <div>
                    <dt className="text-xs text-ink-muted">Platform</dt>
                    <dd>{r.platform}</dd>
                  </div>
                ) : null}
                <div>
                  <dt className="text-xs text-ink-muted">Field</dt>
                  <dd className="font-mono">{r.fieldT === null ? "none in the file" : `${formatCell(r.fieldT)} T`}</dd>
                </div>
                <div>
                  <dt className="text-xs text-ink-muted">Uploaded</dt>
                  <dd>
                    {new Date(r.createdAt).toLocaleString()}
                    {r.createdByName ? ` by ${r.createdByName}` : ""}
                  </dd>
                </div>
              </dl>
              {r.siblings.length > 0 ? (
                <p>
                  Same file, other fields:{" "}
                  {r.siblings.map((s, i) => (
                    <span key={s.id}>
                      {i > 0 ? ", " : ""}
                      <TextLink to={`/labs/${labId}/runs/${s.id}`}>{s.label}</TextLink>
                    </span>
                  ))}
                </p>
              ) : null}
              <ResearchDataNotice />
            </CardBody>
          </Card>
          <SafetyNote topics={fieldShown ? ["cryogens", "magnetic-field"] : ["cryogens"]} />
        </div>
      </div>
    </>
  );
}

export function ErrorBoundary() {
  const error = useRouteError();
  if (isRouteErrorResponse(error) && error.status === 404) return <NotFoundPanel />;
  return <ErrorNotice title="This page ran into a problem" error={error} onRetry={() => window.location.reload()} />;
}
