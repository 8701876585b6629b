import { useRef, useState } from "react";
import { Link } from "react-router-dom";
import { ChangePasswordBody } from "@shared/schemas/auth";
import { Alert } from "@/components/ui/alert";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { DisplaySettings } from "@/components/ui/display-settings";
import { TextField } from "@/components/ui/field";
import { LINK_CLASSES } from "@/components/ui/text-link";
import { MeasuredValue } from "@/components/ui/measured-value";
import { PageHeader } from "@/components/ui/page-header";
import { useChangePassword, useMe } from "@/features/auth/api";
import { RoleBadge } from "@/features/labs/components/role-badge";
import { confirmMatches, useSchemaForm } from "@/lib/use-schema-form";

export function Component() {
  const me = useMe().data;
  if (!me) return null;
  return (
    <>
      <title>Account · Thetafold</title>
      <PageHeader title="Your account" description="Sign-in details, password, and how this browser shows numbers." />
      <div className="grid grid-cols-1 items-start gap-6 lg:grid-cols-2">
        <Card>
          <CardHeader title="Profile" />
          <CardBody>
            <dl className="grid grid-cols-[7rem_minmax(0,1fr)] gap-x-4 gap-y-2 text-sm">
              <dt className="text-ink-muted">Name</dt>
              <dd className="text-ink">{me.user.displayName}</dd>
              <dt className="text-ink-muted">E-mail</dt>
              <dd className="text-ink">{me.user.email}</dd>
              {me.user.isSiteAdmin && (
                <>
                  <dt className="text-ink-muted">Site</dt>
                  <dd>
                    <Badge tone="caution">Site administrator</Badge>
                  </dd>
                </>
              )}
              <dt className="text-ink-muted">Labs</dt>
              <dd>
                <ul className="space-y-1.5">
                  {me.memberships.map((m) => (
                    <li key={m.labId} className="flex items-center gap-2">
                      <Link to={`/labs/${encodeURIComponent(m.labId)}/lab`} className={LINK_CLASSES}>
                        {m.labName}
                      </Link>
                      <RoleBadge role={m.role} />
                    </li>
                  ))}
                </ul>
              </dd>
            </dl>
          </CardBody>
        </Card>
        <Card>
          <CardHeader title="Change password" description="You stay signed in here; other sessions of this account end." />
          <CardBody>
            <ChangePasswordForm />
          </CardBody>
        </Card>
        <Card className="lg:col-span-2">
          <CardHeader
            title="Display"
            description={
              <>
                Kept in this browser. Example: <MeasuredValue value={0.6951} sigma={0.0032} unit="J/(mol·K)" />
              </>
            }
          />
          <CardBody>
            <DisplaySettings />
          </CardBody>
        </Card>
      </div>
    </>
  );
}

function ChangePasswordForm() {
  const form = useSchemaForm(ChangePasswordBody);
  const change = useChangePassword();
  const formRef = useRef<HTMLFormElement>(null);
  const [done, setDone] = useState(false);
  return (
    <form
      ref={formRef}
      noValidate
      className="space-y-4"
      onSubmit={(event) => {
        event.preventDefault();
        setDone(false);
        const body = form.parse(event.currentTarget, confirmMatches("newPassword"));
        if (!body) return;
        change.mutate(body, {
          onSuccess: () => {
            setDone(true);
            formRef.current?.reset();
          },
          onError: form.showServerError,
        });
      }}
    >
      {form.formError && <Alert tone="danger">{form.formError}</Alert>}
      {done && <Alert tone="ok">Password changed.</Alert>}
      <TextField label="Current password" name="currentPassword" type="password" autoComplete="current-password" error={form.fieldErrors.currentPassword} />
      <TextField label="New password" name="newPassword" type="password" autoComplete="new-password" hint="At least 10 characters." error={form.fieldErrors.newPassword} />
      <TextField label="New password again" name="confirmPassword" type="password" autoComplete="new-password" error={form.fieldErrors.confirmPassword} />
      <Button type="submit" pending={change.isPending}>
        Change password
      </Button>
    </form>
  );
}
