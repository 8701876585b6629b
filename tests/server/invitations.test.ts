import { createHash } from "node:crypto";
import request from "supertest";
import { eq } from "drizzle-orm";
import { afterEach, describe, expect, it } from "vitest";
import { z } from "zod";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { MeSchema } from "@shared/schemas/auth";
import { InvitationPreviewSchema, InvitationSchema } from "@shared/schemas/labs";
import { invitations, mailMessages, memberships } from "../../server/db/schema";
import { createMailer, type RunningMailer } from "../../server/mail/mailer";
import { TEST_ORIGIN, makeTestApp, seedRoles, sessionCookie, testDb } from "../helpers/app";

const code = (res: request.Response) => ApiErrorSchema.parse(res.body).error.code;
const linkIn = (text: string) => {
  const m = new RegExp(`${TEST_ORIGIN}/invite/([A-Za-z0-9_-]+)`).exec(text);
  if (!m) throw new Error(`no invitation link in: ${text}`);
  return m[1];
};

const mailers: RunningMailer[] = [];
afterEach(async () => {
  for (const m of mailers.splice(0)) await m.close();
});

/** An app whose mail goes through the real fake SMTP server into its own database. */
async function appWithFakeSmtp() {
  const db = testDb();
  const mailer = await createMailer({ from: "Thetafold test <no-reply@thetafold.invalid>", db });
  mailers.push(mailer);
  return makeTestApp({ db, mailer });
}

