import { useRef, useState } from "react";
import { CreateInvitationBody } from "@shared/schemas/labs";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { SelectField, TextField } from "@/components/ui/field";
import { useSchemaForm } from "@/lib/use-schema-form";
import { useCreateInvitation } from "../api";
import { ROLE_LABELS, ROLE_OPTIONS, ROLE_SUMMARIES } from "../utils";
import type { Role } from "@shared/schemas/auth";

/** Leads invite someone by e-mail with a role; the invitee gets a link valid for 7 days. */
export function InviteForm({ labId }: { labId: string }) {
  const form = useSchemaForm(CreateInvitationBody);
  const create = useCreateInvitation(labId);
  const formRef = useRef<HTMLFormElement>(null);
  const [role, setRole] = useState<Role>("researcher");
  const [sent, setSent] = useState<{ email: string; role: Role } | null>(null);

  return (
    <form
      ref={formRef}
      noValidate
      aria-label="Invite someone"
      className="space-y-4"
      onSubmit={(event) => {
        event.preventDefault();
        setSent(null);
        const body = form.parse(event.currentTarget);
        if (!body) return;
        create.mutate(body, {
          onSuccess: (invitation) => {
            setSent({ email: invitation.email, role: invitation.role });
            formRef.current?.reset();
            setRole("researcher");
          },
          onError: form.showServerError,
        });
      }}
    >
      {form.formError && <Alert tone="danger">{form.formError}</Alert>}
      {sent && (
        <Alert tone="ok" title="Invitation sent">
          {sent.email} can join as {ROLE_LABELS[sent.role].toLowerCase()} through the link in the e-mail for the next 7 days.
        </Alert>
      )}
      <div className="grid gap-4 sm:grid-cols-[minmax(0,1fr)_12rem]">
        <TextField label="E-mail address" name="email" type="email" autoComplete="off" placeholder="name@institute.org" error={form.fieldErrors.email} />
        <SelectField
          label="Role"
          name="role"
          options={ROLE_OPTIONS}
          value={role}
          onChange={(event) => setRole(event.target.value as Role)}
          error={form.fieldErrors.role}
        />
      </div>
      <p className="text-xs text-ink-muted">
        A {ROLE_LABELS[role].toLowerCase()} {ROLE_SUMMARIES[role]}.
      </p>
      <Button type="submit" pending={create.isPending}>
        Send invitation
      </Button>
    </form>
  );
}
