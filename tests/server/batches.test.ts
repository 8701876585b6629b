import { describe, expect, it } from "vitest";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { BatchSchema } from "@shared/schemas/samples";
import { makeTestApp, seedRoles } from "../helpers/app";
import { footprint } from "./runs-helpers";

async function setup() {
  const t = makeTestApp();
  const cast = await seedRoles(t);
  return { t, ...cast, url: `/api/labs/${cast.lab.id}/batches` };
}

describe("batches API", () => {
  it("creates a batch and lists it with its sample count", async () => {
    const { agents, url, lab } = await setup();
    const created = await agents.researcher.post(url).send({ code: "B-01", synthesisDate: "2026-10-02", method: "arc melting", notes: "annealed 7 d" });
    expect(created.status).toBe(201);
    const batch = BatchSchema.parse(created.body);
    expect(batch).toMatchObject({ code: "B-01", synthesisDate: "2026-10-02", method: "arc melting", sampleCount: 0 });
    await agents.researcher
      .post(`/api/labs/${lab.id}/samples`)
      .send({ label: "S1", formula: "Cu", massMg: 10, batchId: batch.id })
      .expect(201);
    const list = await agents.guest.get(url);
    expect(list.status).toBe(200);
    expect(list.body.map((b: unknown) => BatchSchema.parse(b))).toEqual([{ ...batch, sampleCount: 1 }]);
  });

  it("answers an empty lab with 200 and []", async () => {
    const { agents, url } = await setup();
    const res = await agents.guest.get(url);
    expect(res.status).toBe(200);
    expect(res.body).toEqual([]);
  });

  it("refuses a repeated code with 409 CONFLICT and a bad date with 400 naming the field", async () => {
    const { t, agents, url } = await setup();
    await agents.lead.post(url).send({ code: "B-01" }).expect(201);
    const again = await agents.researcher.post(url).send({ code: "B-01" });
    expect(again.status).toBe(409);
    expect(ApiErrorSchema.parse(again.body).error.code).toBe("CONFLICT");
    const badDate = await agents.researcher.post(url).send({ code: "B-02", synthesisDate: "02/10/2026" });
    expect(badDate.status).toBe(400);
    expect(ApiErrorSchema.parse(badDate.body).error.details?.[0].path).toBe("synthesisDate");
    const noCode = await agents.researcher.post(url).send({ code: "  " });
    expect(noCode.status).toBe(400);
    expect(footprint(t).batches).toBe(1);
  });

  it("keeps to the role matrix: anonymous 401, guest reads but 403 on create, outsider and admin-not-member 404", async () => {
    const { t, agents, url } = await setup();
    const body = { code: "B-9" };
    expect((await agents.anonymous.get(url)).status).toBe(401);
    expect((await agents.anonymous.post(url).send(body)).status).toBe(401);
    expect((await agents.guest.get(url)).status).toBe(200);
    const guestPost = await agents.guest.post(url).send(body);
    expect(guestPost.status).toBe(403);
    expect(ApiErrorSchema.parse(guestPost.body).error.code).toBe("FORBIDDEN");
    for (const who of ["outsider", "admin"] as const) {
      expect((await agents[who].get(url)).status).toBe(404);
      expect((await agents[who].post(url).send(body)).status).toBe(404);
    }
    expect(footprint(t).batches).toBe(0);
    expect((await agents.researcher.post(url).send(body)).status).toBe(201);
    expect((await agents.lead.post(url).send({ code: "B-10" })).status).toBe(201);
  });
});
