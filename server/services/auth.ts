import { createHash, randomBytes } from "node:crypto";
import { eq } from "drizzle-orm";
import type { SetupBody } from "@shared/schemas/auth";
import type { Db } from "../db/client";
import { users } from "../db/schema";
import { HttpError } from "../http-error";
import { audit, auditAccountEvent } from "./audit";
import { createLab } from "./labs";
import { countUsers, dummyVerify, findUserByEmail, hashPassword, insertUser, setPasswordHash, verifyPassword, type UserRow } from "./users";

/** The one answer for an unknown e-mail and a wrong password, so neither tells which it was. */
const BAD_PAIR_MESSAGE = "E-mail or password is wrong";

/**
 * A fresh single-use token for an e-mailed link, and the hash that is stored in its place.
 * 32 random bytes (256 bits) in base64url (43 characters); only the SHA-256 (hex) is kept.
 * @returns the token for the link and its storage hash
 */
export function newLinkToken(): { token: string; tokenHash: string } {
  const token = randomBytes(32).toString("base64url");
  return { token, tokenHash: hashLinkToken(token) };
}

/**
 * SHA-256 of a link token, hex; what invitations and password resets store.
 * @param token the token from the link
 */
export function hashLinkToken(token: string): string {
  return createHash("sha256").update(token, "utf8").digest("hex");
}

/**
 * Checks an e-mail and password. Unknown e-mails cost one dummy argon2 verify so timing does not tell them
 * apart from wrong passwords; failures on a known account are written to the audit log.
 * @param db the database
 * @param email address as typed
 * @param password the plain password
 * @returns the account
 * @throws HttpError 401 UNAUTHENTICATED with the same message for both failures
 */
export async function authenticate(db: Db, email: string, password: string): Promise<UserRow> {
  const user = findUserByEmail(db, email);
  if (!user) {
    await dummyVerify(password);
    throw new HttpError(401, "UNAUTHENTICATED", BAD_PAIR_MESSAGE);
  }
  if (!(await verifyPassword(user.passwordHash, password))) {
    auditAccountEvent(db, user.id, "auth.sign_in_failed");
    throw new HttpError(401, "UNAUTHENTICATED", BAD_PAIR_MESSAGE);
  }
  return user;
}

/**
 * Changes a password after checking the current one. The caller then ends every other session.
 * @param db the database
 * @param userId the signed-in account
 * @param currentPassword must match the stored hash
 * @param newPassword already checked against PasswordSchema
 * @throws HttpError 400 VALIDATION_FAILED (path currentPassword) when the current password is wrong
 */
export async function changePassword(db: Db, userId: string, currentPassword: string, newPassword: string): Promise<void> {
  const user = db.select().from(users).where(eq(users.id, userId)).get();
  if (!user) throw new HttpError(401, "UNAUTHENTICATED", "Sign in first");
  if (!(await verifyPassword(user.passwordHash, currentPassword))) {
    throw new HttpError(400, "VALIDATION_FAILED", "currentPassword: the current password is wrong", [
      { path: "currentPassword", message: "The current password is wrong" },
    ]);
  }
  setPasswordHash(db, userId, await hashPassword(newPassword));
  auditAccountEvent(db, userId, "auth.password_changed");
}

/**
 * First-run setup: the first account becomes site administrator and lead of a new lab. The user count is
 * checked again inside the write transaction, so two simultaneous setups cannot both succeed.
 * @param db the database
 * @param input the SetupBody
 * @returns the new account and lab
 * @throws HttpError 409 CONFLICT once any account exists
 */
export async function setupFirstAccount(db: Db, input: SetupBody): Promise<{ user: UserRow; labId: string }> {
  if (countUsers(db) > 0) throw setupClosed();
  const passwordHash = await hashPassword(input.password);
  // better-sqlite3 transactions are synchronous on the one connection, so statements on `db` inside the
  // callback belong to the transaction.
  return db.transaction(() => {
    if (countUsers(db) > 0) throw setupClosed();
    const user = insertUser(db, { email: input.email, displayName: input.displayName, passwordHash, isSiteAdmin: true });
    const lab = createLab(db, { name: input.labName, leadUserId: user.id });
    audit(db, { labId: lab.id, userId: user.id, action: "lab.created", target: lab.name });
    return { user, labId: lab.id };
  });
}

function setupClosed(): HttpError {
  return new HttpError(409, "CONFLICT", "This install is already set up; ask a lab lead for an invitation");
}
