import type { QueryClient } from "@tanstack/react-query";
import { Link, useNavigate, useParams, type LoaderFunctionArgs } from "react-router-dom";
import { SetupBody, type Me } from "@shared/schemas/auth";
import { AcceptInvitationBody, type InvitationPreview } from "@shared/schemas/labs";
import { Alert } from "@/components/ui/alert";
import { AuthFrame } from "@/components/ui/auth-frame";
import { Button, buttonClasses } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";
import { LoadingBlock } from "@/components/ui/spinner";
import { TextLink } from "@/components/ui/text-link";
import { invitationPreviewQueryOptions, meQueryOptions, useAcceptInvitation, useInvitationPreview, useMe, useSignOut } from "@/features/auth/api";
import { ROLE_LABELS, ROLE_SUMMARIES } from "@/features/labs/utils";
import { isApiError } from "@/lib/api-client";
import { confirmMatches, useSchemaForm } from "@/lib/use-schema-form";

/** A new person must give a name and password; the name rule is the one first-run setup uses. */
const NewAccountForm = AcceptInvitationBody.required().extend({ displayName: SetupBody.shape.displayName });

export const loader =
  (queryClient: QueryClient) =>
  async ({ params }: LoaderFunctionArgs) => {
    // prefetch, not ensure: a used or expired link is an answer the page explains, not a crash.
    await Promise.all([
      queryClient.prefetchQuery(invitationPreviewQueryOptions(params.token ?? "")),
      queryClient.ensureQueryData(meQueryOptions()),
    ]);
    return null;
  };

function labOf(me: Me, preview: InvitationPreview): string {
  const membership = me.memberships.find((m) => m.labName === preview.labName);
  return membership ? `/labs/${encodeURIComponent(membership.labId)}/samples` : "/";
}

export function Component() {
  const { token = "" } = useParams();
  const preview = useInvitationPreview(token);
  const me = useMe().data ?? null;

  if (preview.isPending) {
    return (
      <AuthFrame title="Invitation">
        <LoadingBlock label="Reading the invitation…" />
      </AuthFrame>
    );
  }
  if (preview.isError) {
    const gone = isApiError(preview.error, 404) || isApiError(preview.error, 410) || isApiError(preview.error, 400);
    return (
      <AuthFrame title="This invitation cannot be used" footer={<TextLink to="/sign-in">Go to sign-in</TextLink>}>
        <title>Invitation · Thetafold</title>
        <Alert tone="danger">
          {gone
            ? "The link has expired, was already used, or was withdrawn. Invitations work once, for 7 days. Ask the lab lead to send a new one."
            : preview.error.message}
        </Alert>
      </AuthFrame>
    );
  }
  const invitation = preview.data;
  const role = ROLE_LABELS[invitation.role].toLowerCase();
  return (
    <AuthFrame
      title={<>Join {invitation.labName}</>}
      description={
        <>
          You are invited as <strong className="font-semibold text-ink">{role}</strong>: a {role} {ROLE_SUMMARIES[invitation.role]}.
          The invitation is for <strong className="font-semibold text-ink">{invitation.email}</strong>.
        </>
      }
    >
      <title>{`Join ${invitation.labName} · Thetafold`}</title>
      <InvitationAction token={token} invitation={invitation} me={me} />
    </AuthFrame>
  );
}

function InvitationAction({ token, invitation, me }: { token: string; invitation: InvitationPreview; me: Me | null }) {
  const accept = useAcceptInvitation(token);
  const signOut = useSignOut();
  const navigate = useNavigate();
  const form = useSchemaForm(NewAccountForm);
  const here = `/invite/${encodeURIComponent(token)}`;
  const signedInAsInvitee = me !== null && me.user.email.toLowerCase() === invitation.email.toLowerCase();

  if (me && !signedInAsInvitee) {
    return (
      <div className="space-y-4">
        <Alert tone="caution" title={`You are signed in as ${me.user.email}`}>
          This invitation is for {invitation.email}. Sign out, then {invitation.hasAccount ? "sign in as" : "come back to this link to create the account for"}{" "}
          {invitation.email}.
        </Alert>
        <Button variant="secondary" pending={signOut.isPending} onClick={() => signOut.mutate()}>
          Sign out
        </Button>
      </div>
    );
  }

  if (invitation.hasAccount && !signedInAsInvitee) {
    const signIn = `/sign-in?${new URLSearchParams({ next: here, email: invitation.email })}`;
    return (
      <div className="space-y-4">
        <p className="text-sm text-ink-muted">{invitation.email} already has a Thetafold account. Sign in with it to accept.</p>
        <Link to={signIn} className={buttonClasses("primary", "md", "w-full")}>
          Sign in to accept
        </Link>
      </div>
    );
  }

  if (signedInAsInvitee) {
    return (
      <div className="space-y-4">
        {accept.error && <Alert tone="danger">{accept.error.message}</Alert>}
        <Button className="w-full" pending={accept.isPending} onClick={() => accept.mutate({}, { onSuccess: (next) => navigate(labOf(next, invitation), { replace: true }) })}>
          Join {invitation.labName}
        </Button>
      </div>
    );
  }

  return (
    <form
      noValidate
      className="space-y-4"
      onSubmit={(event) => {
        event.preventDefault();
        const body = form.parse(event.currentTarget, confirmMatches("password"));
        if (!body) return;
        accept.mutate(body, {
          onSuccess: (next) => navigate(labOf(next, invitation), { replace: true }),
          onError: form.showServerError,
        });
      }}
    >
      {form.formError && <Alert tone="danger">{form.formError}</Alert>}
      <TextField label="E-mail address" name="emailShown" value={invitation.email} readOnly hint="Fixed by the invitation. You will sign in with it." />
      <TextField label="Your name" name="displayName" autoComplete="name" hint="As colleagues will see it in the lab." error={form.fieldErrors.displayName} />
      <TextField label="Password" name="password" type="password" autoComplete="new-password" hint="At least 10 characters." error={form.fieldErrors.password} />
      <TextField label="Password again" name="confirmPassword" type="password" autoComplete="new-password" error={form.fieldErrors.confirmPassword} />
      <Button type="submit" className="w-full" pending={accept.isPending}>
        Create account and join
      </Button>
    </form>
  );
}
