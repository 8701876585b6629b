import { randomUUID } from "node:crypto";
import { and, asc, count, eq } from "drizzle-orm";
import type { Role } from "@shared/schemas/auth";
import type { Member } from "@shared/schemas/labs";
import type { Db } from "../db/client";
import { labs, memberships, users } from "../db/schema";
import { HttpError } from "../http-error";
import { audit } from "./audit";

export type LabRow = typeof labs.$inferSelect;

const roleOrder: Record<Role, number> = { lead: 0, researcher: 1, guest: 2 };

/**
 * Creates a lab with its first lead.
 * @param db the database (call inside a transaction when more follows)
 * @param input lab name, optional organisation and contact e-mail, and the account that leads it
 * @returns the new lab row
 */
export function createLab(
  db: Db,
  input: { name: string; organisation?: string; contactEmail?: string; leadUserId: string },
): LabRow {
  const now = Date.now();
  const row: LabRow = {
    id: randomUUID(),
    name: input.name.trim(),
    organisation: input.organisation ?? "",
    contactEmail: input.contactEmail ?? "",
    createdAt: now,
  };
  db.insert(labs).values(row).run();
  db.insert(memberships).values({ labId: row.id, userId: input.leadUserId, role: "lead", createdAt: now }).run();
  return row;
}

/**
 * The lab's name.
 * @param db the database
 * @param labId the lab
 * @throws HttpError 404 when there is no such lab
 */
export function getLab(db: Db, labId: string): LabRow {
  const lab = db.select().from(labs).where(eq(labs.id, labId)).get();
  if (!lab) throw new HttpError(404, "NOT_FOUND", "No such lab");
  return lab;
}

function memberRows(db: Db, labId: string, userId?: string) {
  return db
    .select({
      userId: users.id,
      email: users.email,
      displayName: users.displayName,
      role: memberships.role,
      joinedAt: memberships.createdAt,
    })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(userId ? and(eq(memberships.labId, labId), eq(memberships.userId, userId)) : eq(memberships.labId, labId))
    .orderBy(asc(users.displayName), asc(users.email))
    .all()
    .map((r): Member => ({ ...r, joinedAt: new Date(r.joinedAt).toISOString() }));
}

/**
 * Everyone in a lab: leads first, then researchers, then guests, each by name.
 * @param db the database
 * @param labId the lab
 */
export function listMembers(db: Db, labId: string): Member[] {
  return memberRows(db, labId).sort((a, b) => roleOrder[a.role] - roleOrder[b.role]);
}

function getMember(db: Db, labId: string, userId: string): Member {
  const member = memberRows(db, labId, userId)[0];
  if (!member) throw new HttpError(404, "NOT_FOUND", "No such member in this lab");
  return member;
}

function leadCount(db: Db, labId: string): number {
  return (
    db
      .select({ n: count() })
      .from(memberships)
      .where(and(eq(memberships.labId, labId), eq(memberships.role, "lead")))
      .get()?.n ?? 0
  );
}

function lastLeadConflict(what: string): HttpError {
  return new HttpError(409, "CONFLICT", `${what}: a lab needs at least one lead; make someone else lead first`);
}

/**
 * Sets a member's role; a lab always keeps at least one lead.
 * @param db the database
 * @param labId the lab
 * @param actorId the lead making the change (for the audit log)
 * @param userId the member whose role changes
 * @param role the new role
 * @returns the member after the change
 * @throws HttpError 404 when the user is not in the lab; 409 CONFLICT when this would leave no lead
 */
export function updateMemberRole(db: Db, labId: string, actorId: string, userId: string, role: Role): Member {
  return db.transaction(() => {
    const before = getMember(db, labId, userId);
    if (before.role === role) return before;
    if (before.role === "lead" && leadCount(db, labId) <= 1) throw lastLeadConflict("Cannot change the role of the last lead");
    db.update(memberships)
      .set({ role })
      .where(and(eq(memberships.labId, labId), eq(memberships.userId, userId)))
      .run();
    audit(db, {
      labId,
      userId: actorId,
      action: "member.role_changed",
      target: before.email,
      details: { userId, from: before.role, to: role },
    });
    return { ...before, role };
  });
}

/**
 * Removes a member from a lab (their account and other labs stay); a lab always keeps at least one lead.
 * @param db the database
 * @param labId the lab
 * @param actorId the lead removing them (for the audit log)
 * @param userId the member to remove
 * @throws HttpError 404 when the user is not in the lab; 409 CONFLICT when they are the last lead
 */
export function removeMember(db: Db, labId: string, actorId: string, userId: string): void {
  db.transaction(() => {
    const member = getMember(db, labId, userId);
    if (member.role === "lead" && leadCount(db, labId) <= 1) throw lastLeadConflict("Cannot remove the last lead");
    db.delete(memberships)
      .where(and(eq(memberships.labId, labId), eq(memberships.userId, userId)))
      .run();
    audit(db, {
      labId,
      userId: actorId,
      action: "member.removed",
      target: member.email,
      details: { userId, role: member.role },
    });
  });
}

/**
 * Whether an account (by id) is a member of a lab.
 * @param db the database
 * @param labId the lab
 * @param userId the account
 */
export function isMember(db: Db, labId: string, userId: string): boolean {
  return Boolean(
    db
      .select({ role: memberships.role })
      .from(memberships)
      .where(and(eq(memberships.labId, labId), eq(memberships.userId, userId)))
      .get(),
  );
}
