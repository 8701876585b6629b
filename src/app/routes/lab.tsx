import { useQueryClient, type QueryClient } from "@tanstack/react-query";
import { useParams, type LoaderFunctionArgs } from "react-router-dom";
import { ErrorNotice } from "@/components/ui/alert";
import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { PageHeader } from "@/components/ui/page-header";
import { LoadingBlock } from "@/components/ui/spinner";
import { authKeys, meQueryOptions, useMe, useMembership } from "@/features/auth/api";
import { AuditLog } from "@/features/labs/components/audit-log";
import { InvitationsList } from "@/features/labs/components/invitations-list";
import { InviteForm } from "@/features/labs/components/invite-form";
import { MembersTable } from "@/features/labs/components/members-table";
import { RoleBadge } from "@/features/labs/components/role-badge";
import {
  auditQueryOptions,
  invitationsQueryOptions,
  membersQueryOptions,
  useAudit,
  useInvitations,
  useMembers,
} from "@/features/labs/api";

export const loader =
  (queryClient: QueryClient) =>
  async ({ params }: LoaderFunctionArgs) => {
    const labId = params.labId ?? "";
    const me = await queryClient.ensureQueryData(meQueryOptions());
    const membership = me?.memberships.find((m) => m.labId === labId);
    if (!membership) return null; // lab-scope answers 404 for this; loaders run side by side, so do not ask the API
    const isLead = membership.role === "lead";
    // prefetch: a failed list shows inline with a retry instead of replacing the page.
    await Promise.all([
      queryClient.prefetchQuery(membersQueryOptions(labId)),
      ...(isLead ? [queryClient.prefetchQuery(invitationsQueryOptions(labId)), queryClient.prefetchQuery(auditQueryOptions(labId))] : []),
    ]);
    return null;
  };

/** The lab's people: members and roles for everyone; invitations, role changes and the audit log for leads. */
export function Component() {
  const { labId = "" } = useParams();
  const me = useMe().data;
  const membership = useMembership(labId);
  const isLead = membership?.role === "lead";
  const members = useMembers(labId);
  const invitations = useInvitations(labId, isLead);
  const audit = useAudit(labId, isLead);
  const queryClient = useQueryClient();

  const onMemberChanged = (userId: string) => {
    // Your own role changed: the header, the menu and this page's controls follow your new role.
    if (userId === me?.user.id) void queryClient.invalidateQueries({ queryKey: authKeys.me() });
  };

  return (
    <>
      <title>{`Lab · ${membership?.labName ?? "Lab"} · Thetafold`}</title>
      <PageHeader
        eyebrow="Lab"
        title={membership?.labName ?? "Lab"}
        description={
          isLead
            ? "Invite people, set what each may do, and see who changed what."
            : "Who works in this lab and in which role. Leads invite people and change roles."
        }
        actions={
          membership && (
            <span className="flex items-center gap-2 text-sm text-ink-muted">
              Your role <RoleBadge role={membership.role} />
            </span>
          )
        }
      />
      <div className="grid grid-cols-1 items-start gap-6 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <Card>
          <CardHeader
            title="Members"
            description={members.data ? `${members.data.length} ${members.data.length === 1 ? "person" : "people"}` : undefined}
          />
          {members.isPending && (
            <CardBody>
              <LoadingBlock label="Loading members…" />
            </CardBody>
          )}
          {members.isError && (
            <CardBody>
              <ErrorNotice title="Could not load the members" error={members.error} onRetry={() => void members.refetch()} />
            </CardBody>
          )}
          {members.data && me && (
            <MembersTable labId={labId} members={members.data} canManage={isLead} currentUserId={me.user.id} onChanged={onMemberChanged} />
          )}
        </Card>

        {isLead && (
          <div className="space-y-6">
            <Card>
              <CardHeader title="Invite someone" description="They get an e-mail with a link to join this lab." />
              <CardBody>
                <InviteForm labId={labId} />
              </CardBody>
            </Card>
            <Card>
              <CardHeader title="Pending invitations" />
              {invitations.isPending && (
                <CardBody>
                  <LoadingBlock label="Loading invitations…" />
                </CardBody>
              )}
              {invitations.isError && (
                <CardBody>
                  <ErrorNotice error={invitations.error} onRetry={() => void invitations.refetch()} />
                </CardBody>
              )}
              {invitations.data && <InvitationsList labId={labId} invitations={invitations.data} />}
            </Card>
          </div>
        )}

        {isLead && (
          <Card className="lg:col-span-2">
            <CardHeader title="Audit log" description="Every change to this lab's people, newest first." />
            {audit.isPending && (
              <CardBody>
                <LoadingBlock label="Loading the audit log…" />
              </CardBody>
            )}
            {audit.isError && (
              <CardBody>
                <ErrorNotice error={audit.error} onRetry={() => void audit.refetch()} />
              </CardBody>
            )}
            {audit.data && <AuditLog entries={audit.data} />}
          </Card>
        )}
      </div>
    </>
  );
}
