import request from "supertest";
import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { MeSchema } from "@shared/schemas/auth";
import { sessions, users } from "../../server/db/schema";
import { TEST_PASSWORD, addMember, makeTestApp, seedRoles, sessionCookie, sessionSetCookie } from "../helpers/app";

const code = (res: request.Response) => ApiErrorSchema.parse(res.body).error.code;

describe("POST /api/auth/sign-in", () => {
  it("signs in with the right pair: 200, the Me body and a session cookie", async () => {
    const t = makeTestApp();
    const { users: u, lab } = await seedRoles(t);
    const res = await request(t.app).post("/api/auth/sign-in").send({ email: u.lead.email, password: TEST_PASSWORD });
    expect(res.status).toBe(200);
    const me = MeSchema.parse(res.body);
    expect(me.user.email).toBe(u.lead.email);
    expect(me.memberships).toEqual([{ labId: lab.id, labName: lab.name, role: "lead" }]);
    const cookie = sessionCookie(res);
    expect(cookie).toBeDefined();
    const again = await request(t.app).get("/api/me").set("Cookie", cookie!);
    expect(again.status).toBe(200);
    expect(MeSchema.parse(again.body).user.id).toBe(u.lead.id);
  });

  it("accepts the e-mail in any letter case", async () => {
    const t = makeTestApp();
    const { users: u } = await seedRoles(t);
    const res = await request(t.app).post("/api/auth/sign-in").send({ email: u.guest.email.toUpperCase(), password: TEST_PASSWORD });
    expect(res.status).toBe(200);
  });

  it("answers a wrong password and an unknown e-mail identically: 401 UNAUTHENTICATED, same message, no cookie", async () => {
    const t = makeTestApp();
    const { users: u } = await seedRoles(t);
    const wrong = await request(t.app).post("/api/auth/sign-in").send({ email: u.lead.email, password: "not the password" });
    const unknown = await request(t.app).post("/api/auth/sign-in").send({ email: "nobody@example.org", password: "not the password" });
    for (const res of [wrong, unknown]) {
      expect(res.status).toBe(401);
      expect(code(res)).toBe("UNAUTHENTICATED");
      expect(sessionCookie(res)).toBeUndefined();
    }
    expect(unknown.body).toEqual(wrong.body);
  });

  it("refuses a body without an e-mail with 400 VALIDATION_FAILED naming the field", async () => {
    const t = makeTestApp();
    const res = await request(t.app).post("/api/auth/sign-in").send({ password: "x" });
    expect(res.status).toBe(400);
    expect(code(res)).toBe("VALIDATION_FAILED");
    expect(ApiErrorSchema.parse(res.body).error.details?.map((d) => d.path)).toContain("email");
  });
});

async function signIn(t: ReturnType<typeof makeTestApp>, email: string, password = TEST_PASSWORD, cookie?: string) {
  const req = request(t.app).post("/api/auth/sign-in");
  if (cookie) req.set("Cookie", cookie);
  const res = await req.send({ email, password });
  expect(res.status).toBe(200);
  return sessionCookie(res)!;
}

const me = (t: ReturnType<typeof makeTestApp>, cookie: string) => request(t.app).get("/api/me").set("Cookie", cookie);
const sessionIdOf = (cookie: string) => cookie.split("=")[1];

