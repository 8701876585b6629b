import { randomUUID } from "node:crypto";
import { and, eq, gt, isNull } from "drizzle-orm";
import type { Mailer } from "../context";
import type { Db } from "../db/client";
import { passwordResets } from "../db/schema";
import { HttpError } from "../http-error";
import { auditAccountEvent } from "./audit";
import { hashLinkToken, newLinkToken } from "./auth";
import { findUserByEmail, hashPassword, setPasswordHash } from "./users";

/** How long a reset link works: 1 hour, in ms. */
export const PASSWORD_RESET_TTL_MS = 60 * 60 * 1000;

/**
 * Starts a password reset. When the address has an account, stores the hash of a new token and e-mails
 * `${publicUrl}/reset-password/${token}`; otherwise does nothing. The caller answers 202 either way and
 * does not wait for the mail, so neither the answer nor its timing tells whether the account exists.
 * @param db the database
 * @param mailer where the message goes
 * @param input address as typed and the public origin for the link
 * @returns the sending in progress (resolves when the mail is handed over, or at once when there is none);
 *   it never rejects: a mail failure is logged
 */
export function requestPasswordReset(db: Db, mailer: Mailer, input: { email: string; publicUrl: string }): Promise<void> {
  const user = findUserByEmail(db, input.email);
  if (!user) return Promise.resolve();
  const { token, tokenHash } = newLinkToken();
  const now = Date.now();
  const expiresAt = now + PASSWORD_RESET_TTL_MS;
  db.insert(passwordResets).values({ id: randomUUID(), userId: user.id, tokenHash, createdAt: now, expiresAt }).run();
  auditAccountEvent(db, user.id, "auth.password_reset_requested");
  const link = `${input.publicUrl.replace(/\/+$/, "")}/reset-password/${token}`;
  const text = [
    `Someone asked to reset the Thetafold password of ${user.email}.`,
    "",
    "Open this link to choose a new password:",
    link,
    "",
    `The link works once and expires on ${new Date(expiresAt).toUTCString()} (one hour).`,
    "If you did not ask for this, ignore this message: your password stays as it is.",
  ].join("\n");
  return mailer.send({ to: user.email, subject: "Reset your Thetafold password", text }).catch((err: unknown) => {
    console.error("[mail] password reset not sent", err);
  });
}

/** One answer for an unknown, expired or already used link. */
function resetGone(): HttpError {
  return new HttpError(410, "GONE", "This reset link is not valid: it expired or was already used; ask for a new one");
}

/**
 * Sets a new password from a reset link. The token is used up, and so is every other open reset link of the
 * account; the caller then ends all of the account's sessions.
 * @param db the database
 * @param token the token from the link
 * @param newPassword already checked against PasswordSchema
 * @returns the account whose password changed
 * @throws HttpError 410 GONE for an unknown, expired or used token (one answer for all three)
 */
export async function resetPassword(db: Db, token: string, newPassword: string): Promise<{ userId: string }> {
  const tokenHash = hashLinkToken(token);
  const usable = () =>
    db
      .select()
      .from(passwordResets)
      .where(and(eq(passwordResets.tokenHash, tokenHash), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, Date.now())))
      .get();
  if (!usable()) throw resetGone();
  const passwordHash = await hashPassword(newPassword);
  return db.transaction(() => {
    // Checked again after the slow hash: another request may have used the token meanwhile.
    const row = usable();
    if (!row) throw resetGone();
    const now = Date.now();
    db.update(passwordResets)
      .set({ usedAt: now })
      .where(and(eq(passwordResets.userId, row.userId), isNull(passwordResets.usedAt)))
      .run();
    setPasswordHash(db, row.userId, passwordHash);
    auditAccountEvent(db, row.userId, "auth.password_reset");
    return { userId: row.userId };
  });
}
