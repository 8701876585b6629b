import { afterEach, describe, expect, it } from "vitest";
import { mailMessages } from "../../server/db/schema";
import { startFakeSmtp, type FakeSmtpServer } from "../../server/mail/fake-smtp";
import { createMailer, type RunningMailer } from "../../server/mail/mailer";
import { testDb } from "../helpers/app";

const open: (RunningMailer | FakeSmtpServer)[] = [];
afterEach(async () => {
  for (const o of open.splice(0)) await o.close();
});

describe("createMailer", () => {
  it("without an SMTP URL starts the loopback fake server, sends to it over SMTP and stores the message", async () => {
    const db = testDb();
    const mailer = await createMailer({ from: "Thetafold <no-reply@thetafold.invalid>", db });
    open.push(mailer);
    expect(mailer.fake).toBe(true);
    await mailer.send({ to: "someone@example.org", subject: "Grüße — Cp(T) run ready", text: "Line one\nΘ_D = 343 K" });
    const rows = db.select().from(mailMessages).all();
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ to: "someone@example.org", subject: "Grüße — Cp(T) run ready", text: "Line one\nΘ_D = 343 K" });
    expect(rows[0].from).toMatch(/^"?Thetafold"? <no-reply@thetafold\.invalid>$/);
    expect(rows[0].raw).toMatch(/^[\s\S]*Message-ID:/i);
  });

  it("with an SMTP URL sends to that server and is not the fake", async () => {
    const serverDb = testDb();
    const server = await startFakeSmtp(serverDb);
    open.push(server);
    const appDb = testDb();
    const mailer = await createMailer({ smtpUrl: `smtp://127.0.0.1:${server.port}`, from: "lab@example.org", db: appDb });
    open.push(mailer);
    expect(mailer.fake).toBe(false);
    await mailer.send({ to: "collaborator@example.org", subject: "Bundle shared", text: "See the link." });
    expect(serverDb.select().from(mailMessages).all().map((m) => m.subject)).toEqual(["Bundle shared"]);
    // The app's own database keeps no outbox copy when mail is real.
    expect(appDb.select().from(mailMessages).all()).toHaveLength(0);
  });

  it("rejects when the SMTP server cannot be reached", async () => {
    const mailer = await createMailer({ smtpUrl: "smtp://127.0.0.1:1", from: "lab@example.org", db: testDb() });
    open.push(mailer);
    await expect(mailer.send({ to: "a@example.org", subject: "s", text: "t" })).rejects.toThrow();
  });
});
