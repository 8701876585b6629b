import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { hash } from "@node-rs/argon2";
import request from "supertest";
import { createApp } from "../../server/app";
import type { MailMessage, Mailer } from "../../server/context";
import { openDb, type Db } from "../../server/db/client";
import { runMigrations } from "../../server/db/migrate";
import { labs, memberships, users } from "../../server/db/schema";
import type { Role } from "@shared/schemas/auth";

export const TEST_ORIGIN = "http://localhost:3000";
export const TEST_PASSWORD = "correct horse battery";

/** A mailer that keeps what it was asked to send (tests that need real SMTP use the fake SMTP server). */
export function memoryMailer(): Mailer & { sent: MailMessage[] } {
  const sent: MailMessage[] = [];
  return {
    fake: true,
    sent,
    async send(m) {
      sent.push(m);
    },
  };
}

/** A fresh in-memory database with every migration applied. */
export function testDb(): Db {
  const db = openDb(":memory:");
  runMigrations(db);
  return db;
}

export interface TestApp {
  db: Db;
  app: ReturnType<typeof createApp>;
  mailer: ReturnType<typeof memoryMailer>;
  dataDir: string;
}

/** createApp over an in-memory database and a temporary data folder. */
export function makeTestApp(overrides: Partial<Parameters<typeof createApp>[0]> = {}): TestApp {
  const db = overrides.db ?? testDb();
  const mailer = memoryMailer();
  const dataDir = mkdtempSync(path.join(tmpdir(), "thetafold-test-"));
  const app = createApp({ db, dataDir, mailer, publicUrl: TEST_ORIGIN, authRateLimitPerMinute: 1000, ...overrides });
  return { db, app, mailer, dataDir };
}

let counter = 0;
// Hashing is the slow part of making users; one hash of the shared test password is reused.
let cachedHash: Promise<string> | undefined;

/** Inserts a user straight into the database (the password is TEST_PASSWORD). */
export async function insertUser(db: Db, opts: { email?: string; isSiteAdmin?: boolean; displayName?: string } = {}) {
  cachedHash ??= hash(TEST_PASSWORD, { memoryCost: 19456, timeCost: 2, parallelism: 1 });
  counter += 1;
  const row = {
    id: `user-${counter}-${Math.random().toString(36).slice(2, 8)}`,
    email: opts.email ?? `person${counter}@example.org`,
    displayName: opts.displayName ?? `Person ${counter}`,
    passwordHash: await cachedHash,
    isSiteAdmin: opts.isSiteAdmin ?? false,
    createdAt: Date.now(),
  };
  db.insert(users).values(row).run();
  return row;
}

/** Inserts a lab. */
export function insertLab(db: Db, name = "Test lab") {
  counter += 1;
  const row = { id: `lab-${counter}-${Math.random().toString(36).slice(2, 8)}`, name, createdAt: Date.now() };
  db.insert(labs).values(row).run();
  return row;
}

/** Puts a user in a lab with a role. */
export function addMember(db: Db, labId: string, userId: string, role: Role) {
  db.insert(memberships).values({ labId, userId, role, createdAt: Date.now() }).run();
}

/** A supertest agent holding a session cookie for the user (made through lucia directly, not the sign-in route). */
export async function agentFor(t: TestApp, userId: string) {
  const { createLucia } = await import("../../server/auth/lucia");
  const lucia = createLucia(t.db, false);
  const session = await lucia.createSession(userId, {});
  const cookie = lucia.createSessionCookie(session.id).serialize();
  const agent = request.agent(t.app);
  agent.set("Cookie", cookie);
  return agent;
}

/**
 * The usual cast: one lab with a lead, a researcher and a guest, a second lab with its own lead
 * (the "member of another lab"), and a site administrator who is in no lab.
 */
export async function seedRoles(t: TestApp) {
  const lab = insertLab(t.db, "Lab A");
  const otherLab = insertLab(t.db, "Lab B");
  const lead = await insertUser(t.db, { email: "lead-a@example.org" });
  const researcher = await insertUser(t.db, { email: "researcher-a@example.org" });
  const guest = await insertUser(t.db, { email: "guest-a@example.org" });
  const outsider = await insertUser(t.db, { email: "lead-b@example.org" });
  const admin = await insertUser(t.db, { email: "admin@example.org", isSiteAdmin: true });
  addMember(t.db, lab.id, lead.id, "lead");
  addMember(t.db, lab.id, researcher.id, "researcher");
  addMember(t.db, lab.id, guest.id, "guest");
  addMember(t.db, otherLab.id, outsider.id, "lead");
  return {
    lab,
    otherLab,
    users: { lead, researcher, guest, outsider, admin },
    agents: {
      anonymous: request.agent(t.app),
      lead: await agentFor(t, lead.id),
      researcher: await agentFor(t, researcher.id),
      guest: await agentFor(t, guest.id),
      outsider: await agentFor(t, outsider.id),
      admin: await agentFor(t, admin.id),
    },
  };
}

/** The `auth_session=…` pair a response sets (undefined when it sets none); usable as a Cookie header. */
export function sessionCookie(res: { headers: Record<string, unknown> }): string | undefined {
  const raw = res.headers["set-cookie"];
  const list = Array.isArray(raw) ? (raw as string[]) : typeof raw === "string" ? [raw] : [];
  const cookie = list.filter((c) => c.startsWith("auth_session=")).at(-1);
  return cookie?.split(";")[0];
}

/** The full Set-Cookie line for the session cookie (with its attributes). */
export function sessionSetCookie(res: { headers: Record<string, unknown> }): string | undefined {
  const raw = res.headers["set-cookie"];
  const list = Array.isArray(raw) ? (raw as string[]) : typeof raw === "string" ? [raw] : [];
  return list.filter((c) => c.startsWith("auth_session=")).at(-1);
}

/** Polls `check` until it returns a value other than undefined (for work that finishes after the response). */
export async function waitFor<T>(check: () => T | undefined, timeoutMs = 5000): Promise<T> {
  const start = Date.now();
  for (;;) {
    const value = check();
    if (value !== undefined) return value;
    if (Date.now() - start > timeoutMs) throw new Error(`waitFor: nothing after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 20));
  }
}
