import { randomUUID } from "node:crypto";
import { and, desc, eq, gt, isNull } from "drizzle-orm";
import type { Role } from "@shared/schemas/auth";
import type { AcceptInvitationBody, Invitation, InvitationPreview } from "@shared/schemas/labs";
import type { Mailer } from "../context";
import type { Db } from "../db/client";
import { invitations, memberships, users } from "../db/schema";
import { HttpError } from "../http-error";
import { audit } from "./audit";
import { hashLinkToken, newLinkToken } from "./auth";
import { getLab, isMember } from "./labs";
import { findUserByEmail, hashPassword, insertUser, normalizeEmail } from "./users";

/** How long an invitation link works: 7 days, in ms. */
export const INVITATION_TTL_MS = 7 * 24 * 60 * 60 * 1000;

type InvitationRow = typeof invitations.$inferSelect;

const roleWords: Record<Role, string> = {
  lead: "lead (manages members and roles, approves fits)",
  researcher: "researcher (adds samples, uploads runs, fits models)",
  guest: "guest (reads the lab's samples, runs, fits and comparisons, downloads bundles)",
};

function toInvitation(r: InvitationRow): Invitation {
  return {
    id: r.id,
    email: r.email,
    role: r.role,
    createdAt: new Date(r.createdAt).toISOString(),
    expiresAt: new Date(r.expiresAt).toISOString(),
    acceptedAt: r.acceptedAt === null ? null : new Date(r.acceptedAt).toISOString(),
  };
}

/** One answer for an unknown, expired or already used link, so the three cannot be told apart. */
function invitationGone(): HttpError {
  return new HttpError(410, "GONE", "This invitation link is not valid: it expired, was already used or was withdrawn");
}

/**
 * Every invitation of a lab (pending, accepted and expired), newest first.
 * @param db the database
 * @param labId the lab
 */
export function listInvitations(db: Db, labId: string): Invitation[] {
  return db
    .select()
    .from(invitations)
    .where(eq(invitations.labId, labId))
    .orderBy(desc(invitations.createdAt), desc(invitations.id))
    .all()
    .map(toInvitation);
}

/**
 * Invites an address into a lab with a role and e-mails the link `${publicUrl}/invite/${token}`. A pending
 * invitation of the same address to the same lab is replaced (its link stops working). If the e-mail cannot
 * be sent, the invitation is taken back, so nothing is left half done.
 * @param db the database
 * @param mailer where the message goes
 * @param input lab, inviting lead, address, role, and the public origin for the link
 * @returns the invitation (the token itself is only in the e-mail)
 * @throws HttpError 409 CONFLICT when the address already belongs to a member; 500 when the mail fails
 */
export async function createInvitation(
  db: Db,
  mailer: Mailer,
  input: { labId: string; inviterId: string; email: string; role: Role; publicUrl: string },
): Promise<Invitation> {
  const email = normalizeEmail(input.email);
  const lab = getLab(db, input.labId);
  const inviter = db.select().from(users).where(eq(users.id, input.inviterId)).get();
  const { token, tokenHash } = newLinkToken();
  const now = Date.now();
  const row: InvitationRow = {
    id: randomUUID(),
    labId: lab.id,
    email,
    role: input.role,
    tokenHash,
    invitedBy: input.inviterId,
    createdAt: now,
    expiresAt: now + INVITATION_TTL_MS,
    acceptedAt: null,
  };
  db.transaction(() => {
    const existing = findUserByEmail(db, email);
    if (existing && isMember(db, lab.id, existing.id)) {
      throw new HttpError(409, "CONFLICT", `${email} is already a member of this lab`, [
        { path: "email", message: "already a member" },
      ]);
    }
    const replaced = db
      .delete(invitations)
      .where(and(eq(invitations.labId, lab.id), eq(invitations.email, email), isNull(invitations.acceptedAt)))
      .run().changes;
    db.insert(invitations).values(row).run();
    audit(db, {
      labId: lab.id,
      userId: input.inviterId,
      action: "invitation.created",
      target: email,
      details: { invitationId: row.id, role: input.role, replacedPending: replaced },
    });
  });

  const link = `${input.publicUrl.replace(/\/+$/, "")}/invite/${token}`;
  const who = inviter ? `${inviter.displayName} (${inviter.email})` : "A lab lead";
  const text = [
    `${who} invited you to join the lab "${lab.name}" on Thetafold as ${roleWords[input.role]}.`,
    "",
    "Open this link to accept:",
    link,
    "",
    `The link works once and expires on ${new Date(row.expiresAt).toUTCString()}.`,
    "If you did not expect this message, ignore it: nothing happens unless the link is opened.",
  ].join("\n");
  try {
    await mailer.send({ to: email, subject: `Invitation to join ${lab.name} on Thetafold`, text });
  } catch (err) {
    db.delete(invitations).where(eq(invitations.id, row.id)).run();
    console.error("[mail] invitation not sent", err);
    throw new HttpError(500, "INTERNAL", "The invitation e-mail could not be sent, so no invitation was made; try again");
  }
  return toInvitation(row);
}

