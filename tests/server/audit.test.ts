import request from "supertest";
import { describe, expect, it } from "vitest";
import { z } from "zod";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { AuditEntrySchema, InvitationSchema } from "@shared/schemas/labs";
import { audit } from "../../server/services/audit";
import { TEST_PASSWORD, makeTestApp, seedRoles } from "../helpers/app";

const code = (res: request.Response) => ApiErrorSchema.parse(res.body).error.code;
const entries = async (agent: request.Agent, labId: string) => {
  const res = await agent.get(`/api/labs/${labId}/audit`);
  expect(res.status).toBe(200);
  return z.array(AuditEntrySchema).parse(res.body);
};

describe("GET /api/labs/:labId/audit", () => {
  it("records sign-in, sign-out, role changes, removals and invitations, newest first", async () => {
    const t = makeTestApp();
    const { lab, agents, users: u } = await seedRoles(t);
    await request(t.app).post("/api/auth/sign-in").send({ email: u.researcher.email, password: "wrong password" }).expect(401);
    const signIn = await request(t.app).post("/api/auth/sign-in").send({ email: u.researcher.email, password: TEST_PASSWORD }).expect(200);
    await request(t.app).post("/api/auth/sign-out").set("Cookie", signIn.headers["set-cookie"] as unknown as string[]).expect(204);
    await agents.lead.patch(`/api/labs/${lab.id}/members/${u.guest.id}`).send({ role: "researcher" }).expect(200);
    const inv = InvitationSchema.parse((await agents.lead.post(`/api/labs/${lab.id}/invitations`).send({ email: "new@example.org", role: "guest" })).body);
    await agents.lead.delete(`/api/labs/${lab.id}/invitations/${inv.id}`).expect(204);
    await agents.lead.delete(`/api/labs/${lab.id}/members/${u.guest.id}`).expect(204);

    const list = await entries(agents.lead, lab.id);
    expect(list.map((e) => [e.action, e.target])).toEqual([
      ["member.removed", u.guest.email],
      ["invitation.revoked", "new@example.org"],
      ["invitation.created", "new@example.org"],
      ["member.role_changed", u.guest.email],
      ["auth.sign_out", u.researcher.email],
      ["auth.sign_in", u.researcher.email],
      ["auth.sign_in_failed", u.researcher.email],
    ]);
    const roleChange = list.find((e) => e.action === "member.role_changed")!;
    expect(roleChange.userEmail).toBe(u.lead.email);
    expect(roleChange.details).toEqual({ userId: u.guest.id, from: "guest", to: "researcher" });
  });

  it("keeps each lab's log to itself: lab B's sign-ins are not in lab A", async () => {
    const t = makeTestApp();
    const { lab, otherLab, agents, users: u } = await seedRoles(t);
    await request(t.app).post("/api/auth/sign-in").send({ email: u.outsider.email, password: TEST_PASSWORD }).expect(200);
    expect(await entries(agents.lead, lab.id)).toEqual([]);
    expect((await entries(agents.outsider, otherLab.id)).map((e) => e.action)).toEqual(["auth.sign_in"]);
  });

  it("shows rows written by later features through audit()", async () => {
    const t = makeTestApp();
    const { lab, agents, users: u } = await seedRoles(t);
    audit(t.db, { labId: lab.id, userId: u.researcher.id, action: "fit.approved", target: "sample S-1", details: { fitId: "f1" } });
    const [entry] = await entries(agents.lead, lab.id);
    expect(entry).toMatchObject({ action: "fit.approved", target: "sample S-1", userEmail: u.researcher.email, details: { fitId: "f1" } });
  });

  it.each([
    ["anonymous", 401, "UNAUTHENTICATED"],
    ["guest", 403, "FORBIDDEN"],
    ["researcher", 403, "FORBIDDEN"],
    ["outsider", 404, "NOT_FOUND"],
    ["admin", 404, "NOT_FOUND"],
  ] as const)("refuses %s with %i %s", async (who, status, errorCode) => {
    const t = makeTestApp();
    const { lab, agents } = await seedRoles(t);
    const res = await agents[who].get(`/api/labs/${lab.id}/audit`);
    expect(res.status).toBe(status);
    expect(code(res)).toBe(errorCode);
  });
});
