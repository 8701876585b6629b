import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ComparisonResultSchema } from "@shared/schemas/compare";
import { openDb } from "../../server/db/client";
import { runMigrations } from "../../server/db/migrate";
import { labs } from "../../server/db/schema";
import { createResultCache } from "../../server/services/result-cache";
import { makeTestApp, seedRoles, type TestApp } from "../helpers/app";
import { seedSeries } from "./compare-fixtures";

/*
 * The comparison answers are computed once per database state and sent with an entity tag
 * (RFC 9110 §8.8.3, §13.1.2 If-None-Match). These tests check that a repeated request gets the same
 * stored answer and that every kind of write makes the next answer fresh.
 */

let t: TestApp;
let cast: Awaited<ReturnType<typeof seedRoles>>;
let series: ReturnType<typeof seedSeries>;
let base: string;

beforeAll(async () => {
  t = makeTestApp();
  cast = await seedRoles(t);
  series = seedSeries(t.db, t.dataDir, cast.lab.id, cast.users.lead.id);
  base = `/api/labs/${cast.lab.id}`;
});

describe("cached comparison answers", () => {
  it("answers a repeated request with the same entity tag, and 304 to a client that holds it", async () => {
    const first = await cast.agents.guest.get(`${base}/compare?parameter=thetaD`);
    expect(first.status).toBe(200);
    expect(first.headers["content-type"]).toMatch(/^application\/json/);
    expect(first.headers["cache-control"]).toBe("private, no-cache");
    // supertest asks for gzip, as browsers do, and unpacks the answer.
    expect(first.headers["content-encoding"]).toBe("gzip");
    expect(first.headers.vary).toMatch(/Accept-Encoding/);
    const etag = first.headers.etag as string;
    expect(etag).toMatch(/^"[A-Za-z0-9_-]{43}-gzip"$/);
    const second = await cast.agents.lead.get(`${base}/compare?parameter=thetaD`);
    expect(second.headers.etag).toBe(etag);
    expect(second.body).toEqual(first.body);
    const revalidated = await cast.agents.guest.get(`${base}/compare?parameter=thetaD`).set("If-None-Match", etag);
    expect(revalidated.status).toBe(304);
    expect(revalidated.text ?? "").toBe("");
  });

  it("sends the same JSON uncompressed, with its own entity tag, to a client that does not ask for gzip", async () => {
    const gz = await cast.agents.guest.get(`${base}/compare?parameter=thetaD`);
    const plain = await cast.agents.guest.get(`${base}/compare?parameter=thetaD`).set("Accept-Encoding", "identity");
    expect(plain.status).toBe(200);
    expect(plain.headers["content-encoding"]).toBeUndefined();
    expect(plain.body).toEqual(gz.body);
    expect(`${plain.headers.etag.slice(0, -1)}-gzip"`).toBe(gz.headers.etag);
    const stale = await cast.agents.guest.get(`${base}/compare?parameter=thetaD`).set("Accept-Encoding", "identity").set("If-None-Match", gz.headers.etag);
    expect(stale.status).toBe(200);
  });

  it("treats id lists in another order, or repeated, as the same question", async () => {
    const ids = [series.batchA, series.batchB];
    const one = await cast.agents.guest.get(`${base}/compare?batchIds=${ids.join(",")}`);
    const other = await cast.agents.guest.get(`${base}/compare?batchIds=${[...ids].reverse().join(",")},${ids[0]}`);
    expect(one.status).toBe(200);
    expect(other.headers.etag).toBe(one.headers.etag);
  });

  it("still checks access before answering from the cache: another lab's member gets 404", async () => {
    const cached = await cast.agents.lead.get(`${base}/compare?parameter=thetaD`).expect(200);
    const res = await cast.agents.outsider.get(`${base}/compare?parameter=thetaD`).set("If-None-Match", cached.headers.etag as string);
    expect(res.status).toBe(404);
    expect(res.headers.etag).not.toBe(cached.headers.etag);
    expect(res.body.error.code).toBe("NOT_FOUND");
    expect(res.text).not.toContain("thetaD");
  });

  it("recomputes after an approval through the API: the approved fit replaces the one it supersedes", async () => {
    const before = await cast.agents.guest.get(`${base}/compare?parameter=thetaD`);
    const etag = before.headers.etag as string;
    const b2Before = ComparisonResultSchema.parse(before.body).rows.filter((r) => r.sampleLabel === "B2");
    expect(b2Before.map((r) => r.value)).toEqual([322]);
    const csvBefore = await cast.agents.guest.get(`${base}/compare.csv?parameter=thetaD`);

    // B2's draft fit at 400 K (compare-fixtures) is approved by the lead.
    await cast.agents.lead.post(`/api/labs/${cast.lab.id}/fits/${series.b2.fitIds[1]}/approve`).send({}).expect(200);

    const after = await cast.agents.guest.get(`${base}/compare?parameter=thetaD`).set("If-None-Match", etag);
    expect(after.status).toBe(200);
    expect(after.headers.etag).not.toBe(etag);
    const b2After = ComparisonResultSchema.parse(after.body).rows.filter((r) => r.sampleLabel === "B2");
    expect(b2After.map((r) => r.value)).toEqual([400]);
    const csvAfter = await cast.agents.guest.get(`${base}/compare.csv?parameter=thetaD`);
    expect(csvAfter.headers.etag).not.toBe(csvBefore.headers.etag);
    expect(csvAfter.text).toContain(",400,");
  });

  it("recomputes after a sample is renamed", async () => {
    await cast.agents.guest.get(`${base}/compare/curves?parameter=thetaD`).expect(200);
    await cast.agents.researcher.patch(`${base}/samples/${series.a[0].sampleId}`).send({ label: "A1-renamed" }).expect(200);
    const table = ComparisonResultSchema.parse((await cast.agents.guest.get(`${base}/compare?parameter=thetaD`)).body);
    expect(table.rows.map((r) => r.sampleLabel)).toContain("A1-renamed");
    const curves = (await cast.agents.guest.get(`${base}/compare/curves?parameter=thetaD`)).body as { label: string }[];
    expect(curves.some((c) => c.label.startsWith("A1-renamed"))).toBe(true);
  });
});

