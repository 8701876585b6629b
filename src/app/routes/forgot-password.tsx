import { useState } from "react";
import { RequestResetBody } from "@shared/schemas/auth";
import { Alert } from "@/components/ui/alert";
import { AuthFrame } from "@/components/ui/auth-frame";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";
import { TextLink } from "@/components/ui/text-link";
import { useRequestReset, useSetupStatus } from "@/features/auth/api";
import { useSchemaForm } from "@/lib/use-schema-form";

export function Component() {
  const form = useSchemaForm(RequestResetBody);
  const requestReset = useRequestReset();
  const fakeMail = useSetupStatus().data?.fakeMail ?? false;
  const [sentTo, setSentTo] = useState<string | null>(null);

  return (
    <AuthFrame
      title="Choose a new password"
      description="Give the address you sign in with. We e-mail a link that lets you set a new password; it works for one hour."
      footer={<TextLink to="/sign-in">Back to sign-in</TextLink>}
    >
      <title>Forgot password · Thetafold</title>
      {sentTo ? (
        <div className="space-y-4">
          <Alert tone="ok" title="Check your inbox">
            If {sentTo} has an account here, a link to choose a new password is on its way. It works for one hour and only once.
          </Alert>
          {fakeMail && (
            <p className="text-sm text-ink-muted">
              This install keeps its e-mail in a built-in test mailbox instead of sending it out; a site administrator can
              read it on the Outbox page.
            </p>
          )}
          <Button variant="secondary" onClick={() => setSentTo(null)}>
            Use another address
          </Button>
        </div>
      ) : (
        <form
          noValidate
          className="space-y-4"
          onSubmit={(event) => {
            event.preventDefault();
            const body = form.parse(event.currentTarget);
            if (!body) return;
            requestReset.mutate(body, { onSuccess: () => setSentTo(body.email), onError: form.showServerError });
          }}
        >
          {form.formError && <Alert tone="danger">{form.formError}</Alert>}
          <TextField label="E-mail address" name="email" type="email" autoComplete="username" error={form.fieldErrors.email} />
          <Button type="submit" className="w-full" pending={requestReset.isPending}>
            Send the link
          </Button>
        </form>
      )}
    </AuthFrame>
  );
}