describe("invitation flow end to end through the fake SMTP server", () => {
  it("sends the link by SMTP, previews it, accepts it as a new account, then the invitee signs in", async () => {
    const t = await appWithFakeSmtp();
    const { lab, agents } = await seedRoles(t);

    const created = await agents.lead.post(`/api/labs/${lab.id}/invitations`).send({ email: "New.Student@Example.org", role: "researcher" });
    expect(created.status).toBe(201);
    const invitation = InvitationSchema.parse(created.body);
    expect(invitation).toMatchObject({ email: "new.student@example.org", role: "researcher", acceptedAt: null });
    const lifetimeMs = Date.parse(invitation.expiresAt) - Date.parse(invitation.createdAt);
    expect(lifetimeMs).toBe(7 * 24 * 3600 * 1000);

    const messages = t.db.select().from(mailMessages).all();
    expect(messages).toHaveLength(1);
    const mail = messages[0];
    expect(mail.to).toContain("new.student@example.org");
    expect(mail.from).toContain("no-reply@thetafold.invalid");
    expect(mail.subject).toContain("Lab A");
    expect(mail.raw).toContain("Subject:");
    const token = linkIn(mail.text);
    expect(Buffer.from(token, "base64url").length).toBeGreaterThanOrEqual(32);

    // Only the SHA-256 of the token is stored.
    const row = t.db.select().from(invitations).where(eq(invitations.id, invitation.id)).get()!;
    expect(row.tokenHash).toBe(createHash("sha256").update(token).digest("hex"));
    expect(JSON.stringify(t.db.select().from(invitations).all())).not.toContain(token);

    const preview = await request(t.app).get(`/api/invitations/${token}`);
    expect(preview.status).toBe(200);
    expect(InvitationPreviewSchema.parse(preview.body)).toEqual({
      labName: "Lab A",
      email: "new.student@example.org",
      role: "researcher",
      hasAccount: false,
    });

    const accepted = await request(t.app)
      .post(`/api/invitations/${token}/accept`)
      .send({ displayName: "New Student", password: "my own long password" });
    expect(accepted.status).toBe(200);
    const me = MeSchema.parse(accepted.body);
    expect(me.user).toMatchObject({ email: "new.student@example.org", displayName: "New Student", isSiteAdmin: false });
    expect(me.memberships).toEqual([{ labId: lab.id, labName: "Lab A", role: "researcher" }]);
    const cookie = sessionCookie(accepted)!;
    expect((await request(t.app).get("/api/me").set("Cookie", cookie)).status).toBe(200);

    const signIn = await request(t.app).post("/api/auth/sign-in").send({ email: "new.student@example.org", password: "my own long password" });
    expect(signIn.status).toBe(200);
    expect(MeSchema.parse(signIn.body).memberships[0]?.role).toBe("researcher");

    const list = z.array(InvitationSchema).parse((await agents.lead.get(`/api/labs/${lab.id}/invitations`)).body);
    expect(list.find((i) => i.id === invitation.id)?.acceptedAt).not.toBeNull();
  });

  it("gives one answer, 410 GONE, for a used, an expired and an unknown token", async () => {
    const t = makeTestApp();
    const { lab, agents } = await seedRoles(t);
    await agents.lead.post(`/api/labs/${lab.id}/invitations`).send({ email: "first@example.org", role: "guest" }).expect(201);
    await agents.lead.post(`/api/labs/${lab.id}/invitations`).send({ email: "second@example.org", role: "guest" }).expect(201);
    const used = linkIn(t.mailer.sent[0].text);
    const expired = linkIn(t.mailer.sent[1].text);
    await request(t.app).post(`/api/invitations/${used}/accept`).send({ displayName: "First", password: "first long password" }).expect(200);
    t.db.update(invitations).set({ expiresAt: Date.now() - 1000 }).where(eq(invitations.email, "second@example.org")).run();
    const unknown = Buffer.alloc(32, 7).toString("base64url");

    const answers: request.Response[] = [];
    for (const token of [used, expired, unknown]) {
      const preview = await request(t.app).get(`/api/invitations/${token}`);
      const accept = await request(t.app).post(`/api/invitations/${token}/accept`).send({ displayName: "Again", password: "another long password" });
      answers.push(preview, accept);
    }
    for (const res of answers) {
      expect(res.status).toBe(410);
      expect(code(res)).toBe("GONE");
      expect(res.body).toEqual(answers[0].body);
    }
    // The expired invitation made no account and no membership.
    expect(t.db.select().from(memberships).all()).toHaveLength(5);
  });

  it("refuses a new-account accept without a password (400, field named) and keeps the link usable", async () => {
    const t = makeTestApp();
    const { lab, agents } = await seedRoles(t);
    await agents.lead.post(`/api/labs/${lab.id}/invitations`).send({ email: "pat@example.org", role: "guest" }).expect(201);
    const token = linkIn(t.mailer.sent[0].text);
    const res = await request(t.app).post(`/api/invitations/${token}/accept`).send({ displayName: "Pat" });
    expect(res.status).toBe(400);
    expect(ApiErrorSchema.parse(res.body).error.details?.map((d) => d.path)).toEqual(["password"]);
    expect((await request(t.app).get(`/api/invitations/${token}`)).status).toBe(200);
  });
});

