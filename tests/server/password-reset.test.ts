import { createHash } from "node:crypto";
import request from "supertest";
import { eq } from "drizzle-orm";
import { afterEach, describe, expect, it } from "vitest";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { mailMessages, passwordResets } from "../../server/db/schema";
import { createMailer, type RunningMailer } from "../../server/mail/mailer";
import { TEST_ORIGIN, TEST_PASSWORD, makeTestApp, seedRoles, sessionCookie, testDb, waitFor } from "../helpers/app";

const code = (res: request.Response) => ApiErrorSchema.parse(res.body).error.code;
const tokenIn = (text: string) => {
  const m = new RegExp(`${TEST_ORIGIN}/reset-password/([A-Za-z0-9_-]+)`).exec(text);
  if (!m) throw new Error(`no reset link in: ${text}`);
  return m[1];
};

const mailers: RunningMailer[] = [];
afterEach(async () => {
  for (const m of mailers.splice(0)) await m.close();
});

async function signIn(app: ReturnType<typeof makeTestApp>["app"], email: string, password: string) {
  return request(app).post("/api/auth/sign-in").send({ email, password });
}

describe("password reset end to end through the fake SMTP server", () => {
  it("e-mails a one-hour link, sets the new password, ends every session, and the link works once", async () => {
    const db = testDb();
    const mailer = await createMailer({ from: "Thetafold test <no-reply@thetafold.invalid>", db });
    mailers.push(mailer);
    const t = makeTestApp({ db, mailer });
    const { users: u } = await seedRoles(t);
    const sessionA = sessionCookie(await signIn(t.app, u.researcher.email, TEST_PASSWORD))!;
    const sessionB = sessionCookie(await signIn(t.app, u.researcher.email, TEST_PASSWORD))!;

    const asked = await request(t.app).post("/api/auth/reset-request").send({ email: u.researcher.email });
    expect(asked.status).toBe(202);
    // The answer does not wait for the mail (timing must not tell whether the account exists).
    const mail = await waitFor(() => t.db.select().from(mailMessages).get());
    expect(mail.to).toContain(u.researcher.email);
    const token = tokenIn(mail.text);
    expect(Buffer.from(token, "base64url").length).toBeGreaterThanOrEqual(32);
    const row = t.db.select().from(passwordResets).get()!;
    expect(row.tokenHash).toBe(createHash("sha256").update(token).digest("hex"));
    expect(row.expiresAt - row.createdAt).toBe(3600 * 1000);

    const reset = await request(t.app).post("/api/auth/reset").send({ token, newPassword: "the new long password" });
    expect(reset.status).toBe(204);
    for (const cookie of [sessionA, sessionB]) {
      expect((await request(t.app).get("/api/me").set("Cookie", cookie)).status).toBe(401);
    }
    expect((await signIn(t.app, u.researcher.email, TEST_PASSWORD)).status).toBe(401);
    expect((await signIn(t.app, u.researcher.email, "the new long password")).status).toBe(200);

    const reuse = await request(t.app).post("/api/auth/reset").send({ token, newPassword: "yet another password" });
    expect(reuse.status).toBe(410);
    expect(code(reuse)).toBe("GONE");
    expect((await signIn(t.app, u.researcher.email, "the new long password")).status).toBe(200);
  });
});

describe("POST /api/auth/reset-request", () => {
  it("answers 202 for an unknown address too, and sends nothing and stores nothing", async () => {
    const t = makeTestApp();
    await seedRoles(t);
    const res = await request(t.app).post("/api/auth/reset-request").send({ email: "nobody@example.org" });
    expect(res.status).toBe(202);
    expect(res.text).toBe("");
    expect(t.mailer.sent).toHaveLength(0);
    expect(t.db.select().from(passwordResets).all()).toHaveLength(0);
  });

  it("gives the same answer for a known address", async () => {
    const t = makeTestApp();
    const { users: u } = await seedRoles(t);
    const known = await request(t.app).post("/api/auth/reset-request").send({ email: u.guest.email });
    const unknown = await request(t.app).post("/api/auth/reset-request").send({ email: "nobody@example.org" });
    expect([known.status, known.text]).toEqual([unknown.status, unknown.text]);
    expect(t.mailer.sent).toHaveLength(1);
  });
});

describe("POST /api/auth/reset", () => {
  it("gives one answer, 410 GONE, for an expired, a used and an unknown token, and changes no password", async () => {
    const t = makeTestApp();
    const { users: u } = await seedRoles(t);
    await request(t.app).post("/api/auth/reset-request").send({ email: u.guest.email }).expect(202);
    await request(t.app).post("/api/auth/reset-request").send({ email: u.lead.email }).expect(202);
    const expired = tokenIn(t.mailer.sent[0].text);
    const used = tokenIn(t.mailer.sent[1].text);
    t.db.update(passwordResets).set({ expiresAt: Date.now() - 1 }).where(eq(passwordResets.userId, u.guest.id)).run();
    await request(t.app).post("/api/auth/reset").send({ token: used, newPassword: "lead's new password" }).expect(204);
    const unknown = Buffer.alloc(32, 1).toString("base64url");

    const answers = [];
    for (const token of [expired, used, unknown]) {
      answers.push(await request(t.app).post("/api/auth/reset").send({ token, newPassword: "should not be set" }));
    }
    for (const res of answers) {
      expect(res.status).toBe(410);
      expect(code(res)).toBe("GONE");
      expect(res.body).toEqual(answers[0].body);
    }
    expect((await signIn(t.app, u.guest.email, TEST_PASSWORD)).status).toBe(200);
    expect((await signIn(t.app, u.lead.email, "lead's new password")).status).toBe(200);
  });

  it("uses up every other open reset link of the account too", async () => {
    const t = makeTestApp();
    const { users: u } = await seedRoles(t);
    await request(t.app).post("/api/auth/reset-request").send({ email: u.guest.email }).expect(202);
    await request(t.app).post("/api/auth/reset-request").send({ email: u.guest.email }).expect(202);
    const [first, second] = t.mailer.sent.map((m) => tokenIn(m.text));
    await request(t.app).post("/api/auth/reset").send({ token: second, newPassword: "guest's new password" }).expect(204);
    expect((await request(t.app).post("/api/auth/reset").send({ token: first, newPassword: "other new password" })).status).toBe(410);
  });

  it("refuses a too-short new password with 400 and leaves the link usable", async () => {
    const t = makeTestApp();
    const { users: u } = await seedRoles(t);
    await request(t.app).post("/api/auth/reset-request").send({ email: u.guest.email }).expect(202);
    const token = tokenIn(t.mailer.sent[0].text);
    const res = await request(t.app).post("/api/auth/reset").send({ token, newPassword: "short" });
    expect(res.status).toBe(400);
    expect(ApiErrorSchema.parse(res.body).error.details?.[0]?.path).toBe("newPassword");
    expect((await request(t.app).post("/api/auth/reset").send({ token, newPassword: "long enough now" })).status).toBe(204);
  });
});
