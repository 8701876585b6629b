import type { QueryClient } from "@tanstack/react-query";
import { redirect, useNavigate, useSearchParams, type LoaderFunctionArgs } from "react-router-dom";
import { SignInBody } from "@shared/schemas/auth";
import { Alert } from "@/components/ui/alert";
import { AuthFrame } from "@/components/ui/auth-frame";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";
import { TextLink } from "@/components/ui/text-link";
import { meQueryOptions, setupStatusQueryOptions, useSignIn } from "@/features/auth/api";
import { safeNextPath } from "@/features/auth/utils";
import { useSchemaForm } from "@/lib/use-schema-form";

export const loader =
  (queryClient: QueryClient) =>
  async ({ request }: LoaderFunctionArgs) => {
    const status = await queryClient.ensureQueryData(setupStatusQueryOptions());
    if (status.needsSetup) return redirect("/setup");
    const me = await queryClient.ensureQueryData(meQueryOptions());
    if (me) return redirect(safeNextPath(new URL(request.url).searchParams.get("next")) ?? "/");
    return null;
  };

export function Component() {
  const [params] = useSearchParams();
  const navigate = useNavigate();
  const signIn = useSignIn();
  const form = useSchemaForm(SignInBody);
  const next = safeNextPath(params.get("next"));
  const resetDone = params.get("reset") === "done";

  return (
    <AuthFrame
      title="Sign in"
      description="Welcome back. Your lab's samples, runs and fits are waiting."
      footer={<>New here? People join Thetafold by invitation: ask your lab lead, then follow the link in the e-mail.</>}
    >
      <title>Sign in · Thetafold</title>
      <form
        noValidate
        className="space-y-4"
        onSubmit={(event) => {
          event.preventDefault();
          const body = form.parse(event.currentTarget);
          if (!body) return;
          signIn.mutate(body, {
            onSuccess: () => navigate(next ?? "/", { replace: true }),
            onError: form.showServerError,
          });
        }}
      >
        {resetDone && !form.formError && (
          <Alert tone="ok" title="Password changed">
            Sign in with your new password.
          </Alert>
        )}
        {next && !resetDone && !form.formError && <Alert tone="info">Sign in to continue to that page.</Alert>}
        {form.formError && <Alert tone="danger">{form.formError}</Alert>}
        <TextField
          label="E-mail address"
          name="email"
          type="email"
          autoComplete="username"
          defaultValue={params.get("email") ?? ""}
          error={form.fieldErrors.email}
        />
        <div className="space-y-1">
          <TextField label="Password" name="password" type="password" autoComplete="current-password" error={form.fieldErrors.password} />
          <p className="text-right text-xs">
            <TextLink to="/forgot-password">Forgot your password?</TextLink>
          </p>
        </div>
        <Button type="submit" className="w-full" pending={signIn.isPending}>
          Sign in
        </Button>
      </form>
    </AuthFrame>
  );
}