/**
 * Withdraws a pending invitation (its link stops working).
 * @param db the database
 * @param labId the lab
 * @param actorId the lead withdrawing it
 * @param invitationId the invitation
 * @throws HttpError 404 when the lab has no such invitation; 409 CONFLICT when it was already accepted
 */
export function revokeInvitation(db: Db, labId: string, actorId: string, invitationId: string): void {
  db.transaction(() => {
    const row = db
      .select()
      .from(invitations)
      .where(and(eq(invitations.id, invitationId), eq(invitations.labId, labId)))
      .get();
    if (!row) throw new HttpError(404, "NOT_FOUND", "No such invitation in this lab");
    if (row.acceptedAt !== null) {
      throw new HttpError(409, "CONFLICT", "This invitation was already accepted; remove the member instead");
    }
    db.delete(invitations).where(eq(invitations.id, invitationId)).run();
    audit(db, { labId, userId: actorId, action: "invitation.revoked", target: row.email, details: { invitationId, role: row.role } });
  });
}

function findUsableInvitation(db: Db, token: string): InvitationRow {
  const row = db
    .select()
    .from(invitations)
    .where(
      and(
        eq(invitations.tokenHash, hashLinkToken(token)),
        isNull(invitations.acceptedAt),
        gt(invitations.expiresAt, Date.now()),
      ),
    )
    .get();
  if (!row) throw invitationGone();
  return row;
}

/**
 * What the invitee sees before accepting.
 * @param db the database
 * @param token the token from the link
 * @returns lab name, invited address, role, and whether that address already has an account
 * @throws HttpError 410 GONE for an unknown, expired or used token (one answer for all three)
 */
export function previewInvitation(db: Db, token: string): InvitationPreview {
  const row = findUsableInvitation(db, token);
  const lab = getLab(db, row.labId);
  return { labName: lab.name, email: row.email, role: row.role, hasAccount: Boolean(findUserByEmail(db, row.email)) };
}

/** Marks the invitation used; false when someone else used it first (or it expired in between). */
function claim(db: Db, invitationId: string): boolean {
  const now = Date.now();
  return (
    db
      .update(invitations)
      .set({ acceptedAt: now })
      .where(and(eq(invitations.id, invitationId), isNull(invitations.acceptedAt), gt(invitations.expiresAt, now)))
      .run().changes === 1
  );
}

/**
 * Accepts an invitation. For a new address it creates the account from displayName and password; for an
 * address that already has an account, the caller must be signed in as that account.
 * @param db the database
 * @param token the token from the link
 * @param body displayName and password (needed only for a new account)
 * @param caller the signed-in account, or null
 * @returns the account that joined and whether it was created now (then the route signs it in)
 * @throws HttpError 410 GONE (unknown/expired/used), 401 (existing account, not signed in), 403 (signed in as
 *   someone else), 400 (new account without name or password), 409 (already a member)
 */
export async function acceptInvitation(
  db: Db,
  token: string,
  body: AcceptInvitationBody,
  caller: { id: string } | null,
): Promise<{ userId: string; created: boolean }> {
  const row = findUsableInvitation(db, token);
  const existing = findUserByEmail(db, row.email);

  if (existing) {
    if (!caller) throw new HttpError(401, "UNAUTHENTICATED", `Sign in as ${row.email} first, then open the link again`);
    if (caller.id !== existing.id) {
      throw new HttpError(403, "FORBIDDEN", `This invitation is for ${row.email}; sign out and sign in as that account`);
    }
    db.transaction(() => {
      if (isMember(db, row.labId, existing.id)) throw new HttpError(409, "CONFLICT", "You are already a member of this lab");
      if (!claim(db, row.id)) throw invitationGone();
      db.insert(memberships).values({ labId: row.labId, userId: existing.id, role: row.role, createdAt: Date.now() }).run();
      audit(db, { labId: row.labId, userId: existing.id, action: "invitation.accepted", target: row.email, details: { invitationId: row.id, role: row.role } });
    });
    return { userId: existing.id, created: false };
  }

  const missing = [
    ...(body.displayName ? [] : [{ path: "displayName", message: "Enter your name" }]),
    ...(body.password ? [] : [{ path: "password", message: "Choose a password" }]),
  ];
  if (missing.length > 0) {
    throw new HttpError(400, "VALIDATION_FAILED", `${missing[0].path}: ${missing[0].message}`, missing);
  }
  const passwordHash = await hashPassword(body.password as string);
  const userId = db.transaction(() => {
    if (!claim(db, row.id)) throw invitationGone();
    const user = insertUser(db, { email: row.email, displayName: body.displayName as string, passwordHash });
    db.insert(memberships).values({ labId: row.labId, userId: user.id, role: row.role, createdAt: Date.now() }).run();
    audit(db, { labId: row.labId, userId: user.id, action: "invitation.accepted", target: row.email, details: { invitationId: row.id, role: row.role, accountCreated: true } });
    return user.id;
  });
  return { userId, created: true };
}