describe("sessions", () => {
  it("rotates the session id at sign-in: the id the request carried stops working", async () => {
    const t = makeTestApp();
    const { users: u } = await seedRoles(t);
    const first = await signIn(t, u.lead.email);
    const second = await signIn(t, u.lead.email, TEST_PASSWORD, first);
    expect(second).not.toBe(first);
    expect((await me(t, first)).status).toBe(401);
    expect((await me(t, second)).status).toBe(200);
    const ids = t.db.select({ id: sessions.id }).from(sessions).where(eq(sessions.userId, u.lead.id)).all().map((r) => r.id);
    expect(ids).toContain(sessionIdOf(second));
    expect(ids).not.toContain(sessionIdOf(first));
  });

  it("invalidates the carried session even when the new sign-in is as someone else", async () => {
    const t = makeTestApp();
    const { users: u } = await seedRoles(t);
    const asLead = await signIn(t, u.lead.email);
    const asGuest = await signIn(t, u.guest.email, TEST_PASSWORD, asLead);
    expect((await me(t, asLead)).status).toBe(401);
    expect(MeSchema.parse((await me(t, asGuest)).body).user.email).toBe(u.guest.email);
  });

  it("refuses a session whose expires_at is in the past with 401 and a blank cookie", async () => {
    const t = makeTestApp();
    const { users: u } = await seedRoles(t);
    const cookie = await signIn(t, u.researcher.email);
    t.db.update(sessions).set({ expiresAt: Math.floor(Date.now() / 1000) - 60 }).where(eq(sessions.id, sessionIdOf(cookie))).run();
    const res = await me(t, cookie);
    expect(res.status).toBe(401);
    expect(code(res)).toBe("UNAUTHENTICATED");
    expect(sessionCookie(res)).toBe("auth_session=");
  });

  it("slides a session past half its 30-day life: new expiry about 30 days out and the cookie re-sent", async () => {
    const t = makeTestApp();
    const { users: u } = await seedRoles(t);
    const cookie = await signIn(t, u.researcher.email);
    const nowS = Math.floor(Date.now() / 1000);
    t.db.update(sessions).set({ expiresAt: nowS + 10 * 86_400 }).where(eq(sessions.id, sessionIdOf(cookie))).run();
    const res = await me(t, cookie);
    expect(res.status).toBe(200);
    expect(sessionCookie(res)).toBe(cookie);
    const row = t.db.select().from(sessions).where(eq(sessions.id, sessionIdOf(cookie))).get()!;
    expect(row.expiresAt).toBeGreaterThan(nowS + 29 * 86_400);
    expect(row.expiresAt).toBeLessThanOrEqual(nowS + 30 * 86_400 + 5);
  });

  it("does not re-send the cookie for a session early in its life", async () => {
    const t = makeTestApp();
    const { users: u } = await seedRoles(t);
    const cookie = await signIn(t, u.researcher.email);
    const res = await me(t, cookie);
    expect(res.status).toBe(200);
    expect(sessionCookie(res)).toBeUndefined();
  });

  it("sets the cookie HttpOnly, SameSite=Lax, Path=/, and Secure only with secureCookies", async () => {
    for (const secureCookies of [true, false]) {
      const t = makeTestApp({ secureCookies });
      const { users: u } = await seedRoles(t);
      const res = await request(t.app).post("/api/auth/sign-in").send({ email: u.lead.email, password: TEST_PASSWORD });
      const line = sessionSetCookie(res)!;
      const attrs = line.split(";").map((a) => a.trim().toLowerCase());
      expect(attrs).toContain("httponly");
      expect(attrs).toContain("samesite=lax");
      expect(attrs).toContain("path=/");
      expect(attrs.includes("secure")).toBe(secureCookies);
    }
  });
});

describe("POST /api/auth/sign-out", () => {
  it("answers 204, blanks the cookie and deletes the session", async () => {
    const t = makeTestApp();
    const { users: u } = await seedRoles(t);
    const cookie = await signIn(t, u.guest.email);
    const res = await request(t.app).post("/api/auth/sign-out").set("Cookie", cookie);
    expect(res.status).toBe(204);
    expect(sessionCookie(res)).toBe("auth_session=");
    expect((await me(t, cookie)).status).toBe(401);
    expect(t.db.select().from(sessions).where(eq(sessions.id, sessionIdOf(cookie))).get()).toBeUndefined();
  });

  it("answers 204 without a session too (signing out twice is harmless)", async () => {
    const t = makeTestApp();
    const res = await request(t.app).post("/api/auth/sign-out");
    expect(res.status).toBe(204);
  });
});