describe("accepting with an existing account", () => {
  async function inviteExisting() {
    const t = makeTestApp();
    const s = await seedRoles(t);
    // The lead of lab B invites lab A's guest into lab B.
    await s.agents.outsider.post(`/api/labs/${s.otherLab.id}/invitations`).send({ email: s.users.guest.email, role: "researcher" }).expect(201);
    return { t, ...s, token: linkIn(t.mailer.sent[0].text) };
  }

  it("previews hasAccount: true", async () => {
    const { t, token } = await inviteExisting();
    expect(InvitationPreviewSchema.parse((await request(t.app).get(`/api/invitations/${token}`)).body).hasAccount).toBe(true);
  });

  it("needs the invitee signed in: anonymous 401, signed in as someone else 403, nothing changes", async () => {
    const { t, token, agents, otherLab, users: u } = await inviteExisting();
    const anon = await request(t.app).post(`/api/invitations/${token}/accept`).send({});
    expect(anon.status).toBe(401);
    expect(code(anon)).toBe("UNAUTHENTICATED");
    const wrong = await agents.researcher.post(`/api/invitations/${token}/accept`).send({});
    expect(wrong.status).toBe(403);
    expect(code(wrong)).toBe("FORBIDDEN");
    expect(t.db.select().from(memberships).where(eq(memberships.labId, otherLab.id)).all().map((m) => m.userId)).toEqual([u.outsider.id]);
  });

  it("adds the signed-in invitee to the lab with the invited role (200 Me); the link is then used up", async () => {
    const { t, token, agents, lab, otherLab } = await inviteExisting();
    const res = await agents.guest.post(`/api/invitations/${token}/accept`).send({});
    expect(res.status).toBe(200);
    expect(MeSchema.parse(res.body).memberships).toEqual([
      { labId: lab.id, labName: "Lab A", role: "guest" },
      { labId: otherLab.id, labName: "Lab B", role: "researcher" },
    ]);
    const again = await agents.guest.post(`/api/invitations/${token}/accept`).send({});
    expect(again.status).toBe(410);
    expect(code(again)).toBe("GONE");
  });
});

describe("POST /api/labs/:labId/invitations", () => {
  it("refuses to invite an existing member with 409 CONFLICT, sends no mail and stores nothing", async () => {
    const t = makeTestApp();
    const { lab, agents, users: u } = await seedRoles(t);
    const res = await agents.lead.post(`/api/labs/${lab.id}/invitations`).send({ email: u.researcher.email.toUpperCase(), role: "lead" });
    expect(res.status).toBe(409);
    expect(code(res)).toBe("CONFLICT");
    expect(t.mailer.sent).toHaveLength(0);
    expect(t.db.select().from(invitations).all()).toHaveLength(0);
  });

  it("replaces a pending invitation of the same address: the old link stops working", async () => {
    const t = makeTestApp();
    const { lab, agents } = await seedRoles(t);
    await agents.lead.post(`/api/labs/${lab.id}/invitations`).send({ email: "sam@example.org", role: "guest" }).expect(201);
    await agents.lead.post(`/api/labs/${lab.id}/invitations`).send({ email: "sam@example.org", role: "researcher" }).expect(201);
    const [oldToken, newToken] = t.mailer.sent.map((m) => linkIn(m.text));
    expect((await request(t.app).get(`/api/invitations/${oldToken}`)).status).toBe(410);
    expect(InvitationPreviewSchema.parse((await request(t.app).get(`/api/invitations/${newToken}`)).body).role).toBe("researcher");
    const list = z.array(InvitationSchema).parse((await agents.lead.get(`/api/labs/${lab.id}/invitations`)).body);
    expect(list.map((i) => [i.email, i.role])).toEqual([["sam@example.org", "researcher"]]);
  });

  it("takes the invitation back and answers 500 INTERNAL when the e-mail cannot be sent", async () => {
    const failing = { fake: true, async send() { throw new Error("connection refused"); } };
    const t = makeTestApp({ mailer: failing });
    const { lab, agents } = await seedRoles(t);
    const quiet = console.error;
    console.error = () => {};
    try {
      const res = await agents.lead.post(`/api/labs/${lab.id}/invitations`).send({ email: "sam@example.org", role: "guest" });
      expect(res.status).toBe(500);
      expect(code(res)).toBe("INTERNAL");
    } finally {
      console.error = quiet;
    }
    expect(t.db.select().from(invitations).all()).toHaveLength(0);
  });

  it("refuses a malformed address with 400 on email", async () => {
    const t = makeTestApp();
    const { lab, agents } = await seedRoles(t);
    const res = await agents.lead.post(`/api/labs/${lab.id}/invitations`).send({ email: "not-an-address", role: "guest" });
    expect(res.status).toBe(400);
    expect(ApiErrorSchema.parse(res.body).error.details?.[0]?.path).toBe("email");
  });
});

