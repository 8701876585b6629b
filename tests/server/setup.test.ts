import request from "supertest";
import { describe, expect, it } from "vitest";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { MeSchema, SetupStatusSchema } from "@shared/schemas/auth";
import { labs, memberships, users } from "../../server/db/schema";
import { makeTestApp, memoryMailer, sessionCookie } from "../helpers/app";

const body = { email: "First.Person@Example.org", displayName: "First Person", password: "a long first password", labName: "Cryostat Bay 2" };

describe("/api/setup", () => {
  it("reports needsSetup on an empty install and whether mail is the fake outbox", async () => {
    const t = makeTestApp();
    const res = await request(t.app).get("/api/setup");
    expect(res.status).toBe(200);
    expect(SetupStatusSchema.parse(res.body)).toEqual({ needsSetup: true, fakeMail: true });
    const real = makeTestApp({ mailer: { ...memoryMailer(), fake: false } });
    expect(SetupStatusSchema.parse((await request(real.app).get("/api/setup")).body).fakeMail).toBe(false);
  });

  it("makes the first account site administrator and lead of a new lab, signed in (201)", async () => {
    const t = makeTestApp();
    const res = await request(t.app).post("/api/setup").send(body);
    expect(res.status).toBe(201);
    const me = MeSchema.parse(res.body);
    expect(me.user).toMatchObject({ email: "first.person@example.org", displayName: "First Person", isSiteAdmin: true });
    expect(me.memberships).toEqual([{ labId: expect.any(String), labName: "Cryostat Bay 2", role: "lead" }]);
    const cookie = sessionCookie(res)!;
    const again = await request(t.app).get("/api/me").set("Cookie", cookie);
    expect(MeSchema.parse(again.body).user.id).toBe(me.user.id);
    expect(SetupStatusSchema.parse((await request(t.app).get("/api/setup")).body).needsSetup).toBe(false);
  });

  it("works only once: a second setup is 409 CONFLICT and adds nothing", async () => {
    const t = makeTestApp();
    await request(t.app).post("/api/setup").send(body).expect(201);
    const res = await request(t.app).post("/api/setup").send({ ...body, email: "second@example.org", labName: "Another" });
    expect(res.status).toBe(409);
    expect(ApiErrorSchema.parse(res.body).error.code).toBe("CONFLICT");
    expect(sessionCookie(res)).toBeUndefined();
    expect(t.db.select().from(users).all()).toHaveLength(1);
    expect(t.db.select().from(labs).all()).toHaveLength(1);
    expect(t.db.select().from(memberships).all()).toHaveLength(1);
  });

  it("lets only one of two simultaneous setups through", async () => {
    const t = makeTestApp();
    const [a, b] = await Promise.all([
      request(t.app).post("/api/setup").send(body),
      request(t.app).post("/api/setup").send({ ...body, email: "other@example.org" }),
    ]);
    expect([a.status, b.status].sort()).toEqual([201, 409]);
    expect(t.db.select().from(users).all()).toHaveLength(1);
  });

  it("refuses a short password and an empty lab name with 400 naming each field", async () => {
    const t = makeTestApp();
    const res = await request(t.app).post("/api/setup").send({ ...body, password: "short", labName: "  " });
    expect(res.status).toBe(400);
    const paths = ApiErrorSchema.parse(res.body).error.details?.map((d) => d.path);
    expect(paths).toEqual(expect.arrayContaining(["password", "labName"]));
    expect(t.db.select().from(users).all()).toHaveLength(0);
  });
});
