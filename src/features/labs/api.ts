import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import type { Role } from "@shared/schemas/auth";
import {
  AuditEntrySchema,
  InvitationSchema,
  MemberSchema,
  type CreateInvitationBody,
} from "@shared/schemas/labs";
import { api } from "@/lib/api-client";

/** Keys of one lab's people: members, pending invitations and the audit log. */
export const labKeys = {
  all: ["labs"] as const,
  lab: (labId: string) => [...labKeys.all, labId] as const,
  members: (labId: string) => [...labKeys.lab(labId), "members"] as const,
  invitations: (labId: string) => [...labKeys.lab(labId), "invitations"] as const,
  audit: (labId: string) => [...labKeys.lab(labId), "audit"] as const,
};

const base = (labId: string) => `/api/labs/${encodeURIComponent(labId)}`;

export function membersQueryOptions(labId: string) {
  return queryOptions({
    queryKey: labKeys.members(labId),
    queryFn: ({ signal }) => api.get(`${base(labId)}/members`, z.array(MemberSchema), signal),
  });
}

/** Lead only (the server answers 403 to others). */
export function invitationsQueryOptions(labId: string) {
  return queryOptions({
    queryKey: labKeys.invitations(labId),
    queryFn: ({ signal }) => api.get(`${base(labId)}/invitations`, z.array(InvitationSchema), signal),
  });
}

/** Lead only. */
export function auditQueryOptions(labId: string) {
  return queryOptions({
    queryKey: labKeys.audit(labId),
    queryFn: ({ signal }) => api.get(`${base(labId)}/audit`, z.array(AuditEntrySchema), signal),
  });
}

export function useMembers(labId: string) {
  return useQuery(membersQueryOptions(labId));
}

export function useInvitations(labId: string, enabled: boolean) {
  return useQuery({ ...invitationsQueryOptions(labId), enabled });
}

export function useAudit(labId: string, enabled: boolean) {
  return useQuery({ ...auditQueryOptions(labId), enabled });
}

/** After any change to a lab's people, its members, invitations and audit log are all stale. */
function useInvalidateLab(labId: string) {
  const queryClient = useQueryClient();
  return () => queryClient.invalidateQueries({ queryKey: labKeys.lab(labId) });
}

export function useUpdateMemberRole(labId: string) {
  const invalidate = useInvalidateLab(labId);
  return useMutation({
    mutationFn: ({ userId, role }: { userId: string; role: Role }) =>
      api.patch(`${base(labId)}/members/${encodeURIComponent(userId)}`, { role }, MemberSchema),
    onSuccess: invalidate,
  });
}

export function useRemoveMember(labId: string) {
  const invalidate = useInvalidateLab(labId);
  return useMutation({
    mutationFn: (userId: string) => api.delete(`${base(labId)}/members/${encodeURIComponent(userId)}`),
    onSuccess: invalidate,
  });
}

export function useCreateInvitation(labId: string) {
  const invalidate = useInvalidateLab(labId);
  return useMutation({
    mutationFn: (body: CreateInvitationBody) => api.post(`${base(labId)}/invitations`, body, InvitationSchema),
    onSuccess: invalidate,
  });
}

export function useRevokeInvitation(labId: string) {
  const invalidate = useInvalidateLab(labId);
  return useMutation({
    mutationFn: (invitationId: string) => api.delete(`${base(labId)}/invitations/${encodeURIComponent(invitationId)}`),
    onSuccess: invalidate,
  });
}
