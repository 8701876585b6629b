import { useState } from "react";
import { RoleSchema, type Role } from "@shared/schemas/auth";
import type { Member } from "@shared/schemas/labs";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { useRemoveMember, useUpdateMemberRole } from "../api";
import { formatDate, ROLE_LABELS, ROLE_OPTIONS } from "../utils";
import { RoleBadge } from "./role-badge";

interface MembersTableProps {
  labId: string;
  members: Member[];
  /** Leads see role pickers and remove buttons; the server refuses the rest anyway. */
  canManage: boolean;
  currentUserId: string;
  /** Called after a member's role or membership changed (the route refreshes the session when it was yours). */
  onChanged?: (userId: string) => void;
}

export function MembersTable({ labId, members, canManage, currentUserId, onChanged }: MembersTableProps) {
  const sorted = [...members].sort((a, b) => a.displayName.localeCompare(b.displayName));
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-left text-sm">
        <caption className="sr-only">Members of this lab and their roles</caption>
        <thead className="bg-sunken text-xs tracking-wide text-ink-muted uppercase">
          <tr>
            <th scope="col" className="px-5 py-2 font-medium">
              Person
            </th>
            <th scope="col" className="hidden px-3 py-2 font-medium sm:table-cell">
              Joined
            </th>
            <th scope="col" className="px-3 py-2 font-medium">
              Role
            </th>
            {canManage && (
              <th scope="col" className="px-5 py-2 text-right font-medium">
                <span className="sr-only">Actions</span>
              </th>
            )}
          </tr>
        </thead>
        <tbody className="divide-y divide-line">
          {sorted.map((member) => (
            <MemberRow
              key={member.userId}
              labId={labId}
              member={member}
              canManage={canManage}
              isSelf={member.userId === currentUserId}
              onChanged={onChanged}
            />
          ))}
        </tbody>
      </table>
    </div>
  );
}

function MemberRow({
  labId,
  member,
  canManage,
  isSelf,
  onChanged,
}: {
  labId: string;
  member: Member;
  canManage: boolean;
  isSelf: boolean;
  onChanged?: (userId: string) => void;
}) {
  const [role, setRole] = useState<Role>(member.role);
  const [confirmingRemove, setConfirmingRemove] = useState(false);
  const updateRole = useUpdateMemberRole(labId);
  const remove = useRemoveMember(labId);
  const error = updateRole.error ?? remove.error;
  const name = member.displayName || member.email;
  const columns = canManage ? 4 : 3;

  const saveRole = () =>
    updateRole.mutate(
      { userId: member.userId, role },
      {
        onSuccess: () => onChanged?.(member.userId),
        onError: () => setRole(member.role),
      },
    );

  return (
    <>
      <tr className="align-middle">
        <td className="px-5 py-3">
          <div className="font-medium text-ink">
            {name}
            {isSelf && <span className="ml-2 text-xs font-normal text-ink-muted">(you)</span>}
          </div>
          <div className="text-xs text-ink-muted">{member.email}</div>
        </td>
        <td className="hidden px-3 py-3 whitespace-nowrap text-ink-muted sm:table-cell">{formatDate(member.joinedAt)}</td>
        <td className="px-3 py-3">
          {canManage ? (
            <div className="flex items-center gap-2">
              <label className="sr-only" htmlFor={`role-${member.userId}`}>
                Role of {name}
              </label>
              <select
                id={`role-${member.userId}`}
                value={role}
                onChange={(event) => {
                  updateRole.reset();
                  setRole(RoleSchema.parse(event.target.value));
                }}
                className="h-8 rounded-md border border-line-strong bg-surface px-2 text-sm text-ink"
              >
                {ROLE_OPTIONS.map((o) => (
                  <option key={o.value} value={o.value}>
                    {o.label}
                  </option>
                ))}
              </select>
              {role !== member.role && (
                <Button size="sm" pending={updateRole.isPending} onClick={saveRole}>
                  Save role<span className="sr-only"> of {name}</span>
                </Button>
              )}
            </div>
          ) : (
            <RoleBadge role={member.role} />
          )}
        </td>
        {canManage && (
          <td className="px-5 py-3 text-right">
            {!isSelf &&
              (confirmingRemove ? (
                <div className="inline-flex items-center gap-2">
                  <span className="text-xs text-ink-muted">Remove from the lab?</span>
                  <Button
                    size="sm"
                    variant="danger"
                    pending={remove.isPending}
                    onClick={() =>
                      remove.mutate(member.userId, {
                        onSuccess: () => onChanged?.(member.userId),
                        onSettled: () => setConfirmingRemove(false),
                      })
                    }
                  >
                    Yes, remove<span className="sr-only"> {name}</span>
                  </Button>
                  <Button size="sm" variant="quiet" onClick={() => setConfirmingRemove(false)}>
                    Keep
                  </Button>
                </div>
              ) : (
                <Button
                  size="sm"
                  variant="quiet"
                  aria-label={`Remove ${name}`}
                  onClick={() => {
                    remove.reset();
                    setConfirmingRemove(true);
                  }}
                >
                  Remove…
                </Button>
              ))}
          </td>
        )}
      </tr>
      {error && (
        <tr>
          <td colSpan={columns} className="px-5 pb-3">
            <Alert
              tone="danger"
              title={
                updateRole.error && updateRole.variables
                  ? `Could not change the role of ${name} to ${ROLE_LABELS[updateRole.variables.role].toLowerCase()}`
                  : `Could not remove ${name}`
              }
            >
              {error.message}
            </Alert>
          </td>
        </tr>
      )}
    </>
  );
}
