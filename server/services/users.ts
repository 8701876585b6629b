import { randomBytes, randomUUID } from "node:crypto";
import { hash, verify } from "@node-rs/argon2";
import { asc, count, eq } from "drizzle-orm";
import type { Me } from "@shared/schemas/auth";
import type { Db } from "../db/client";
import { labs, memberships, users } from "../db/schema";
import { HttpError } from "../http-error";

/**
 * argon2id cost used for every stored password: 19 MiB memory, 2 passes, 1 lane.
 * @see OWASP Password Storage Cheat Sheet, argon2id minimum configuration (m=19456 KiB, t=2, p=1)
 */
export const PASSWORD_HASH_OPTIONS = { memoryCost: 19_456, timeCost: 2, parallelism: 1 } as const;

/**
 * Canonical form of an e-mail address for storage and lookup (trimmed, lower case).
 * @param email address as typed
 * @returns the address used as the account key
 */
export function normalizeEmail(email: string): string {
  return email.trim().toLowerCase();
}

/**
 * Hashes a password with argon2id (the library's default algorithm) at PASSWORD_HASH_OPTIONS.
 * @param password the plain password
 * @returns a PHC string, "$argon2id$v=19$m=19456,t=2,p=1$…"
 */
export function hashPassword(password: string): Promise<string> {
  return hash(password, PASSWORD_HASH_OPTIONS);
}

/**
 * Checks a password against a stored PHC hash; a malformed hash counts as a mismatch.
 * @param passwordHash stored PHC string
 * @param password the plain password
 * @returns true when they match
 */
export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password);
  } catch {
    return false;
  }
}

let dummyHash: Promise<string> | undefined;

/**
 * Spends the time of one real verify against a throwaway hash, so a sign-in with an unknown e-mail takes as
 * long as one with a wrong password.
 * @param password the password that was offered
 */
export async function dummyVerify(password: string): Promise<void> {
  dummyHash ??= hashPassword(randomBytes(32).toString("hex"));
  await verifyPassword(await dummyHash, password);
}

export type UserRow = typeof users.$inferSelect;

/**
 * Finds an account by e-mail (case-insensitive through normalizeEmail).
 * @param db the database
 * @param email address as typed
 * @returns the row, or undefined
 */
export function findUserByEmail(db: Db, email: string): UserRow | undefined {
  return db.select().from(users).where(eq(users.email, normalizeEmail(email))).get();
}

/**
 * Number of accounts on this install (0 means the first-run setup is still open).
 * @param db the database
 */
export function countUsers(db: Db): number {
  return db.select({ n: count() }).from(users).get()?.n ?? 0;
}

/**
 * Inserts an account whose password is already hashed (callers hash first, outside any transaction).
 * @param db the database or a transaction
 * @param input e-mail (normalised here), display name, PHC hash, site-administrator flag
 * @returns the new row
 * @throws HttpError 409 CONFLICT when the e-mail already has an account
 */
export function insertUser(
  db: Db,
  input: { email: string; displayName: string; passwordHash: string; isSiteAdmin?: boolean },
): UserRow {
  const email = normalizeEmail(input.email);
  if (db.select({ id: users.id }).from(users).where(eq(users.email, email)).get()) {
    throw new HttpError(409, "CONFLICT", "An account with this e-mail already exists", [
      { path: "email", message: "already registered" },
    ]);
  }
  const row: UserRow = {
    id: randomUUID(),
    email,
    displayName: input.displayName.trim(),
    passwordHash: input.passwordHash,
    isSiteAdmin: input.isSiteAdmin ?? false,
    createdAt: Date.now(),
  };
  db.insert(users).values(row).run();
  return row;
}

/**
 * Replaces an account's password hash.
 * @param db the database
 * @param userId the account
 * @param passwordHash new PHC string
 */
export function setPasswordHash(db: Db, userId: string, passwordHash: string): void {
  db.update(users).set({ passwordHash }).where(eq(users.id, userId)).run();
}

/**
 * The signed-in person and their labs (GET /api/me), labs sorted by name.
 * @param db the database
 * @param userId the account
 * @returns the Me shape
 * @throws HttpError 401 when the account no longer exists
 */
export function getMe(db: Db, userId: string): Me {
  const user = db.select().from(users).where(eq(users.id, userId)).get();
  if (!user) throw new HttpError(401, "UNAUTHENTICATED", "Sign in first");
  const rows = db
    .select({ labId: labs.id, labName: labs.name, role: memberships.role })
    .from(memberships)
    .innerJoin(labs, eq(labs.id, memberships.labId))
    .where(eq(memberships.userId, userId))
    .orderBy(asc(labs.name), asc(labs.id))
    .all();
  return {
    user: { id: user.id, email: user.email, displayName: user.displayName, isSiteAdmin: Boolean(user.isSiteAdmin) },
    memberships: rows,
  };
}
