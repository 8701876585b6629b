import request from "supertest";
import { afterEach, describe, expect, it } from "vitest";
import { z } from "zod";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { OutboxMessageSchema } from "@shared/schemas/labs";
import { createMailer, type RunningMailer } from "../../server/mail/mailer";
import { makeTestApp, memoryMailer, seedRoles, testDb } from "../helpers/app";

const code = (res: request.Response) => ApiErrorSchema.parse(res.body).error.code;
const mailers: RunningMailer[] = [];
afterEach(async () => {
  for (const m of mailers.splice(0)) await m.close();
});

describe("GET /api/outbox", () => {
  it("shows a site administrator what the fake SMTP server received, newest first", async () => {
    const db = testDb();
    const mailer = await createMailer({ from: "Thetafold test <no-reply@thetafold.invalid>", db });
    mailers.push(mailer);
    const t = makeTestApp({ db, mailer });
    const { agents } = await seedRoles(t);
    await mailer.send({ to: "first@example.org", subject: "First message", text: "one" });
    await new Promise((r) => setTimeout(r, 5));
    await mailer.send({ to: "second@example.org", subject: "Second message", text: "two\nlines" });
    const res = await agents.admin.get("/api/outbox");
    expect(res.status).toBe(200);
    const list = z.array(OutboxMessageSchema).parse(res.body);
    expect(list.map((m) => [m.to, m.subject, m.text])).toEqual([
      ["second@example.org", "Second message", "two\nlines"],
      ["first@example.org", "First message", "one"],
    ]);
    expect(list[0].from).toContain("no-reply@thetafold.invalid");
  });

  it.each([
    ["anonymous", 401, "UNAUTHENTICATED"],
    ["guest", 403, "FORBIDDEN"],
    ["researcher", 403, "FORBIDDEN"],
    ["lead", 403, "FORBIDDEN"],
    ["outsider", 403, "FORBIDDEN"],
  ] as const)("refuses %s with %i %s", async (who, status, errorCode) => {
    const t = makeTestApp();
    const { agents } = await seedRoles(t);
    const res = await agents[who].get("/api/outbox");
    expect(res.status).toBe(status);
    expect(code(res)).toBe(errorCode);
  });

  it("answers 404 NOT_FOUND to a site administrator when mail goes to a real SMTP server", async () => {
    const t = makeTestApp({ mailer: { ...memoryMailer(), fake: false } });
    const { agents } = await seedRoles(t);
    const res = await agents.admin.get("/api/outbox");
    expect(res.status).toBe(404);
    expect(code(res)).toBe("NOT_FOUND");
  });
});