describe("createResultCache", () => {
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(path.join(tmpdir(), "thetafold-cache-"));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it("keeps a body until this connection or another one writes to the database", () => {
    const file = path.join(dir, "cache.db");
    const db = openDb(file);
    runMigrations(db);
    const cache = createResultCache(db);
    let computed = 0;
    const answer = () => cache.get("k", () => `answer ${++computed}`).body.toString();
    expect(answer()).toBe("answer 1");
    expect(answer()).toBe("answer 1");
    expect(cache.stats()).toEqual({ hits: 1, misses: 1 });

    db.insert(labs).values({ id: "lab-1", name: "Cache lab", createdAt: Date.now() }).run();
    expect(answer()).toBe("answer 2");

    // A second connection stands for the command-line tool or a restore working on the same file.
    const other = openDb(file);
    other.$client.prepare("UPDATE labs SET name = 'Renamed' WHERE id = 'lab-1'").run();
    expect(answer()).toBe("answer 3");
    expect(answer()).toBe("answer 3");
    other.$client.close();
    db.$client.close();
  });

  it("stores nothing when the computation throws, and sends but does not keep a body over a quarter of the cap", () => {
    const db = openDb(":memory:");
    const cache = createResultCache(db, 400);
    expect(() =>
      cache.get("bad", () => {
        throw new Error("refused");
      }),
    ).toThrow("refused");
    let computed = 0;
    const big = () => cache.get("big", () => `${++computed}`.padEnd(200, "x"));
    expect(big().body.byteLength).toBe(200);
    expect(big().body.toString().startsWith("2")).toBe(true);
    db.$client.close();
  });
});
