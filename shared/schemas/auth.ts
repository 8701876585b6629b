import { z } from "zod";

export const RoleSchema = z.enum(["lead", "researcher", "guest"]);
export type Role = z.infer<typeof RoleSchema>;

/** Password rule shared by sign-up, reset and change forms. */
export const PasswordSchema = z.string().min(10, "Use at least 10 characters").max(200, "Use at most 200 characters");

export const SignInBody = z.object({
  email: z.email("Enter an e-mail address").max(254),
  password: z.string().min(1, "Enter your password").max(200),
});
export type SignInBody = z.infer<typeof SignInBody>;

/** First account on an empty install: becomes site administrator and lead of a new lab. */
export const SetupBody = z.object({
  email: z.email("Enter an e-mail address").max(254),
  displayName: z.string().trim().min(1, "Enter your name").max(120),
  password: PasswordSchema,
  labName: z.string().trim().min(1, "Name the lab").max(120),
});
export type SetupBody = z.infer<typeof SetupBody>;

export const ChangePasswordBody = z.object({
  currentPassword: z.string().min(1, "Enter your current password").max(200),
  newPassword: PasswordSchema,
});
export type ChangePasswordBody = z.infer<typeof ChangePasswordBody>;

export const RequestResetBody = z.object({ email: z.email("Enter an e-mail address").max(254) });
export type RequestResetBody = z.infer<typeof RequestResetBody>;

export const ResetPasswordBody = z.object({ token: z.string().min(20).max(200), newPassword: PasswordSchema });
export type ResetPasswordBody = z.infer<typeof ResetPasswordBody>;

export const MembershipSchema = z.object({ labId: z.string(), labName: z.string(), role: RoleSchema });
export type Membership = z.infer<typeof MembershipSchema>;

export const UserSchema = z.object({
  id: z.string(),
  email: z.string(),
  displayName: z.string(),
  isSiteAdmin: z.boolean(),
});
export type User = z.infer<typeof UserSchema>;

/** GET /api/me */
export const MeSchema = z.object({ user: UserSchema, memberships: z.array(MembershipSchema) });
export type Me = z.infer<typeof MeSchema>;

/** GET /api/setup: whether the install still needs its first account. */
export const SetupStatusSchema = z.object({ needsSetup: z.boolean(), fakeMail: z.boolean() });
export type SetupStatus = z.infer<typeof SetupStatusSchema>;
