import { useNavigate, useParams } from "react-router-dom";
import { ResetPasswordBody } from "@shared/schemas/auth";
import { Alert } from "@/components/ui/alert";
import { AuthFrame } from "@/components/ui/auth-frame";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";
import { TextLink } from "@/components/ui/text-link";
import { useResetPassword } from "@/features/auth/api";
import { confirmMatches, useSchemaForm } from "@/lib/use-schema-form";

export function Component() {
  const { token = "" } = useParams();
  const navigate = useNavigate();
  const form = useSchemaForm(ResetPasswordBody);
  const reset = useResetPassword();

  return (
    <AuthFrame
      title="Set a new password"
      description="Pick a password of at least 10 characters. Other signed-in sessions of this account end when it changes."
      footer={<TextLink to="/sign-in">Back to sign-in</TextLink>}
    >
      <title>New password · Thetafold</title>
      <form
        noValidate
        className="space-y-4"
        onSubmit={(event) => {
          event.preventDefault();
          const body = form.parse(event.currentTarget, confirmMatches("newPassword"));
          if (!body) return;
          reset.mutate(body, {
            onSuccess: () => navigate("/sign-in?reset=done", { replace: true }),
            onError: form.showServerError,
          });
        }}
      >
        <input type="hidden" name="token" value={token} />
        {(form.formError || form.fieldErrors.token) && (
          <Alert tone="danger" title="This link cannot be used">
            {form.formError ?? "The link is incomplete."} Links work once and for one hour.{" "}
            <TextLink to="/forgot-password">Ask for a new link</TextLink>.
          </Alert>
        )}
        <TextField label="New password" name="newPassword" type="password" autoComplete="new-password" error={form.fieldErrors.newPassword} />
        <TextField label="New password again" name="confirmPassword" type="password" autoComplete="new-password" error={form.fieldErrors.confirmPassword} />
        <Button type="submit" className="w-full" pending={reset.isPending}>
          Save the new password
        </Button>
      </form>
    </AuthFrame>
  );
}
