import { useState, type FormEvent } from "react";
import { CreateComparisonBody } from "@shared/schemas/compare";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";
import { isApiError } from "@/lib/api-client";
import { useSaveComparison, type CompareSelection } from "../api";

/** Names and saves the current selection as lab data (researchers and leads). */
export function SaveComparisonForm({ labId, selection, onSaved }: { labId: string; selection: CompareSelection; onSaved: (id: string) => void }) {
  const [name, setName] = useState("");
  const [error, setError] = useState<string | undefined>();
  const save = useSaveComparison(labId);

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = CreateComparisonBody.safeParse({
      name,
      selection: { batchIds: selection.batchIds, sampleIds: selection.sampleIds },
      parameter: selection.parameter,
      groupBy: selection.groupBy,
    });
    if (!parsed.success) {
      setError(parsed.error.issues[0]?.message);
      return;
    }
    setError(undefined);
    save.mutate(parsed.data, {
      onSuccess: (c) => {
        setName("");
        onSaved(c.id);
      },
    });
  };

  const serverError = save.error && (isApiError(save.error, 409) ? "A saved comparison of this lab already has that name" : save.error.message);
  return (
    <form aria-label="Save this comparison" onSubmit={submit} className="space-y-3">
      <TextField
        label="Save as"
        name="name"
        value={name}
        onChange={(e) => setName(e.target.value)}
        error={error ?? serverError ?? undefined}
        hint="The batches, samples, parameter and grouping are kept; the values are read fresh each time."
        maxLength={120}
      />
      <Button type="submit" variant="secondary" pending={save.isPending}>
        Save comparison
      </Button>
      {save.isSuccess && (
        <Alert tone="ok" role="status">
          Saved as “{save.data.name}”.
        </Alert>
      )}
    </form>
  );
}
