import { useCallback, useEffect, useId, useRef, useState, type DragEvent, type KeyboardEvent, type ReactNode } from "react";
import type { IngestWarning, TableSummary } from "@shared/schemas/ingest";
import { DUPLICATE_RUN_PATH_PREFIX, type RunCommitResult, type RunUploadPreview } from "@shared/schemas/runs";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { SafetyNote } from "@/components/ui/safety-note";
import { isApiError } from "@/lib/api-client";
import { cn } from "@/lib/cn";
import {
  useCommitUpload,
  useCreateImportPreset,
  useImportPresets,
  usePreviewUpload,
  type UploadFields,
  type UploadProgress,
  type UploadTarget,
} from "../api";
import {
  draftFromMapping,
  draftFromProposal,
  draftToMapping,
  EMPTY_DRAFT,
  formatBytes,
  formatField,
  MAX_UPLOAD_BYTES,
  missingColumns,
  type MappingDraft,
} from "../utils";
import { ColumnMapping } from "./column-mapping";
import { PreviewChart } from "./preview-chart";

/** An addenda run the user may subtract. */
export interface AddendaChoice {
  id: string;
  label: string;
  platform: string;
}

interface ImportDialogProps {
  target: UploadTarget;
  /** Heading, e.g. "Upload a run of SIG-B1-a". */
  title: string;
  onClose: () => void;
  /** After a commit: refresh what the page shows. */
  onCommitted?: (result: RunCommitResult) => Promise<unknown> | void;
  /** Link to a run page (for the result and for a duplicate's first upload). */
  runHref: (runId: string) => string;
  /** Atoms per formula unit of the sample (for the 3nR line); null for addenda runs. */
  atomsPerFormulaUnit: number | null;
  addendaChoices?: readonly AddendaChoice[];
  /** Renders a link (the app's router link); plain <a> by default. */
  renderLink?: (href: string, children: ReactNode) => ReactNode;
}

type Phase = "choose" | "reading" | "mapping" | "committing" | "done";

function ProgressBar({ progress, label }: { progress: UploadProgress | null; label: string }) {
  const pct = progress && progress.total > 0 ? Math.round((100 * progress.loaded) / progress.total) : null;
  return (
    <div className="space-y-1">
      <div className="flex justify-between text-xs text-ink-muted">
        <span>{label}</span>
        <span>{pct === null ? "starting…" : pct >= 100 ? "sent; the server is reading it…" : `${pct} %`}</span>
      </div>
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={pct ?? undefined}
        className="h-2 overflow-hidden rounded-full bg-sunken"
      >
        <div className="h-full bg-ember transition-[width]" style={{ width: `${pct ?? 2}%` }} />
      </div>
    </div>
  );
}

function Warnings({ warnings }: { warnings: readonly IngestWarning[] }) {
  if (warnings.length === 0) return <p className="text-sm text-ok">No plausibility warnings.</p>;
  return (
    <Alert tone="caution" title={`Check before you commit (${warnings.length})`} role="note">
      <ul className="list-disc space-y-1 pl-5">
        {warnings.map((w, i) => (
          <li key={`${w.code}-${i}`}>
            {w.message}
            {w.lines.length > 0 ? <span className="text-ink-muted"> (file lines {w.lines.join(", ")}{w.count > w.lines.length ? ", …" : ""})</span> : null}
          </li>
        ))}
      </ul>
    </Alert>
  );
}

/** The server's refusal, with every line and column it names. */
function UploadError({ error }: { error: unknown }) {
  if (!isApiError(error)) return <Alert tone="danger">{error instanceof Error ? error.message : "The upload failed."}</Alert>;
  const located = error.details.filter((d) => d.line !== undefined || d.column !== undefined);
  const title =
    error.status === 413
      ? "The file is over the 20 MB upload limit"
      : error.status === 422
        ? "This cannot be done with this file"
        : error.code === "NETWORK"
          ? "The upload did not arrive"
          : "The file was refused";
  return (
    <Alert tone="danger" title={title}>
      <p>{error.message}</p>
      {located.length > 1 ? (
        <ul className="mt-1 list-disc pl-5 font-mono text-xs">
          {located.slice(1, 10).map((d, i) => (
            <li key={i}>{d.message}</li>
          ))}
        </ul>
      ) : null}
      <p className="mt-1 text-xs text-ink-muted">Nothing was stored. Fix the file or the column choices and try again.</p>
    </Alert>
  );
}

