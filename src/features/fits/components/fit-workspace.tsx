import { useMemo, useState } from "react";
import type { FitOutcome, FitSummary, ModelDefinitionInput, RankResult } from "@shared/schemas/fits";
import { Alert, ErrorNotice } from "@/components/ui/alert";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { EmptyState } from "@/components/ui/empty-state";
import { LoadingBlock } from "@/components/ui/spinner";
import {
  thermoCsvUrl,
  useApproveFit,
  useFitHistory,
  usePreviewFit,
  useRankModels,
  useSaveFit,
  useThermo,
  useThetaD,
  fitQueryOptions,
} from "../api";
import { buildModelSpecs, suggestStartValues } from "../engine";
import { componentParameterNames, modelLabel } from "../utils";
import { CorrelationMatrix } from "./correlation-matrix";
import { FIT_VIEWS, FitChart, type ChartPoint, type FitView } from "./fit-chart";
import { FitHistory } from "./fit-history";
import { FitStatistics } from "./fit-statistics";
import { FitWarnings } from "./fit-warnings";
import { ModelComposer } from "./model-composer";
import { NumberField } from "./number-field";
import { ParameterTable } from "./parameter-table";
import { RankingTable } from "./ranking-table";
import { ResidualPlot } from "./residual-plot";
import { ThermoView } from "./thermo-view";
import { ThetaDView } from "./theta-d-view";
import { useQueryClient } from "@tanstack/react-query";

export interface WorkspaceRun {
  id: string;
  label: string;
  atomsPerFormulaUnit: number;
  points: ChartPoint[];
}

interface FitWorkspaceProps {
  labId: string;
  run: WorkspaceRun;
  canWrite: boolean;
  canApprove: boolean;
}

const DEFAULT_MODEL: ModelDefinitionInput = { components: [{ kind: "electronic" }, { kind: "debye", dimension: 3 }] };

type Panel = "theta-d" | "thermo" | "history";

function defaultWindow(points: readonly ChartPoint[]): [number, number] {
  const ts = points.filter((p) => !p.masked).map((p) => p.temperatureK);
  if (ts.length === 0) return [1, 300];
  return [Math.min(...ts), Math.max(...ts)];
}

/**
 * The fit workspace of one run. Left: the data with the draggable window, the fitted curve in three
 * views and the residuals; below it θ_D(T), S and H, and the history. Right: the model composer,
 * the actions, and the result.
 */