describe("DELETE /api/labs/:labId/invitations/:invitationId", () => {
  it("withdraws a pending invitation (204): its link is then 410, a second delete 404", async () => {
    const t = makeTestApp();
    const { lab, agents } = await seedRoles(t);
    const inv = InvitationSchema.parse((await agents.lead.post(`/api/labs/${lab.id}/invitations`).send({ email: "kim@example.org", role: "guest" })).body);
    const token = linkIn(t.mailer.sent[0].text);
    expect((await agents.lead.delete(`/api/labs/${lab.id}/invitations/${inv.id}`)).status).toBe(204);
    expect((await request(t.app).get(`/api/invitations/${token}`)).status).toBe(410);
    const again = await agents.lead.delete(`/api/labs/${lab.id}/invitations/${inv.id}`);
    expect(again.status).toBe(404);
    expect(code(again)).toBe("NOT_FOUND");
  });

  it("answers 404 for another lab's invitation named through this lab's path, and leaves it alone", async () => {
    const t = makeTestApp();
    const { lab, otherLab, agents } = await seedRoles(t);
    const inv = InvitationSchema.parse((await agents.outsider.post(`/api/labs/${otherLab.id}/invitations`).send({ email: "kim@example.org", role: "guest" })).body);
    expect((await agents.lead.delete(`/api/labs/${lab.id}/invitations/${inv.id}`)).status).toBe(404);
    expect(t.db.select().from(invitations).all()).toHaveLength(1);
  });

  it("refuses to withdraw an accepted invitation with 409 CONFLICT", async () => {
    const t = makeTestApp();
    const { lab, agents } = await seedRoles(t);
    const inv = InvitationSchema.parse((await agents.lead.post(`/api/labs/${lab.id}/invitations`).send({ email: "kim@example.org", role: "guest" })).body);
    await request(t.app).post(`/api/invitations/${linkIn(t.mailer.sent[0].text)}/accept`).send({ displayName: "Kim", password: "kim long password" }).expect(200);
    const res = await agents.lead.delete(`/api/labs/${lab.id}/invitations/${inv.id}`);
    expect(res.status).toBe(409);
    expect(code(res)).toBe("CONFLICT");
  });
});

describe("invitation routes: role matrix", () => {
  type Who = "anonymous" | "guest" | "researcher" | "lead" | "outsider" | "admin";
  const expected: Record<Who, [number, string | null]> = {
    anonymous: [401, "UNAUTHENTICATED"],
    guest: [403, "FORBIDDEN"],
    researcher: [403, "FORBIDDEN"],
    lead: [0, null],
    outsider: [404, "NOT_FOUND"],
    admin: [404, "NOT_FOUND"],
  };
  const whos = Object.keys(expected) as Who[];

  it.each(whos)("GET, POST and DELETE for %s", async (who) => {
    const t = makeTestApp();
    const { lab, agents } = await seedRoles(t);
    const pending = InvitationSchema.parse((await agents.lead.post(`/api/labs/${lab.id}/invitations`).send({ email: "pending@example.org", role: "guest" })).body);
    const agent = agents[who];
    const list = await agent.get(`/api/labs/${lab.id}/invitations`);
    const create = await agent.post(`/api/labs/${lab.id}/invitations`).send({ email: "someone@example.org", role: "guest" });
    const remove = await agent.delete(`/api/labs/${lab.id}/invitations/${pending.id}`);
    const [status, errorCode] = expected[who];
    if (errorCode === null) {
      expect([list.status, create.status, remove.status]).toEqual([200, 201, 204]);
      return;
    }
    for (const res of [list, create, remove]) {
      expect(res.status).toBe(status);
      expect(code(res)).toBe(errorCode);
    }
    expect(t.db.select().from(invitations).all().map((i) => i.email)).toEqual(["pending@example.org"]);
    expect(t.mailer.sent).toHaveLength(1);
  });
});