describe("POST /api/auth/password", () => {
  it("changes the password, ends every other session and gives this one a new cookie", async () => {
    const t = makeTestApp();
    const { users: u } = await seedRoles(t);
    const here = await signIn(t, u.lead.email);
    const elsewhere = await signIn(t, u.lead.email);
    const res = await request(t.app)
      .post("/api/auth/password")
      .set("Cookie", here)
      .send({ currentPassword: TEST_PASSWORD, newPassword: "a brand new passphrase" });
    expect(res.status).toBe(204);
    const fresh = sessionCookie(res)!;
    expect(fresh).not.toBe(here);
    expect((await me(t, here)).status).toBe(401);
    expect((await me(t, elsewhere)).status).toBe(401);
    expect((await me(t, fresh)).status).toBe(200);
    const old = await request(t.app).post("/api/auth/sign-in").send({ email: u.lead.email, password: TEST_PASSWORD });
    expect(old.status).toBe(401);
    await signIn(t, u.lead.email, "a brand new passphrase");
  });

  it("stores the new password as argon2id with m=19456, t=2, p=1", async () => {
    const t = makeTestApp();
    const { users: u, agents } = await seedRoles(t);
    await agents.guest.post("/api/auth/password").send({ currentPassword: TEST_PASSWORD, newPassword: "another long passphrase" }).expect(204);
    const row = t.db.select().from(users).where(eq(users.id, u.guest.id)).get()!;
    expect(row.passwordHash.startsWith("$argon2id$v=19$m=19456,t=2,p=1$")).toBe(true);
  });

  it("refuses a wrong current password with 400 on currentPassword and changes nothing", async () => {
    const t = makeTestApp();
    const { users: u } = await seedRoles(t);
    const cookie = await signIn(t, u.lead.email);
    const res = await request(t.app)
      .post("/api/auth/password")
      .set("Cookie", cookie)
      .send({ currentPassword: "not it at all", newPassword: "a brand new passphrase" });
    expect(res.status).toBe(400);
    expect(code(res)).toBe("VALIDATION_FAILED");
    expect(ApiErrorSchema.parse(res.body).error.details?.[0]?.path).toBe("currentPassword");
    expect((await me(t, cookie)).status).toBe(200);
    await signIn(t, u.lead.email);
  });

  it("refuses a new password under 10 characters (400) and an anonymous caller (401)", async () => {
    const t = makeTestApp();
    const { agents } = await seedRoles(t);
    const short = await agents.lead.post("/api/auth/password").send({ currentPassword: TEST_PASSWORD, newPassword: "short" });
    expect(short.status).toBe(400);
    expect(ApiErrorSchema.parse(short.body).error.details?.[0]?.path).toBe("newPassword");
    const anon = await agents.anonymous.post("/api/auth/password").send({ currentPassword: TEST_PASSWORD, newPassword: "long enough pass" });
    expect(anon.status).toBe(401);
    expect(code(anon)).toBe("UNAUTHENTICATED");
  });
});

describe("GET /api/me", () => {
  it("answers 401 UNAUTHENTICATED without a session and with a made-up one", async () => {
    const t = makeTestApp();
    for (const res of [await request(t.app).get("/api/me"), await me(t, "auth_session=abcdefghijklmnopqrstuvwxyz234567")]) {
      expect(res.status).toBe(401);
      expect(code(res)).toBe("UNAUTHENTICATED");
    }
  });

  it("lists every lab of a person in several labs, by lab name, and a site administrator in none", async () => {
    const t = makeTestApp();
    const { lab, otherLab, users: u, agents } = await seedRoles(t);
    addMember(t.db, otherLab.id, u.guest.id, "researcher");
    const guest = MeSchema.parse((await agents.guest.get("/api/me")).body);
    expect(guest.memberships).toEqual([
      { labId: lab.id, labName: "Lab A", role: "guest" },
      { labId: otherLab.id, labName: "Lab B", role: "researcher" },
    ]);
    const admin = MeSchema.parse((await agents.admin.get("/api/me")).body);
    expect(admin.user.isSiteAdmin).toBe(true);
    expect(admin.memberships).toEqual([]);
  });
});
