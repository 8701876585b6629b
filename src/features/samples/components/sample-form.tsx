import { useMemo, useRef, useState } from "react";
import { parseFormula } from "@shared/ingest/formula";
import type { Batch, CreateSampleBody, Sample } from "@shared/schemas/samples";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { SelectField, TextField } from "@/components/ui/field";
import { useSchemaForm } from "@/lib/use-schema-form";
import { useCreateSample, useUpdateSample } from "../api";
import { formatPlain, SampleCreateFormSchema, SampleUpdateFormSchema } from "../utils";

interface SampleFormProps {
  labId: string;
  batches: readonly Batch[];
  /** Edit this sample; omit to create a new one. */
  sample?: Sample;
  onDone: (sample: Sample) => void;
  onCancel?: () => void;
}

function FormulaReadout({ formula }: { formula: string }) {
  const info = useMemo(() => {
    if (formula.trim() === "") return null;
    try {
      return parseFormula(formula);
    } catch (e) {
      return e instanceof Error ? e.message : String(e);
    }
  }, [formula]);
  if (info === null) return <p className="text-xs text-ink-muted">Molar mass and atoms per formula unit follow from the formula.</p>;
  if (typeof info === "string") return null;
  return (
    <p className="text-xs text-ink-muted" aria-live="polite">
      From the formula: <span className="font-mono">M = {formatPlain(info.molarMassGPerMol)} g/mol</span>,{" "}
      <span className="font-mono">n = {formatPlain(info.atomsPerFormulaUnit)}</span> atoms per formula unit.
    </p>
  );
}

/**
 * Create or edit a sample. Checked in the browser with the server's own schema (CreateSampleBody /
 * UpdateSampleBody), so a field error reads the same here as from the API.
 */
export function SampleForm({ labId, batches, sample, onDone, onCancel }: SampleFormProps) {
  const editing = sample !== undefined;
  const form = useSchemaForm(editing ? SampleUpdateFormSchema : SampleCreateFormSchema);
  const create = useCreateSample(labId);
  const update = useUpdateSample(labId, sample?.id ?? "");
  const formRef = useRef<HTMLFormElement>(null);
  const [formula, setFormula] = useState(sample?.formula ?? "");
  const [override, setOverride] = useState(Boolean(sample?.molarMassOverrideReason || sample?.atomsOverrideReason));
  const pending = create.isPending || update.isPending;
  const batchOptions = [{ value: "", label: "No batch" }, ...batches.map((b) => ({ value: b.id, label: b.code }))];

  return (
    <form
      ref={formRef}
      noValidate
      aria-label={editing ? `Edit sample ${sample.label}` : "New sample"}
      className="space-y-4"
      onSubmit={(event) => {
        event.preventDefault();
        const body = form.parse(event.currentTarget);
        if (!body) return;
        const options = { onSuccess: onDone, onError: form.showServerError };
        if (editing) update.mutate(body, options);
        else create.mutate(body as CreateSampleBody, options);
      }}
    >
      {form.formError && <Alert tone="danger">{form.formError}</Alert>}
      <div className="grid gap-4 sm:grid-cols-2">
        <TextField label="Label" name="label" defaultValue={sample?.label} placeholder="e.g. SIG-B1-a" error={form.fieldErrors.label} />
        <SelectField label="Batch" name="batchId" options={batchOptions} defaultValue={sample?.batchId ?? ""} error={form.fieldErrors.batchId} />
        <div className="space-y-1.5 sm:col-span-2">
          <TextField
            label="Formula"
            name="formula"
            value={formula}
            onChange={(e) => setFormula(e.target.value)}
            placeholder="e.g. Cu, Al2O3, Ba8Ga16Ge30, Sc2Ir3Sn3.4Ge0.6"
            autoComplete="off"
            spellCheck={false}
            error={form.fieldErrors.formula}
          />
          <FormulaReadout formula={formula} />
        </div>
        <TextField label="Mass (mg)" name="massMg" inputMode="decimal" defaultValue={sample?.massMg} error={form.fieldErrors.massMg} />
        <TextField
          label="Mass uncertainty (mg)"
          name="massSigmaMg"
          inputMode="decimal"
          defaultValue={sample?.massSigmaMg}
          hint="Standard uncertainty of the weighing; blank means 0."
          error={form.fieldErrors.massSigmaMg}
        />
        <TextField
          label="Composition variable x (optional)"
          name="compositionX"
          inputMode="decimal"
          defaultValue={sample?.compositionX ?? ""}
          hint="For series: the value compared across batches."
          error={form.fieldErrors.compositionX}
        />
        <TextField label="Name of x (optional)" name="compositionName" defaultValue={sample?.compositionName ?? ""} placeholder="e.g. x (Ge)" error={form.fieldErrors.compositionName} />
      </div>
      <div className="space-y-3 rounded-lg border border-line p-3">
        <label className="flex items-center gap-2 text-sm text-ink">
          <input type="checkbox" checked={override} onChange={(e) => setOverride(e.target.checked)} />
          Override the molar mass or the atom count from the formula
        </label>
        {override ? (
          <div className="grid gap-4 sm:grid-cols-2">
            <TextField label="Molar mass (g/mol)" name="molarMassGPerMol" inputMode="decimal" defaultValue={sample?.molarMassOverrideReason ? sample.molarMassGPerMol : ""} hint="Blank: from the formula." error={form.fieldErrors.molarMassGPerMol} />
            <TextField label="Why the molar mass differs" name="molarMassOverrideReason" defaultValue={sample?.molarMassOverrideReason ?? ""} error={form.fieldErrors.molarMassOverrideReason} />
            <TextField label="Atoms per formula unit" name="atomsPerFormulaUnit" inputMode="decimal" defaultValue={sample?.atomsOverrideReason ? sample.atomsPerFormulaUnit : ""} hint="Blank: from the formula." error={form.fieldErrors.atomsPerFormulaUnit} />
            <TextField label="Why the atom count differs" name="atomsOverrideReason" defaultValue={sample?.atomsOverrideReason ?? ""} error={form.fieldErrors.atomsOverrideReason} />
          </div>
        ) : null}
      </div>
      <div className="space-y-1.5">
        <label htmlFor="sample-notes" className="block text-sm font-medium text-ink">
          Notes (optional)
        </label>
        <textarea id="sample-notes" name="notes" rows={3} defaultValue={sample?.notes} className="block w-full rounded-lg border border-line-strong bg-surface px-3 py-2 text-sm text-ink" />
      </div>
      <div className="flex gap-2">
        <Button type="submit" pending={pending}>
          {editing ? "Save changes" : "Add sample"}
        </Button>
        {onCancel ? (
          <Button variant="quiet" onClick={onCancel}>
            Cancel
          </Button>
        ) : null}
      </div>
    </form>
  );
}
