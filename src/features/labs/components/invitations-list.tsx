import type { Invitation } from "@shared/schemas/labs";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { useRevokeInvitation } from "../api";
import { formatDate } from "../utils";
import { RoleBadge } from "./role-badge";

/** Invitations not yet accepted, newest first, each with a way to withdraw it. */
export function InvitationsList({ labId, invitations }: { labId: string; invitations: Invitation[] }) {
  const revoke = useRevokeInvitation(labId);
  const now = Date.now();
  const pending = invitations
    .filter((i) => i.acceptedAt === null)
    .sort((a, b) => b.createdAt.localeCompare(a.createdAt));

  if (pending.length === 0) {
    return <p className="px-5 py-4 text-sm text-ink-muted">No invitations waiting. People you invite show up here until they accept.</p>;
  }
  return (
    <div>
      {revoke.error && (
        <div className="px-5 pt-3">
          <Alert tone="danger" title="Could not withdraw the invitation">
            {revoke.error.message}
          </Alert>
        </div>
      )}
      <ul className="divide-y divide-line" aria-label="Pending invitations">
        {pending.map((invitation) => {
          const expired = new Date(invitation.expiresAt).getTime() < now;
          return (
            <li key={invitation.id} className="flex flex-wrap items-center gap-x-3 gap-y-1.5 px-5 py-3 text-sm">
              <span className="w-full font-medium break-all text-ink">{invitation.email}</span>
              <RoleBadge role={invitation.role} />
              <span className={expired ? "text-danger" : "text-ink-muted"}>
                {expired ? "Expired" : "Expires"} {formatDate(invitation.expiresAt)}
              </span>
              <span className="flex-1" />
              <Button
                size="sm"
                variant="quiet"
                pending={revoke.isPending && revoke.variables === invitation.id}
                onClick={() => revoke.mutate(invitation.id)}
              >
                Withdraw<span className="sr-only"> the invitation to {invitation.email}</span>
              </Button>
            </li>
          );
        })}
      </ul>
    </div>
  );
}
