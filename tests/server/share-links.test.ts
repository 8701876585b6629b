import { createHash } from "node:crypto";
import { eq } from "drizzle-orm";
import request from "supertest";
import { beforeAll, describe, expect, it } from "vitest";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { BundleListSchema, CreatedShareLinkSchema } from "@shared/schemas/bundles";
import { auditLog, shareLinks } from "../../server/db/schema";
import { makeTestApp, seedRoles, type TestApp } from "../helpers/app";
import { binary, seedSeries } from "./compare-fixtures";

let t: TestApp;
let cast: Awaited<ReturnType<typeof seedRoles>>;
let base: string;
let bundle: { id: string; fileSha256: string; sizeBytes: number };

const tokenOf = (url: string) => url.split("/api/shared/")[1];
const sha256 = (b: Uint8Array | string) => createHash("sha256").update(b).digest("hex");

async function makeLink(body: Record<string, unknown> = {}) {
  const res = await cast.agents.researcher.post(`${base}/bundles/${bundle.id}/links`).send(body);
  expect(res.status).toBe(201);
  return CreatedShareLinkSchema.parse(res.body);
}

beforeAll(async () => {
  t = makeTestApp();
  cast = await seedRoles(t);
  const s = seedSeries(t.db, t.dataDir, cast.lab.id, cast.users.lead.id);
  base = `/api/labs/${cast.lab.id}`;
  const res = await cast.agents.lead.post(`${base}/bundles`).send({ name: "Shared series", sampleIds: [s.a[0].sampleId, s.b1.sampleId] });
  expect(res.status).toBe(201);
  bundle = res.body;
});

