import { z } from "zod";
import { RoleSchema } from "./auth";

export const LabParams = z.object({ labId: z.string().min(1).max(64) });
export type LabParams = z.infer<typeof LabParams>;

export const MemberSchema = z.object({
  userId: z.string(),
  email: z.string(),
  displayName: z.string(),
  role: RoleSchema,
  joinedAt: z.string(),
});
export type Member = z.infer<typeof MemberSchema>;

export const MemberParams = LabParams.extend({ userId: z.string().min(1).max(64) });
export const UpdateMemberBody = z.object({ role: RoleSchema });
export type UpdateMemberBody = z.infer<typeof UpdateMemberBody>;

export const CreateInvitationBody = z.object({
  email: z.email("Enter an e-mail address").max(254),
  role: RoleSchema,
});
export type CreateInvitationBody = z.infer<typeof CreateInvitationBody>;

export const InvitationSchema = z.object({
  id: z.string(),
  email: z.string(),
  role: RoleSchema,
  createdAt: z.string(),
  expiresAt: z.string(),
  acceptedAt: z.string().nullable(),
});
export type Invitation = z.infer<typeof InvitationSchema>;

export const InvitationTokenParams = z.object({ token: z.string().min(20).max(200) });

export const InvitationParams = LabParams.extend({ invitationId: z.string().min(1).max(64) });
export type InvitationParams = z.infer<typeof InvitationParams>;

/** GET /api/invitations/:token: what the invitee sees before accepting. */
export const InvitationPreviewSchema = z.object({
  labName: z.string(),
  email: z.string(),
  role: RoleSchema,
  hasAccount: z.boolean(),
});
export type InvitationPreview = z.infer<typeof InvitationPreviewSchema>;

/** POST /api/invitations/:token/accept: new users give a name and password; existing users must be signed in as the invitee. */
export const AcceptInvitationBody = z.object({
  displayName: z.string().trim().min(1).max(120).optional(),
  password: z.string().min(10, "Use at least 10 characters").max(200).optional(),
});
export type AcceptInvitationBody = z.infer<typeof AcceptInvitationBody>;

export const OutboxMessageSchema = z.object({
  id: z.string(),
  from: z.string(),
  to: z.string(),
  subject: z.string(),
  text: z.string(),
  receivedAt: z.string(),
});
export type OutboxMessage = z.infer<typeof OutboxMessageSchema>;

export const AuditEntrySchema = z.object({
  id: z.number(),
  action: z.string(),
  target: z.string(),
  userEmail: z.string().nullable(),
  details: z.record(z.string(), z.unknown()).nullable(),
  createdAt: z.string(),
});
export type AuditEntry = z.infer<typeof AuditEntrySchema>;
