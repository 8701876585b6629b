import type { QueryClient } from "@tanstack/react-query";
import { redirect, useNavigate } from "react-router-dom";
import { SetupBody } from "@shared/schemas/auth";
import { Alert } from "@/components/ui/alert";
import { AuthFrame } from "@/components/ui/auth-frame";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";
import { setupStatusQueryOptions, useSetup } from "@/features/auth/api";
import { confirmMatches, useSchemaForm } from "@/lib/use-schema-form";

/** Only an empty install shows this page; afterwards people join by invitation. */
export const loader = (queryClient: QueryClient) => async () => {
  const status = await queryClient.ensureQueryData(setupStatusQueryOptions());
  return status.needsSetup ? null : redirect("/sign-in");
};

export function Component() {
  const form = useSchemaForm(SetupBody);
  const setup = useSetup();
  const navigate = useNavigate();
  return (
    <AuthFrame
      title="Set up Thetafold"
      description="This install has no accounts yet. The first account looks after the site and leads the first lab; everyone else joins by invitation."
    >
      <title>Set up · Thetafold</title>
      <form
        noValidate
        className="space-y-4"
        onSubmit={(event) => {
          event.preventDefault();
          const body = form.parse(event.currentTarget, confirmMatches("password"));
          if (!body) return;
          setup.mutate(body, {
            onSuccess: (me) => {
              const labId = me.memberships[0]?.labId;
              navigate(labId ? `/labs/${encodeURIComponent(labId)}/lab` : "/", { replace: true });
            },
            onError: form.showServerError,
          });
        }}
      >
        {form.formError && <Alert tone="danger">{form.formError}</Alert>}
        <TextField label="Your name" name="displayName" autoComplete="name" error={form.fieldErrors.displayName} />
        <TextField label="E-mail address" name="email" type="email" autoComplete="username" error={form.fieldErrors.email} />
        <TextField
          label="Password"
          name="password"
          type="password"
          autoComplete="new-password"
          hint="At least 10 characters. A few unrelated words are easy to type and hard to guess."
          error={form.fieldErrors.password}
        />
        <TextField label="Password again" name="confirmPassword" type="password" autoComplete="new-password" error={form.fieldErrors.confirmPassword} />
        <TextField
          label="Name of your lab"
          name="labName"
          hint="As your group calls itself, e.g. “Low-temperature calorimetry group”. You can invite people next."
          error={form.fieldErrors.labName}
        />
        <Button type="submit" className="w-full" pending={setup.isPending}>
          Create account and lab
        </Button>
      </form>
    </AuthFrame>
  );
}