describe("share links", () => {
  it("shows the URL once, stores only the SHA-256 of a 32-byte token, defaults to 14 days, and audits it", async () => {
    const link = await makeLink();
    expect(link.url.startsWith("http://localhost:3000/api/shared/")).toBe(true);
    const token = tokenOf(link.url);
    // 32 random bytes in base64url without padding are 43 characters (RFC 4648 §5).
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/);
    const row = t.db.select().from(shareLinks).where(eq(shareLinks.id, link.id)).get()!;
    expect(row.tokenHash).toBe(sha256(token));
    const everything = JSON.stringify(t.db.select().from(shareLinks).all());
    expect(everything).not.toContain(token);
    expect(Date.parse(link.expiresAt) - Date.parse(link.createdAt)).toBe(14 * 86_400_000);
    expect(link.status).toBe("active");
    expect(link.emailed).toBe(false);
    const listed = BundleListSchema.parse((await cast.agents.lead.get(`${base}/bundles`)).body)[0].links.find((l) => l.id === link.id)!;
    expect(JSON.stringify(listed)).not.toContain(token);
    expect((listed as Record<string, unknown>).url).toBeUndefined();
    const a = t.db.select().from(auditLog).where(eq(auditLog.action, "share_link.created")).all();
    expect(a.some((r) => (r.details as { linkId?: string }).linkId === link.id)).toBe(true);
  });

  it("downloads the zip with no session, byte for byte, and counts each download", async () => {
    const link = await makeLink();
    const anon = request(t.app);
    const res = await binary(anon.get(new URL(link.url).pathname));
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toBe("application/zip");
    expect(res.headers["content-disposition"]).toMatch(/^attachment; filename="thetafold-shared-series\.zip"$/);
    expect(res.headers["set-cookie"]).toBeUndefined();
    expect(sha256(res.body as Buffer)).toBe(bundle.fileSha256);
    // RFC 9530 Repr-Digest carries the same SHA-256 in base64.
    expect(res.headers["repr-digest"]).toBe(`sha-256=:${Buffer.from(bundle.fileSha256, "hex").toString("base64")}:`);
    await binary(anon.get(new URL(link.url).pathname));
    const row = t.db.select().from(shareLinks).where(eq(shareLinks.id, link.id)).get()!;
    expect(row.downloadCount).toBe(2);
  });

  it("stops at its download limit with 410, in the same words as an unknown link's 404", async () => {
    const link = await makeLink({ maxDownloads: 2 });
    const path = new URL(link.url).pathname;
    expect((await binary(request(t.app).get(path))).status).toBe(200);
    expect((await binary(request(t.app).get(path))).status).toBe(200);
    const third = await request(t.app).get(path);
    expect(third.status).toBe(410);
    const unknown = await request(t.app).get(`/api/shared/${"A".repeat(43)}`);
    expect(unknown.status).toBe(404);
    const e410 = ApiErrorSchema.parse(third.body).error;
    const e404 = ApiErrorSchema.parse(unknown.body).error;
    expect(e410.code).toBe("GONE");
    expect(e404.code).toBe("NOT_FOUND");
    expect(e410.message).toBe(e404.message);
    const listed = BundleListSchema.parse((await cast.agents.lead.get(`${base}/bundles`)).body)[0].links.find((l) => l.id === link.id)!;
    expect(listed.status).toBe("used-up");
    expect(listed.downloadCount).toBe(2);
  });

  it("answers 410 once expired, and 410 once revoked, with the same message", async () => {
    const expired = await makeLink({ expiresInDays: 1 });
    t.db.update(shareLinks).set({ expiresAt: Date.now() - 1000 }).where(eq(shareLinks.id, expired.id)).run();
    const e = await request(t.app).get(new URL(expired.url).pathname);
    expect(e.status).toBe(410);

    const revoked = await makeLink();
    expect((await binary(request(t.app).get(new URL(revoked.url).pathname))).status).toBe(200);
    const del = await cast.agents.lead.delete(`${base}/bundles/${bundle.id}/links/${revoked.id}`);
    expect(del.status).toBe(204);
    const r = await request(t.app).get(new URL(revoked.url).pathname);
    expect(r.status).toBe(410);
    expect(ApiErrorSchema.parse(r.body).error.message).toBe(ApiErrorSchema.parse(e.body).error.message);
    const listed = BundleListSchema.parse((await cast.agents.lead.get(`${base}/bundles`)).body)[0].links;
    expect(listed.find((l) => l.id === revoked.id)!.status).toBe("revoked");
    expect(listed.find((l) => l.id === expired.id)!.status).toBe("expired");
  });

  it("answers a malformed token like an unknown one (404)", async () => {
    for (const bad of ["x", "%00%00", "a".repeat(300), "../../etc/passwd"]) {
      const res = await request(t.app).get(`/api/shared/${encodeURIComponent(bad)}`);
      expect(res.status, bad).toBe(404);
    }
  });

  it("refuses bad link settings with 400 and a link for another lab's bundle with 404", async () => {
    for (const body of [{ expiresInDays: 0 }, { expiresInDays: 400 }, { expiresInDays: 1.5 }, { maxDownloads: 0 }, { emailTo: "not an address" }]) {
      const res = await cast.agents.lead.post(`${base}/bundles/${bundle.id}/links`).send(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(ApiErrorSchema.parse(res.body).error.code).toBe("VALIDATION_FAILED");
    }
    const other = await cast.agents.outsider.post(`/api/labs/${cast.otherLab.id}/bundles/${bundle.id}/links`).send({});
    expect(other.status).toBe(404);
  });

  it("e-mails the link through the app's mailer when asked", async () => {
    const before = t.mailer.sent.length;
    const link = await makeLink({ emailTo: "theorist@example.net", expiresInDays: 7, maxDownloads: 3 });
    expect(link.emailed).toBe(true);
    expect(link.emailTo).toBe("theorist@example.net");
    const mail = t.mailer.sent[before];
    expect(mail.to).toBe("theorist@example.net");
    expect(mail.subject).toContain("Shared series");
    expect(mail.text).toContain(link.url);
    expect(mail.text).toContain("3 downloads");
  });

  it("keeps the link when the e-mail cannot be sent, and says so", async () => {
    const failing = {
      fake: true,
      async send() {
        throw new Error("SMTP down");
      },
    };
    const t3 = makeTestApp({ mailer: failing });
    const c = await seedRoles(t3);
    const s = seedSeries(t3.db, t3.dataDir, c.lab.id, c.users.lead.id);
    const b = await c.agents.lead.post(`/api/labs/${c.lab.id}/bundles`).send({ name: "mail fails", sampleIds: [s.c1.sampleId] });
    const res = await c.agents.lead.post(`/api/labs/${c.lab.id}/bundles/${b.body.id}/links`).send({ emailTo: "x@example.net" });
    expect(res.status).toBe(201);
    const link = CreatedShareLinkSchema.parse(res.body);
    expect(link.emailed).toBe(false);
    expect(link.emailError).toMatch(/could not be sent/);
    expect((await binary(request(t3.app).get(new URL(link.url).pathname))).status).toBe(200);
  });
});

describe("rate limit on share tokens", () => {
  it("answers 429 after too many failed tokens from one address, while good downloads do not count", async () => {
    const t2 = makeTestApp({ authRateLimitPerMinute: 3 });
    const c = await seedRoles(t2);
    const s = seedSeries(t2.db, t2.dataDir, c.lab.id, c.users.lead.id);
    const b = await c.agents.lead.post(`/api/labs/${c.lab.id}/bundles`).send({ name: "limited", sampleIds: [s.c1.sampleId] });
    const link = CreatedShareLinkSchema.parse((await c.agents.lead.post(`/api/labs/${c.lab.id}/bundles/${b.body.id}/links`).send({})).body);
    const good = new URL(link.url).pathname;
    for (let i = 0; i < 5; i++) expect((await binary(request(t2.app).get(good))).status).toBe(200);
    const guesses = [];
    for (let i = 0; i < 4; i++) guesses.push((await request(t2.app).get(`/api/shared/${String(i).repeat(43)}`)).status);
    expect(guesses).toEqual([404, 404, 404, 429]);
    const limited = await request(t2.app).get(`/api/shared/${"9".repeat(43)}`);
    expect(limited.status).toBe(429);
    expect(ApiErrorSchema.parse(limited.body).error.code).toBe("RATE_LIMITED");
  });
});
