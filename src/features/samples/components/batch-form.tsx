import { CreateBatchBody, type Batch } from "@shared/schemas/samples";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";
import { useSchemaForm } from "@/lib/use-schema-form";
import { useCreateBatch } from "../api";

/** A new synthesis batch: its code (unique in the lab), date, method and notes. */
export function BatchForm({ labId, onDone, onCancel }: { labId: string; onDone: (batch: Batch) => void; onCancel?: () => void }) {
  const form = useSchemaForm(CreateBatchBody);
  const create = useCreateBatch(labId);
  return (
    <form
      noValidate
      aria-label="New batch"
      className="space-y-4"
      onSubmit={(event) => {
        event.preventDefault();
        const body = form.parse(event.currentTarget);
        if (!body) return;
        create.mutate(body, { onSuccess: onDone, onError: form.showServerError });
      }}
    >
      {form.formError && <Alert tone="danger">{form.formError}</Alert>}
      <div className="grid gap-4 sm:grid-cols-2">
        <TextField label="Batch code" name="code" placeholder="e.g. SIG-B4" error={form.fieldErrors.code} />
        <TextField label="Synthesis date (optional)" name="synthesisDate" type="date" error={form.fieldErrors.synthesisDate} />
        <TextField label="Method (optional)" name="method" placeholder="e.g. arc melting, 7 d anneal" className="sm:col-span-2" error={form.fieldErrors.method} />
        <TextField label="Notes (optional)" name="notes" className="sm:col-span-2" error={form.fieldErrors.notes} />
      </div>
      <div className="flex gap-2">
        <Button type="submit" pending={create.isPending}>
          Add batch
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
