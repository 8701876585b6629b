import { useId, useState, type FormEvent } from "react";
import { CreateBundleBody } from "@shared/schemas/bundles";
import type { Comparison } from "@shared/schemas/compare";
import type { Batch, Sample } from "@shared/schemas/samples";
import { Alert, ErrorNotice } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { SelectField, TextField } from "@/components/ui/field";
import { useBuildBundle } from "../api";
import { phaseWords, sizeText } from "../utils";

interface BuildBundleFormProps {
  labId: string;
  samples: readonly Sample[];
  batches: readonly Batch[];
  comparisons: readonly Comparison[];
}

/** Chooses samples (by batch or one by one) or a saved comparison, names the bundle, builds it with progress. */
export function BuildBundleForm({ labId, samples, batches, comparisons }: BuildBundleFormProps) {
  const sourceName = useId();
  const [name, setName] = useState("");
  const [source, setSource] = useState<"samples" | "comparison">(comparisons.length > 0 && samples.length === 0 ? "comparison" : "samples");
  const [sampleIds, setSampleIds] = useState<string[]>([]);
  const [comparisonId, setComparisonId] = useState(comparisons[0]?.id ?? "");
  const [problem, setProblem] = useState<string | undefined>();
  const build = useBuildBundle(labId);

  const byBatch = new Map<string | null, Sample[]>();
  for (const s of samples) byBatch.set(s.batchId, [...(byBatch.get(s.batchId) ?? []), s]);
  const groups = [...batches.map((b) => ({ id: b.id as string | null, label: b.code })), { id: null, label: "No batch" }].filter((g) => byBatch.has(g.id));

  const toggle = (ids: string[], on: boolean) => setSampleIds((cur) => (on ? [...new Set([...cur, ...ids])] : cur.filter((x) => !ids.includes(x))));

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const body = source === "samples" ? { name, sampleIds } : { name, comparisonId: comparisonId || null };
    const parsed = CreateBundleBody.safeParse(body);
    if (!parsed.success) {
      setProblem(parsed.error.issues[0]?.message);
      return;
    }
    if (source === "samples" && sampleIds.length === 0) {
      setProblem("Tick at least one sample");
      return;
    }
    if (source === "comparison" && !comparisonId) {
      setProblem("Choose a saved comparison");
      return;
    }
    setProblem(undefined);
    build.mutate(body);
  };

  const p = build.progress;
  const percent = p && p.total > 0 ? Math.round((100 * p.done) / p.total) : 0;
  return (
    <form aria-label="Build a bundle" onSubmit={submit} className="space-y-4">
      <TextField
        label="Bundle name"
        name="name"
        value={name}
        onChange={(e) => setName(e.target.value)}
        maxLength={120}
        hint="Shown to whoever downloads it, e.g. “Substitution series, θ_D by batch”."
        error={problem === "Name the bundle" ? problem : undefined}
      />
      <fieldset className="space-y-2">
        <legend className="text-sm font-medium text-ink">What goes in</legend>
        <div className="flex flex-wrap gap-4 text-sm text-ink">
          <label className="inline-flex items-center gap-2">
            <input type="radio" name={sourceName} checked={source === "samples"} onChange={() => setSource("samples")} />
            Samples with their runs and approved fits
          </label>
          <label className="inline-flex items-center gap-2">
            <input type="radio" name={sourceName} checked={source === "comparison"} onChange={() => setSource("comparison")} disabled={comparisons.length === 0} />
            A saved comparison {comparisons.length === 0 && <span className="text-xs text-ink-muted">(none saved yet)</span>}
          </label>
        </div>
      </fieldset>
      {source === "samples" ? (
        samples.length === 0 ? (
          <p className="text-sm text-ink-muted">This lab has no samples yet. Add samples and upload their runs first.</p>
        ) : (
          <div className="max-h-72 space-y-3 overflow-y-auto rounded-lg border border-line p-3">
            {groups.map((g) => {
              const members = byBatch.get(g.id) ?? [];
              const ids = members.map((s) => s.id);
              const all = ids.every((id) => sampleIds.includes(id));
              return (
                <fieldset key={g.id ?? "none"} className="space-y-1">
                  <legend className="text-sm font-medium text-ink">
                    <label className="inline-flex items-center gap-2">
                      <input type="checkbox" checked={all} onChange={(e) => toggle(ids, e.target.checked)} aria-label={`Whole batch ${g.label}`} />
                      <span className="font-mono">{g.label}</span>
                    </label>
                  </legend>
                  <ul className="space-y-1 pl-6 text-sm text-ink">
                    {members.map((s) => (
                      <li key={s.id}>
                        <label className="inline-flex items-center gap-2">
                          <input type="checkbox" checked={sampleIds.includes(s.id)} onChange={(e) => toggle([s.id], e.target.checked)} />
                          {s.label}
                          <span className="text-xs text-ink-muted">
                            {s.runCount} run{s.runCount === 1 ? "" : "s"}
                          </span>
                        </label>
                      </li>
                    ))}
                  </ul>
                </fieldset>
              );
            })}
          </div>
        )
      ) : (
        <SelectField
          label="Saved comparison"
          name="comparisonId"
          value={comparisonId}
          onChange={(e) => setComparisonId(e.target.value)}
          options={comparisons.map((c) => ({ value: c.id, label: c.name }))}
          hint="The bundle holds the comparison table and every approved fit in it, with their runs and samples."
        />
      )}
      {problem && problem !== "Name the bundle" && (
        <Alert tone="danger" role="alert">
          {problem}
        </Alert>
      )}
      <Button type="submit" pending={build.isPending}>
        Build bundle
      </Button>
      {build.isPending && (
        <div className="space-y-1" role="status" aria-live="polite">
          <progress className="h-2 w-full accent-[var(--color-ember)]" max={100} value={p ? percent : undefined} aria-label="Bundle build progress" />
          <p className="text-xs text-ink-muted">{p ? `${phaseWords(p.phase)} (${p.done} of ${p.total})` : "Starting…"}</p>
        </div>
      )}
      {build.isError && <ErrorNotice error={build.error} title="The bundle was not built" />}
      {build.isSuccess && (
        <Alert tone="ok" role="status">
          Built “{build.data.name}”: {build.data.contents.length} files, {sizeText(build.data.sizeBytes)}. It is listed below.
        </Alert>
      )}
      <p className="text-xs text-ink-muted">Only approved fits go into a bundle; drafts are left out, and naming one is refused.</p>
    </form>
  );
}
