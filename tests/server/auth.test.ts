import request from "supertest";
import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { MeSchema } from "@shared/schemas/auth";
import { sessions, users } from "../../server/db/schema";
import { TEST_PASSWORD, insertUser, makeTestApp, seedRoles, sessionCookie } from "../helpers/app";

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
