import request from "supertest";
import { describe, expect, it } from "vitest";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { sessions } from "../../server/db/schema";
import { TEST_ORIGIN, TEST_PASSWORD, makeTestApp, seedRoles, sessionCookie } from "../helpers/app";

const error = (res: request.Response) => ApiErrorSchema.parse(res.body).error;

describe("bad requests", () => {
  it("answers malformed JSON with 400 VALIDATION_FAILED naming the body", async () => {
    const t = makeTestApp();
    const res = await request(t.app).post("/api/auth/sign-in").set("Content-Type", "application/json").send('{"email": "a@example.org", ');
    expect(res.status).toBe(400);
    expect(error(res).code).toBe("VALIDATION_FAILED");
    expect(error(res).details?.[0]?.path).toBe("body");
  });

  it("answers a JSON body over 1 MB with 413 PAYLOAD_TOO_LARGE", async () => {
    const t = makeTestApp();
    const { lab, agents } = await seedRoles(t);
    const big = JSON.stringify({ email: "a@example.org", role: "guest", padding: "x".repeat(1_100_000) });
    const res = await agents.lead.post(`/api/labs/${lab.id}/invitations`).set("Content-Type", "application/json").send(big);
    expect(res.status).toBe(413);
    expect(error(res).code).toBe("PAYLOAD_TOO_LARGE");
    expect(t.mailer.sent).toHaveLength(0);
  });

  it("answers an unexpected failure with 500 INTERNAL, a generic message and no stack trace", async () => {
    const t = makeTestApp();
    const { lab, agents } = await seedRoles(t);
    t.db.$client.close();
    const quiet = console.error;
    console.error = () => {};
    try {
      const res = await agents.lead.get(`/api/labs/${lab.id}/members`);
      expect(res.status).toBe(500);
      expect(error(res).code).toBe("INTERNAL");
      expect(JSON.stringify(res.body)).not.toMatch(/database|sqlite|\.ts:\d+|\.js:\d+/i);
    } finally {
      console.error = quiet;
    }
  });
});

describe("Origin check", () => {
  it("refuses a sign-in posted from another site with 403 and makes no session", async () => {
    const t = makeTestApp();
    const { users: u } = await seedRoles(t);
    const before = t.db.select().from(sessions).all().length;
    const res = await request(t.app)
      .post("/api/auth/sign-in")
      .set("Origin", "https://elsewhere.example.com")
      .send({ email: u.lead.email, password: TEST_PASSWORD });
    expect(res.status).toBe(403);
    expect(error(res).code).toBe("FORBIDDEN");
    expect(sessionCookie(res)).toBeUndefined();
    expect(t.db.select().from(sessions).all()).toHaveLength(before);
  });

  it("accepts the same write from the app's own origin", async () => {
    const t = makeTestApp();
    const { users: u } = await seedRoles(t);
    const res = await request(t.app).post("/api/auth/sign-in").set("Origin", TEST_ORIGIN).send({ email: u.lead.email, password: TEST_PASSWORD });
    expect(res.status).toBe(200);
  });

  it("refuses a role change from another site and changes nothing", async () => {
    const t = makeTestApp();
    const { lab, agents, users: u } = await seedRoles(t);
    const res = await agents.lead.patch(`/api/labs/${lab.id}/members/${u.guest.id}`).set("Origin", "http://localhost:3001").send({ role: "lead" });
    expect(res.status).toBe(403);
    const members = (await agents.lead.get(`/api/labs/${lab.id}/members`)).body as { userId: string; role: string }[];
    expect(members.find((m) => m.userId === u.guest.id)?.role).toBe("guest");
  });
});

describe("rate limits (authRateLimitPerMinute: 2)", () => {
  it("answers the third failed sign-in within a minute with 429 RATE_LIMITED in the error body", async () => {
    const t = makeTestApp({ authRateLimitPerMinute: 2 });
    const { users: u } = await seedRoles(t);
    const attempt = () => request(t.app).post("/api/auth/sign-in").send({ email: u.lead.email, password: "wrong password" });
    expect((await attempt()).status).toBe(401);
    expect((await attempt()).status).toBe(401);
    const limited = await attempt();
    expect(limited.status).toBe(429);
    expect(error(limited).code).toBe("RATE_LIMITED");
    // Even the right password is refused until the window passes.
    const right = await request(t.app).post("/api/auth/sign-in").send({ email: u.lead.email, password: TEST_PASSWORD });
    expect(right.status).toBe(429);
  });

  it("does not count successful sign-ins", async () => {
    const t = makeTestApp({ authRateLimitPerMinute: 2 });
    const { users: u } = await seedRoles(t);
    for (let i = 0; i < 4; i++) {
      const res = await request(t.app).post("/api/auth/sign-in").send({ email: u.lead.email, password: TEST_PASSWORD });
      expect(res.status).toBe(200);
    }
  });

  it.each([
    ["/api/auth/reset-request", { email: "nobody@example.org" }],
    ["/api/auth/reset", { token: "x".repeat(43), newPassword: "long enough password" }],
    ["/api/setup", { email: "a@example.org", displayName: "A", password: "short", labName: "L" }],
  ])("limits %s: the third request in a minute is 429 RATE_LIMITED", async (path, body) => {
    const t = makeTestApp({ authRateLimitPerMinute: 2 });
    await request(t.app).post(path).send(body);
    await request(t.app).post(path).send(body);
    const limited = await request(t.app).post(path).send(body);
    expect(limited.status).toBe(429);
    expect(error(limited).code).toBe("RATE_LIMITED");
  });

  it("keeps separate counters per route: a limited sign-in does not block reset requests", async () => {
    const t = makeTestApp({ authRateLimitPerMinute: 1 });
    await request(t.app).post("/api/auth/sign-in").send({ email: "nobody@example.org", password: "x" });
    expect((await request(t.app).post("/api/auth/sign-in").send({ email: "nobody@example.org", password: "x" })).status).toBe(429);
    expect((await request(t.app).post("/api/auth/reset-request").send({ email: "nobody@example.org" })).status).toBe(202);
  });
});
