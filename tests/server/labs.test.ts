import request from "supertest";
import { and, eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { z } from "zod";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { MemberSchema } from "@shared/schemas/labs";
import { memberships } from "../../server/db/schema";
import { addMember, insertUser, makeTestApp, seedRoles } from "../helpers/app";

type Who = "anonymous" | "guest" | "researcher" | "lead" | "outsider" | "admin";
const code = (res: request.Response) => ApiErrorSchema.parse(res.body).error.code;
const roleOf = (t: ReturnType<typeof makeTestApp>, labId: string, userId: string) =>
  t.db.select({ role: memberships.role }).from(memberships).where(and(eq(memberships.labId, labId), eq(memberships.userId, userId))).get()?.role;

/** Who gets what: anonymous 401, a member of another lab and a site administrator outside the lab 404. */
const refused: Record<Exclude<Who, "lead">, [number, string]> = {
  anonymous: [401, "UNAUTHENTICATED"],
  guest: [403, "FORBIDDEN"],
  researcher: [403, "FORBIDDEN"],
  outsider: [404, "NOT_FOUND"],
  admin: [404, "NOT_FOUND"],
};

describe("GET /api/labs/:labId/members", () => {
  it.each(["guest", "researcher", "lead"] as const)("lists the members for a %s, leads first", async (who) => {
    const t = makeTestApp();
    const { lab, agents, users: u } = await seedRoles(t);
    const res = await agents[who].get(`/api/labs/${lab.id}/members`);
    expect(res.status).toBe(200);
    const members = z.array(MemberSchema).parse(res.body);
    expect(members.map((m) => [m.email, m.role])).toEqual([
      [u.lead.email, "lead"],
      [u.researcher.email, "researcher"],
      [u.guest.email, "guest"],
    ]);
  });

  it.each([
    ["anonymous", 401, "UNAUTHENTICATED"],
    ["outsider", 404, "NOT_FOUND"],
    ["admin", 404, "NOT_FOUND"],
  ] as const)("refuses %s with %i %s", async (who, status, errorCode) => {
    const t = makeTestApp();
    const { lab, agents } = await seedRoles(t);
    const res = await agents[who].get(`/api/labs/${lab.id}/members`);
    expect(res.status).toBe(status);
    expect(code(res)).toBe(errorCode);
  });

  it("answers 404 for a lab id that does not exist, as for a lab one is not in", async () => {
    const t = makeTestApp();
    const { agents } = await seedRoles(t);
    const res = await agents.lead.get("/api/labs/no-such-lab/members");
    expect(res.status).toBe(404);
    expect(code(res)).toBe("NOT_FOUND");
  });
});

describe("PATCH /api/labs/:labId/members/:userId", () => {
  it("lets a lead change a role and returns the member", async () => {
    const t = makeTestApp();
    const { lab, agents, users: u } = await seedRoles(t);
    const res = await agents.lead.patch(`/api/labs/${lab.id}/members/${u.guest.id}`).send({ role: "researcher" });
    expect(res.status).toBe(200);
    expect(MemberSchema.parse(res.body)).toMatchObject({ userId: u.guest.id, role: "researcher" });
    expect(roleOf(t, lab.id, u.guest.id)).toBe("researcher");
  });

  it.each(Object.entries(refused))("refuses %s and changes nothing", async (who, [status, errorCode]) => {
    const t = makeTestApp();
    const { lab, agents, users: u } = await seedRoles(t);
    const res = await agents[who as Who].patch(`/api/labs/${lab.id}/members/${u.guest.id}`).send({ role: "lead" });
    expect(res.status).toBe(status);
    expect(code(res)).toBe(errorCode);
    expect(roleOf(t, lab.id, u.guest.id)).toBe("guest");
  });

  it("refuses to demote the last lead with 409 CONFLICT, and allows it once there is a second lead", async () => {
    const t = makeTestApp();
    const { lab, agents, users: u } = await seedRoles(t);
    const res = await agents.lead.patch(`/api/labs/${lab.id}/members/${u.lead.id}`).send({ role: "researcher" });
    expect(res.status).toBe(409);
    expect(code(res)).toBe("CONFLICT");
    expect(roleOf(t, lab.id, u.lead.id)).toBe("lead");

    await agents.lead.patch(`/api/labs/${lab.id}/members/${u.researcher.id}`).send({ role: "lead" }).expect(200);
    const step = await agents.lead.patch(`/api/labs/${lab.id}/members/${u.lead.id}`).send({ role: "guest" });
    expect(step.status).toBe(200);
    // Now a guest, the former lead is refused lead routes.
    const after = await agents.lead.patch(`/api/labs/${lab.id}/members/${u.guest.id}`).send({ role: "lead" });
    expect(after.status).toBe(403);
    const last = await agents.researcher.patch(`/api/labs/${lab.id}/members/${u.researcher.id}`).send({ role: "guest" });
    expect(last.status).toBe(409);
  });

  it("answers 404 for someone who is not in the lab and 400 for an unknown role", async () => {
    const t = makeTestApp();
    const { lab, agents, users: u } = await seedRoles(t);
    const notMember = await agents.lead.patch(`/api/labs/${lab.id}/members/${u.outsider.id}`).send({ role: "guest" });
    expect(notMember.status).toBe(404);
    expect(code(notMember)).toBe("NOT_FOUND");
    const badRole = await agents.lead.patch(`/api/labs/${lab.id}/members/${u.guest.id}`).send({ role: "owner" });
    expect(badRole.status).toBe(400);
    expect(ApiErrorSchema.parse(badRole.body).error.details?.[0]?.path).toBe("role");
  });
});

describe("DELETE /api/labs/:labId/members/:userId", () => {
  it("lets a lead remove a member (204); the account and its other labs stay", async () => {
    const t = makeTestApp();
    const { lab, otherLab, agents, users: u } = await seedRoles(t);
    addMember(t.db, otherLab.id, u.guest.id, "guest");
    const res = await agents.lead.delete(`/api/labs/${lab.id}/members/${u.guest.id}`);
    expect(res.status).toBe(204);
    expect(roleOf(t, lab.id, u.guest.id)).toBeUndefined();
    expect(roleOf(t, otherLab.id, u.guest.id)).toBe("guest");
    expect((await agents.guest.get(`/api/labs/${lab.id}/members`)).status).toBe(404);
    expect((await agents.guest.get(`/api/labs/${otherLab.id}/members`)).status).toBe(200);
  });

  it.each(Object.entries(refused))("refuses %s and removes nobody", async (who, [status, errorCode]) => {
    const t = makeTestApp();
    const { lab, agents, users: u } = await seedRoles(t);
    const res = await agents[who as Who].delete(`/api/labs/${lab.id}/members/${u.researcher.id}`);
    expect(res.status).toBe(status);
    expect(code(res)).toBe(errorCode);
    expect(roleOf(t, lab.id, u.researcher.id)).toBe("researcher");
  });

  it("refuses to remove the last lead with 409 CONFLICT; with a second lead a lead may leave", async () => {
    const t = makeTestApp();
    const { lab, agents, users: u } = await seedRoles(t);
    const res = await agents.lead.delete(`/api/labs/${lab.id}/members/${u.lead.id}`);
    expect(res.status).toBe(409);
    expect(code(res)).toBe("CONFLICT");
    const second = await insertUser(t.db);
    addMember(t.db, lab.id, second.id, "lead");
    expect((await agents.lead.delete(`/api/labs/${lab.id}/members/${u.lead.id}`)).status).toBe(204);
    expect(roleOf(t, lab.id, u.lead.id)).toBeUndefined();
  });
});
