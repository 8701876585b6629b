import { desc, eq } from "drizzle-orm";
import type { AuditEntry } from "@shared/schemas/labs";
import type { Db } from "../db/client";
import { auditLog, memberships, users } from "../db/schema";

/** What one audit row records. `labId` null means a site-level event (e.g. a sign-in by someone in no lab). */
export interface AuditInput {
  labId: string | null;
  userId: string | null;
  /** Dotted action name, e.g. "member.role_changed", "auth.sign_in". */
  action: string;
  /** What the action was done to, in words a lead can read (an e-mail, a sample label). */
  target?: string;
  details?: Record<string, unknown>;
}

/**
 * Writes one audit row. Later features (approvals, deletions, share links) call this too.
 * @param db the database (may be a transaction)
 * @param entry who did what to what, in which lab
 * @returns nothing; the row gets its own id and the current time (ms since epoch)
 */
export function audit(db: Db, entry: AuditInput): void {
  db.insert(auditLog)
    .values({
      labId: entry.labId,
      userId: entry.userId,
      action: entry.action,
      target: entry.target ?? "",
      details: entry.details ?? null,
      createdAt: Date.now(),
    })
    .run();
}

/**
 * Writes an account event (sign-in, sign-out, password change) once into the audit log of every lab the
 * user belongs to, so each lab's lead sees it; a user in no lab gets one site-level row.
 * @param db the database
 * @param userId the account the event belongs to
 * @param action dotted action name
 * @param details optional extra facts
 */
export function auditAccountEvent(db: Db, userId: string, action: string, details?: Record<string, unknown>): void {
  const labIds = db
    .select({ labId: memberships.labId })
    .from(memberships)
    .where(eq(memberships.userId, userId))
    .all()
    .map((r) => r.labId);
  const user = db.select({ email: users.email }).from(users).where(eq(users.id, userId)).get();
  const target = user?.email ?? "";
  if (labIds.length === 0) {
    audit(db, { labId: null, userId, action, target, details });
    return;
  }
  for (const labId of labIds) audit(db, { labId, userId, action, target, details });
}

/** Most rows one audit listing returns. */
export const AUDIT_LIST_LIMIT = 500;

/**
 * The lab's audit log, newest first (at most AUDIT_LIST_LIMIT rows).
 * @param db the database
 * @param labId the lab
 * @returns entries with the acting user's e-mail (null when that account is gone)
 */
export function listAudit(db: Db, labId: string): AuditEntry[] {
  return db
    .select({
      id: auditLog.id,
      action: auditLog.action,
      target: auditLog.target,
      userEmail: users.email,
      details: auditLog.details,
      createdAt: auditLog.createdAt,
    })
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.userId))
    .where(eq(auditLog.labId, labId))
    .orderBy(desc(auditLog.createdAt), desc(auditLog.id))
    .limit(AUDIT_LIST_LIMIT)
    .all()
    .map((r) => ({
      id: r.id,
      action: r.action,
      target: r.target,
      userEmail: r.userEmail ?? null,
      details: r.details ?? null,
      createdAt: new Date(r.createdAt).toISOString(),
    }));
}