function FileDrop({ onFile, disabled }: { onFile: (f: File) => void; disabled: boolean }) {
  const inputRef = useRef<HTMLInputElement>(null);
  const [over, setOver] = useState(false);
  const inputId = useId();
  const onDrop = (e: DragEvent<HTMLDivElement>) => {
    e.preventDefault();
    setOver(false);
    const f = e.dataTransfer.files?.[0];
    if (f && !disabled) onFile(f);
  };
  return (
    <div
      onDragOver={(e) => {
        e.preventDefault();
        setOver(true);
      }}
      onDragLeave={() => setOver(false)}
      onDrop={onDrop}
      data-testid="file-drop"
      className={cn(
        "flex flex-col items-center gap-3 rounded-card border-2 border-dashed px-6 py-10 text-center",
        over ? "border-ember bg-ember-soft" : "border-line-strong bg-sunken/50",
      )}
    >
      <p className="text-sm text-ink">Drop the calorimeter’s export file here, or</p>
      <label htmlFor={inputId} className="sr-only">
        Export file
      </label>
      <input
        id={inputId}
        ref={inputRef}
        type="file"
        className="sr-only"
        accept=".csv,.txt,.dat,.tsv,text/plain,text/csv"
        onChange={(e) => {
          const f = e.target.files?.[0];
          if (f) onFile(f);
          e.target.value = "";
        }}
      />
      <Button variant="secondary" disabled={disabled} onClick={() => inputRef.current?.click()}>
        Choose a file…
      </Button>
      <p className="max-w-md text-xs text-ink-muted">
        Delimited text as the instrument writes it: comma, semicolon (decimal comma allowed), tab or spaces, with any notes above the
        column names. Up to 20 MB. The file is kept byte for byte.
      </p>
    </div>
  );
}

/**
 * Upload of one calorimeter export: pick or drop the file (upload progress shown), check how its columns
 * are read and in which units, pick or save a preset, see the reduced curve and the plausibility warnings,
 * then commit. Every change of a column or unit re-reads the file on the server (nothing is stored until
 * the commit).
 */