export function FitWorkspace({ labId, run, canWrite, canApprove }: FitWorkspaceProps) {
  const [definition, setDefinition] = useState<ModelDefinitionInput>(DEFAULT_MODEL);
  const [window, setWindow] = useState<[number, number]>(() => defaultWindow(run.points));
  const [view, setView] = useState<FitView>("cp");
  const [logT, setLogT] = useState(false);
  const [outcome, setOutcome] = useState<{ data: FitOutcome; source: string; fitId?: string } | null>(null);
  const [rank, setRank] = useState<RankResult | null>(null);
  const [notes, setNotes] = useState("");
  const [saveUnconverged, setSaveUnconverged] = useState(false);
  const [panel, setPanel] = useState<Panel>("history");
  const [chosenFitId, setChosenFitId] = useState<string | undefined>(undefined);
  const [thermoAt, setThermoAt] = useState<number[]>([]);
  const [notice, setNotice] = useState<string | null>(null);

  const queryClient = useQueryClient();
  const preview = usePreviewFit(labId, run.id);
  const save = useSaveFit(labId, run.id);
  const approve = useApproveFit(labId, run.id);
  const ranking = useRankModels(labId, run.id);
  const history = useFitHistory(labId, run.id);
  const hasFits = (history.data?.length ?? 0) > 0;
  const thetaD = useThetaD(labId, run.id, chosenFitId, hasFits && panel === "theta-d");
  const thermo = useThermo(labId, run.id, chosenFitId, thermoAt, hasFits && panel === "thermo");

  const n = run.atomsPerFormulaUnit;
  const built = useMemo(() => buildModelSpecs(definition, n), [definition, n]);
  const inWindow = useMemo(
    () => run.points.filter((p) => !p.masked && p.temperatureK >= window[0] && p.temperatureK <= window[1]),
    [run.points, window],
  );
  const suggested = useMemo(() => suggestStartValues(definition, n, inWindow), [definition, n, inWindow]);
  const freeCount = useMemo(() => {
    const names = componentParameterNames(definition).flat();
    return names.filter((name) => !definition.parameters?.[name]?.fixed).length;
  }, [definition]);
  const tooFew = inWindow.length <= freeCount;
  const dataRange = defaultWindow(run.points);
  const busy = preview.isPending || save.isPending || ranking.isPending;

  const body = { model: definition, window };
  const runFit = () => {
    setNotice(null);
    preview.mutate(body, { onSuccess: (data) => setOutcome({ data, source: "Preview — not saved" }) });
  };
  const saveDraft = () => {
    setNotice(null);
    save.mutate(
      { ...body, notes: notes.trim() || undefined, saveUnconverged: saveUnconverged || undefined },
      {
        onSuccess: (fit) => {
          setOutcome({ data: fit, source: `Saved as a draft`, fitId: fit.id });
          setNotes("");
          setSaveUnconverged(false);
          setPanel("history");
          setNotice("Saved as a draft. A lead approves drafts before they are quoted.");
        },
      },
    );
  };
  const runRank = () => {
    setNotice(null);
    ranking.mutate({ window }, { onSuccess: (r) => setRank(r) });
  };
  const openFit = async (f: FitSummary) => {
    setDefinition(f.model);
    setWindow([f.window[0], f.window[1]]);
    setChosenFitId(f.id);
    const full = await queryClient.fetchQuery(fitQueryOptions(labId, f.id));
    setOutcome({ data: full, source: `Stored fit (${f.state})`, fitId: f.id });
  };

  const result = outcome?.data;
  const lastError = preview.error ?? save.error;

  return (
    <div className="grid gap-5 xl:grid-cols-[minmax(0,1.35fr)_minmax(27rem,1fr)]">
      {/* Left: data, window, curve, residuals, and the derived views */}
      <div className="min-w-0 space-y-5">
        <Card>
          <CardHeader
            id="data-title"
            title="Data and fit window"
            description="Drag the two orange edges, or type the window below. Masked points (crosses) never enter a fit."
            actions={
              <div className="flex flex-wrap items-center gap-2" role="group" aria-label="Chart view">
                {FIT_VIEWS.map((v) => (
                  <Button key={v.id} size="sm" variant={view === v.id ? "primary" : "secondary"} aria-pressed={view === v.id} onClick={() => setView(v.id)}>
                    {v.label}
                  </Button>
                ))}
                <label className="flex items-center gap-1 text-sm">
                  <input type="checkbox" checked={logT} onChange={(e) => setLogT(e.target.checked)} disabled={view === "ct"} />
                  log T
                </label>
              </div>
            }
          />
          <CardBody className="space-y-3">
            <FitChart
              points={run.points}
              view={view}
              atomsPerFormulaUnit={n}
              window={window}
              onWindowChange={setWindow}
              curve={result?.curve}
              logT={logT}
            />
            <div className="flex flex-wrap items-center gap-4 text-sm">
              <NumberField
                label="Window from"
                value={window[0]}
                unit="K"
                step={0.1}
                min={0}
                onCommit={(v) => v !== undefined && v > 0 && v < window[1] && setWindow([v, window[1]])}
              />
              <NumberField
                label="to"
                value={window[1]}
                unit="K"
                step={0.1}
                onCommit={(v) => v !== undefined && v > window[0] && setWindow([window[0], v])}
              />
              <Button size="sm" variant="quiet" onClick={() => setWindow(dataRange)}>
                Whole run
              </Button>
              <span className="text-ink-muted" aria-live="polite">
                {inWindow.length} points in the window · {freeCount} free parameters
              </span>
            </div>
            {tooFew ? (
              <Alert tone="caution" role="status">
                The window holds {inWindow.length} points but the model has {freeCount} free parameters: widen the window or fix some parameters.
              </Alert>
            ) : null}
            {result ? (
              <div>
                <h3 className="mb-1 text-sm font-medium">Residuals</h3>
                <ResidualPlot residuals={result.residuals} logT={logT} />
              </div>
            ) : null}
          </CardBody>
        </Card>

        {rank ? (
          <Card>
            <CardHeader id="rank-title" title="Ranking of candidate models" description="Each candidate fitted to the same window; ordered by BIC." />
            <CardBody>
              <RankingTable
                result={rank}
                onUse={
                  canWrite
                    ? (i) => {
                        const e = rank.entries[i];
                        setDefinition(e.model);
                        preview.mutate(
                          { model: e.model, window },
                          { onSuccess: (data) => setOutcome({ data, source: `Preview of ${e.label} — not saved` }) },
                        );
                      }
                    : undefined
                }
              />
            </CardBody>
          </Card>
        ) : null}

        <Card>
          <div role="tablist" aria-label="Derived views" className="flex gap-1 border-b border-line px-3 pt-2">
            {(
              [
                ["history", "Fit history"],
                ["theta-d", "θ_D(T)"],
                ["thermo", "Entropy and enthalpy"],
              ] as const
            ).map(([id, label]) => (
              <button
                key={id}
                role="tab"
                type="button"
                aria-selected={panel === id}
                aria-controls={`panel-${id}`}
                id={`tab-${id}`}
                onClick={() => setPanel(id)}
                className={`rounded-t-md px-3 py-1.5 text-sm ${panel === id ? "border border-b-0 border-line bg-surface font-medium" : "text-ink-muted hover:text-ink"}`}
              >
                {label}
              </button>
            ))}
          </div>
          <CardBody>
            <div role="tabpanel" id={`panel-${panel}`} aria-labelledby={`tab-${panel}`}>
              {panel === "history" ? (
                history.isPending ? (
                  <LoadingBlock label="Loading the fits of this run" />
                ) : history.error ? (
                  <ErrorNotice error={history.error} onRetry={() => history.refetch()} />
                ) : !hasFits ? (
                  <EmptyState title="No fits saved yet">
                    <p>Compose a model, press Fit to preview it, then Save draft. Every saved fit stays here; approval never overwrites.</p>
                  </EmptyState>
                ) : (
                  <>
                    {approve.error ? <ErrorNotice error={approve.error} /> : null}
                    <FitHistory
                      fits={history.data ?? []}
                      canApprove={canApprove}
                      approvingId={approve.isPending ? (approve.variables ?? null) : null}
                      onApprove={(id) => approve.mutate(id, { onSuccess: () => setNotice("Approved. Comparison and bundles now quote this fit.") })}
                      onOpen={(f) => void openFit(f)}
                      openId={outcome?.fitId ?? null}
                    />
                  </>
                )
              ) : !hasFits ? (
                <EmptyState title="Save a fit first">
                  <p>
                    {panel === "theta-d"
                      ? "θ_D(T) takes off the fitted electronic part, so it needs a saved fit of this run."
                      : "Below the first point the entropy and enthalpy come from the fitted model, so they need a saved fit of this run."}
                  </p>
                </EmptyState>
              ) : panel === "theta-d" ? (
                thetaD.isPending ? (
                  <LoadingBlock label="Inverting each point for θ_D" />
                ) : thetaD.error ? (
                  <ErrorNotice error={thetaD.error} onRetry={() => thetaD.refetch()} />
                ) : thetaD.data ? (
                  <ThetaDView curve={thetaD.data} logT={logT} />
                ) : null
              ) : thermo.isPending ? (
                <LoadingBlock label="Integrating C/T and C" />
              ) : thermo.error ? (
                <ErrorNotice error={thermo.error} onRetry={() => thermo.refetch()} />
              ) : thermo.data ? (
                <ThermoView table={thermo.data} csvUrl={thermoCsvUrl(labId, run.id, chosenFitId, thermoAt)} at={thermoAt} onAtChange={setThermoAt} />
              ) : null}
              {panel !== "history" && hasFits ? (
                <p className="mt-2 text-xs text-ink-muted">
                  Using {chosenFitId ? "the fit you opened from the history" : "the approved fit of this run, or the newest when none is approved"}.
                  {chosenFitId ? (
                    <button type="button" className="ml-1 underline" onClick={() => setChosenFitId(undefined)}>
                      Use the default
                    </button>
                  ) : null}
                </p>
              ) : null}
            </div>
          </CardBody>
        </Card>
      </div>

      {/* Right: composer, actions, result */}
      <div className="min-w-0 space-y-5">
        <Card>
          <CardBody>
            <ModelComposer
              definition={definition}
              onChange={setDefinition}
              specs={built.specs}
              buildError={built.error}
              suggested={suggested}
              onUseSuggested={
                suggested
                  ? () => {
                      const parameters = { ...(definition.parameters ?? {}) };
                      for (const [name, v] of Object.entries(suggested)) {
                        if (!parameters[name]?.fixed) parameters[name] = { ...parameters[name], value: Number(v.toPrecision(6)) };
                      }
                      setDefinition({ ...definition, parameters });
                    }
                  : undefined
              }
              atomsPerFormulaUnit={n}
              disabled={!canWrite || busy}
            />
          </CardBody>
        </Card>

        <Card>
          <CardBody className="space-y-3">
            {!canWrite ? (
              <p className="text-sm text-ink-muted">You can read this run's fits; fitting and saving need the researcher or lead role.</p>
            ) : (
              <>
                <div className="flex flex-wrap gap-2">
                  <Button onClick={runFit} pending={preview.isPending} disabled={busy || built.error !== null || definition.components.length === 0}>
                    Fit
                  </Button>
                  <Button variant="secondary" onClick={saveDraft} pending={save.isPending} disabled={busy || built.error !== null || definition.components.length === 0}>
                    Save draft
                  </Button>
                  <Button variant="secondary" onClick={runRank} pending={ranking.isPending} disabled={busy}>
                    Rank candidate models
                  </Button>
                </div>
                <label className="block space-y-1 text-sm">
                  <span className="font-medium">Note for the saved fit (optional)</span>
                  <input
                    className="h-8 w-full rounded-lg border border-line-strong bg-surface px-2 text-sm"
                    value={notes}
                    maxLength={4000}
                    onChange={(e) => setNotes(e.target.value)}
                    placeholder="e.g. window chosen below the anomaly"
                  />
                </label>
                {result && !result.converged ? (
                  <label className="flex items-start gap-2 text-sm">
                    <input type="checkbox" className="mt-1" checked={saveUnconverged} onChange={(e) => setSaveUnconverged(e.target.checked)} />
                    <span>Save it anyway, flagged as not converged (it cannot be approved).</span>
                  </label>
                ) : null}
                {ranking.progress ? (
                  <div role="status" aria-live="polite" className="space-y-1 text-sm">
                    <p>
                      Ranking: {ranking.progress.done} of {ranking.progress.total || "…"} candidates fitted
                      {ranking.progress.label ? ` (last: ${ranking.progress.label})` : ""}
                    </p>
                    <progress className="w-full" max={ranking.progress.total || 1} value={ranking.progress.done} />
                  </div>
                ) : null}
                {lastError ? <ErrorNotice error={lastError} /> : null}
                {ranking.error ? <ErrorNotice error={ranking.error} title="Ranking failed" /> : null}
                {notice ? (
                  <Alert tone="ok" role="status">
                    {notice}
                  </Alert>
                ) : null}
              </>
            )}
          </CardBody>
        </Card>

        {result ? (
          <Card>
            <CardHeader
              id="result-title"
              title={
                <span className="flex flex-wrap items-center gap-2">
                  Result <Badge tone={outcome?.fitId ? "frost" : "neutral"}>{outcome?.source}</Badge>
                </span>
              }
              description={`${modelLabel(result.model)} · input SHA-256 ${result.inputSha256.slice(0, 12)}… · Thetafold ${result.softwareVersion}`}
            />
            <CardBody className="space-y-4">
              <FitWarnings warnings={result.warnings} converged={result.converged} stopReason={result.stopReason} />
              <ParameterTable parameters={result.parameters} />
              <FitStatistics outcome={result} />
              <div>
                <h3 className="mb-1 text-sm font-medium">Correlation of the free parameters</h3>
                {result.correlation ? (
                  <CorrelationMatrix names={result.freeParameters} correlation={result.correlation} />
                ) : (
                  <p className="text-sm text-danger">The data cannot separate the free parameters (singular covariance): fix one or widen the window.</p>
                )}
              </div>
              <p className="text-xs text-ink-muted">
                Weighting: {result.weighting}. Statistical uncertainties are scaled by √(χ²/dof); the mass systematic is a refit at m ± σ_m, quoted apart.
                Research data, not certified property values.
              </p>
            </CardBody>
          </Card>
        ) : (
          <EmptyState title="No fit yet">
            <p>Choose the window on the chart, compose the model, then press Fit. Nothing is saved until you press Save draft.</p>
          </EmptyState>
        )}

      </div>
    </div>
  );
}