export function ImportDialog({ target, title, onClose, onCommitted, runHref, atomsPerFormulaUnit, addendaChoices = [], renderLink }: ImportDialogProps) {
  const headingId = useId();
  const dialogRef = useRef<HTMLDivElement>(null);
  const link = renderLink ?? ((href: string, children: ReactNode) => <a href={href} className="font-medium text-frost-ink underline">{children}</a>);
  const [phase, setPhase] = useState<Phase>("choose");
  const [file, setFile] = useState<File | null>(null);
  const [progress, setProgress] = useState<UploadProgress | null>(null);
  const [table, setTable] = useState<TableSummary | null>(null);
  const [preview, setPreview] = useState<RunUploadPreview | null>(null);
  const [draft, setDraft] = useState<MappingDraft>(EMPTY_DRAFT);
  const [label, setLabel] = useState("");
  const [platform, setPlatform] = useState("");
  const [addendaRunId, setAddendaRunId] = useState("");
  const [error, setError] = useState<unknown>(null);
  const [refreshing, setRefreshing] = useState(false);
  const [result, setResult] = useState<RunCommitResult | null>(null);
  const [presetName, setPresetName] = useState("");
  const [presetMessage, setPresetMessage] = useState<{ tone: "ok" | "danger"; text: string } | null>(null);
  const previewMutation = usePreviewUpload(target);
  const commitMutation = useCommitUpload(target, onCommitted);
  const presets = useImportPresets(target.labId);
  const createPreset = useCreateImportPreset(target.labId);
  const requestSeq = useRef(0);
  const abortRef = useRef<AbortController | null>(null);
  // What the preview on screen was read with: a change of column, unit or addenda run re-reads the file.
  const previewedWith = useRef<string>("");

  const checked = draftToMapping(draft);
  const mapping = checked.mapping;
  const mappingKey = JSON.stringify(mapping);
  const isAddenda = target.kind === "addenda";

  const fields = useCallback(
    (): UploadFields => ({
      mapping,
      label: label.trim() || undefined,
      addendaRunId: !isAddenda && addendaRunId ? addendaRunId : undefined,
      platform: isAddenda ? platform.trim() || "unnamed platform" : undefined,
    }),
    // mappingKey stands for mapping's content.
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [mappingKey, label, addendaRunId, platform, isAddenda],
  );

  useEffect(() => {
    dialogRef.current?.querySelector<HTMLElement>("[data-autofocus]")?.focus();
  }, []);

  const readFile = (f: File) => {
    setError(null);
    setResult(null);
    if (f.size > MAX_UPLOAD_BYTES) {
      setError(new Error(`${f.name} is ${formatBytes(f.size)}; the limit is 20 MB. Export a smaller range or split the file.`));
      return;
    }
    setFile(f);
    setPhase("reading");
    setProgress(null);
    const seq = ++requestSeq.current;
    previewMutation.mutate(
      { file: f, fields: { platform: isAddenda ? "unnamed platform" : undefined }, onProgress: setProgress },
      {
        onSuccess: (p) => {
          if (seq !== requestSeq.current) return;
          setTable(p.table);
          setPreview(p);
          setDraft(p.mapping ? draftFromMapping(p.mapping) : draftFromProposal(p.proposal));
          previewedWith.current = JSON.stringify([p.mapping, ""]);
          setPhase("mapping");
        },
        onError: (e) => {
          if (seq !== requestSeq.current) return;
          setError(e);
          setPhase("choose");
        },
      },
    );
  };

  // Re-read with the chosen columns and units (debounced): the preview always shows what a commit would store.
  useEffect(() => {
    if (phase !== "mapping" || !file || !mapping) return;
    const key = JSON.stringify([mapping, addendaRunId]);
    if (key === previewedWith.current) return;
    const timer = setTimeout(() => {
      previewedWith.current = key;
      abortRef.current?.abort();
      const controller = new AbortController();
      abortRef.current = controller;
      const seq = ++requestSeq.current;
      setRefreshing(true);
      previewMutation.mutate(
        { file, fields: fields(), signal: controller.signal },
        {
          onSuccess: (p) => {
            if (seq !== requestSeq.current) return;
            setPreview(p);
            setError(null);
            setRefreshing(false);
          },
          onError: (e) => {
            if (seq !== requestSeq.current || (e instanceof DOMException && e.name === "AbortError")) return;
            previewedWith.current = "";
            setError(e);
            setPreview((old) => (old ? { ...old, runs: [] } : old));
            setRefreshing(false);
          },
        },
      );
    }, 300);
    return () => clearTimeout(timer);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [phase, file, mappingKey, addendaRunId]);

  useEffect(() => () => abortRef.current?.abort(), []);

  const commit = () => {
    if (!file || !mapping) return;
    setError(null);
    setProgress(null);
    setPhase("committing");
    abortRef.current?.abort();
    requestSeq.current++;
    commitMutation.mutate(
      { file, fields: fields(), onProgress: setProgress },
      {
        onSuccess: (r) => {
          setResult(r);
          setPhase("done");
        },
        onError: (e) => {
          setError(e);
          setPhase("mapping");
        },
      },
    );
  };

  const applyPreset = (presetId: string) => {
    setPresetMessage(null);
    const preset = presets.data?.find((p) => p.id === presetId);
    if (!preset || !table) return;
    const missing = missingColumns(preset.mapping, table.header);
    if (missing.length > 0) {
      setPresetMessage({ tone: "danger", text: `“${preset.name}” names column(s) ${missing.map((m) => `“${m}”`).join(", ")} that this file does not have.` });
      return;
    }
    setDraft(draftFromMapping(preset.mapping));
    setPresetMessage({ tone: "ok", text: `Columns and units set from “${preset.name}”.` });
  };

  const savePreset = () => {
    if (!mapping) return;
    setPresetMessage(null);
    createPreset.mutate(
      { name: presetName.trim(), mapping },
      {
        onSuccess: (p) => {
          setPresetMessage({ tone: "ok", text: `Saved as “${p.name}” for everyone in the lab.` });
          setPresetName("");
        },
        onError: (e) => setPresetMessage({ tone: "danger", text: e instanceof Error ? e.message : "Could not save the preset." }),
      },
    );
  };

  const onKeyDown = (e: KeyboardEvent<HTMLDivElement>) => {
    if (e.key === "Escape" && phase !== "committing") {
      e.stopPropagation();
      onClose();
      return;
    }
    if (e.key !== "Tab" || !dialogRef.current) return;
    // Keep the keyboard inside the dialog while it is open.
    const focusable = Array.from(
      dialogRef.current.querySelectorAll<HTMLElement>("a[href], button:not([disabled]), input:not([disabled]):not(.sr-only), select:not([disabled]), textarea, [tabindex='0']"),
    );
    if (focusable.length === 0) return;
    const first = focusable[0];
    const last = focusable[focusable.length - 1];
    if (e.shiftKey && document.activeElement === first) {
      e.preventDefault();
      last.focus();
    } else if (!e.shiftKey && document.activeElement === last) {
      e.preventDefault();
      first.focus();
    }
  };

  const duplicateOf = preview?.file.duplicateOfRunId ?? null;
  const conflictRunId =
    isApiError(error, 409) && error.details[0]?.path?.startsWith(DUPLICATE_RUN_PATH_PREFIX)
      ? error.details[0].path.slice(DUPLICATE_RUN_PATH_PREFIX.length)
      : null;
  const warnings = preview?.runs.flatMap((r) => r.warnings.map((w) => ({ ...w, message: preview.runs.length > 1 ? `${formatField(r.fieldT)}: ${w.message}` : w.message }))) ?? [];
  const fieldMapped = Boolean(draft.columns.field);
  const valueUnit = isAddenda ? "C (J/K)" : "Cp (J/(mol·K))";

  return (
    <div className="fixed inset-0 z-50 flex items-start justify-center overflow-y-auto bg-ink/40 p-4 sm:p-8">
      <div
        ref={dialogRef}
        role="dialog"
        aria-modal="true"
        aria-labelledby={headingId}
        onKeyDown={onKeyDown}
        className="w-full max-w-6xl rounded-card border border-line bg-surface shadow-card"
      >
        <header className="flex items-start justify-between gap-4 border-b border-line px-5 py-4">
          <div>
            <h2 id={headingId} tabIndex={-1} data-autofocus className="text-lg font-semibold text-ink focus:outline-none">
              {title}
            </h2>
            {file ? (
              <p className="text-sm text-ink-muted">
                {file.name} · {formatBytes(file.size)}
              </p>
            ) : null}
          </div>
          <Button variant="quiet" onClick={onClose} disabled={phase === "committing"}>
            Close
          </Button>
        </header>

        <div className="space-y-5 px-5 py-4">
          {error && !conflictRunId ? <UploadError error={error} /> : null}
          {conflictRunId ? (
            <Alert tone="caution" title="Already uploaded">
              {isApiError(error) ? error.message : null}. {link(runHref(conflictRunId), "Open the first upload")}
            </Alert>
          ) : null}

          {phase === "choose" ? <FileDrop onFile={readFile} disabled={false} /> : null}
          {phase === "reading" ? <ProgressBar progress={progress} label={`Uploading ${file?.name ?? "the file"} for a preview`} /> : null}

          {(phase === "mapping" || phase === "committing") && table ? (
            <>
              {duplicateOf ? (
                <Alert tone="caution" title="This exact file is already here">
                  A run of {isAddenda ? "this platform" : "this sample"} was made from the same bytes (same SHA-256). {link(runHref(duplicateOf), "Open it")}
                </Alert>
              ) : null}
              <section aria-labelledby={`${headingId}-columns`} className="space-y-3">
                <div className="flex flex-wrap items-end justify-between gap-3">
                  <h3 id={`${headingId}-columns`} className="text-base font-semibold text-ink">
                    What each column holds
                  </h3>
                  <div className="flex flex-wrap items-end gap-2">
                    <label className="text-sm text-ink">
                      <span className="block text-xs text-ink-muted">Saved presets</span>
                      <select
                        className="h-9 rounded-md border border-line-strong bg-surface px-2 text-sm"
                        value=""
                        onChange={(e) => applyPreset(e.target.value)}
                        disabled={!presets.data || presets.data.length === 0}
                      >
                        <option value="">{presets.data && presets.data.length > 0 ? "Use a preset…" : "No presets yet"}</option>
                        {presets.data?.map((p) => (
                          <option key={p.id} value={p.id}>
                            {p.name}
                          </option>
                        ))}
                      </select>
                    </label>
                  </div>
                </div>
                <ColumnMapping table={table} draft={draft} onChange={setDraft} />
                {checked.problems.length > 0 ? (
                  <Alert tone="info" title="Still to choose">
                    <ul className="list-disc pl-5">
                      {checked.problems.map((p) => (
                        <li key={p}>{p}</li>
                      ))}
                    </ul>
                  </Alert>
                ) : null}
                <div className="flex flex-wrap items-end gap-2">
                  <label className="text-sm text-ink">
                    <span className="block text-xs text-ink-muted">Save these columns and units as</span>
                    <input
                      className="h-9 w-64 rounded-md border border-line-strong bg-surface px-2 text-sm"
                      value={presetName}
                      placeholder="e.g. Platform P-2 comma export"
                      onChange={(e) => setPresetName(e.target.value)}
                    />
                  </label>
                  <Button variant="secondary" size="sm" disabled={!mapping || presetName.trim() === ""} pending={createPreset.isPending} onClick={savePreset}>
                    Save preset
                  </Button>
                </div>
                {presetMessage ? (
                  <p role="status" className={cn("text-sm", presetMessage.tone === "ok" ? "text-ok" : "text-danger")}>
                    {presetMessage.text}
                  </p>
                ) : null}
              </section>

              <div className="grid gap-5 lg:grid-cols-[minmax(0,1fr)_22rem]">
                <section aria-labelledby={`${headingId}-preview`} className="space-y-3">
                  <h3 id={`${headingId}-preview`} className="flex items-center gap-2 text-base font-semibold text-ink">
                    Preview {refreshing ? <span className="text-xs font-normal text-ink-muted">(re-reading…)</span> : null}
                  </h3>
                  {preview && preview.runs.length > 0 ? (
                    <>
                      <PreviewChart runs={preview.runs} atomsPerFormulaUnit={atomsPerFormulaUnit} unit={valueUnit} />
                      <p className="text-sm text-ink-muted">
                        {preview.runs.length > 1
                          ? `The field column splits this file into ${preview.runs.length} runs (${preview.runs.map((r) => formatField(r.fieldT)).join(", ")}).`
                          : "One run."}{" "}
                        Points at the same temperature are averaged; nothing is dropped.
                      </p>
                      <Warnings warnings={warnings} />
                    </>
                  ) : (
                    <p className="text-sm text-ink-muted">{mapping ? "Reading with these columns…" : "Choose the columns and units to see the reduced curve."}</p>
                  )}
                </section>
                <section aria-labelledby={`${headingId}-settings`} className="space-y-3">
                  <h3 id={`${headingId}-settings`} className="text-base font-semibold text-ink">
                    Run settings
                  </h3>
                  <label className="block text-sm text-ink">
                    <span className="block text-xs text-ink-muted">Run label (optional)</span>
                    <input className="h-9 w-full rounded-md border border-line-strong bg-surface px-2 text-sm" value={label} placeholder={file?.name} onChange={(e) => setLabel(e.target.value)} />
                  </label>
                  {isAddenda ? (
                    <label className="block text-sm text-ink">
                      <span className="block text-xs text-ink-muted">Instrument platform (puck)</span>
                      <input className="h-9 w-full rounded-md border border-line-strong bg-surface px-2 text-sm" value={platform} placeholder="e.g. P-2" onChange={(e) => setPlatform(e.target.value)} />
                    </label>
                  ) : (
                    <label className="block text-sm text-ink">
                      <span className="block text-xs text-ink-muted">Subtract an addenda run</span>
                      <select className="h-9 w-full rounded-md border border-line-strong bg-surface px-2 text-sm" value={addendaRunId} onChange={(e) => setAddendaRunId(e.target.value)}>
                        <option value="">None (the file is net of addenda)</option>
                        {addendaChoices.map((a) => (
                          <option key={a.id} value={a.id}>
                            {a.platform}: {a.label}
                          </option>
                        ))}
                      </select>
                      <span className="mt-1 block text-xs text-ink-muted">Interpolated onto this run’s temperatures, subtracted, uncertainties combined. Needs a total unit (J/K, mJ/K, µJ/K).</span>
                    </label>
                  )}
                  <SafetyNote topics={fieldMapped ? ["cryogens", "magnetic-field"] : ["cryogens"]} />
                </section>
              </div>

              {phase === "committing" ? <ProgressBar progress={progress} label="Uploading to store the run" /> : null}
              <div className="flex flex-wrap items-center justify-end gap-3 border-t border-line pt-4">
                {isAddenda && platform.trim() === "" ? <span className="text-sm text-ink-muted">Name the platform to commit.</span> : null}
                <Button variant="quiet" onClick={onClose} disabled={phase === "committing"}>
                  Cancel
                </Button>
                <Button
                  onClick={commit}
                  pending={phase === "committing"}
                  disabled={!mapping || !preview || preview.runs.length === 0 || refreshing || Boolean(duplicateOf) || (isAddenda && platform.trim() === "")}
                >
                  {warnings.length > 0 ? `Commit with ${warnings.length} warning${warnings.length > 1 ? "s" : ""}` : "Commit run"}
                </Button>
              </div>
            </>
          ) : null}

          {phase === "done" && result ? (
            <Alert tone="ok" title={result.runs.length > 1 ? `Stored ${result.runs.length} runs` : "Run stored"}>
              <ul className="list-disc pl-5">
                {result.runs.map((r) => (
                  <li key={r.id}>
                    {link(runHref(r.id), r.label)} — {r.pointCount} points, {r.tMinK.toPrecision(3)}–{r.tMaxK.toPrecision(4)} K
                    {r.maskedCount > 0 ? `, ${r.maskedCount} masked` : ""}
                  </li>
                ))}
              </ul>
              <p className="mt-1 text-xs text-ink-muted">The raw file is kept unchanged (SHA-256 {result.file.sha256.slice(0, 12)}…).</p>
            </Alert>
          ) : null}
          {phase === "done" ? (
            <div className="flex justify-end gap-2">
              <Button
                variant="secondary"
                onClick={() => {
                  setPhase("choose");
                  setFile(null);
                  setTable(null);
                  setPreview(null);
                  setResult(null);
                  setDraft(EMPTY_DRAFT);
                }}
              >
                Upload another
              </Button>
              <Button onClick={onClose}>Done</Button>
            </div>
          ) : null}
        </div>
      </div>
    </div>
  );
}
