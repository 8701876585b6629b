import request from "supertest";
import { describe, expect, it } from "vitest";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { makeTestApp, seedRoles } from "../helpers/app";

describe("GET /api/health", () => {
  it("answers {status: ok} without a session", async () => {
    const { app } = makeTestApp();
    const res = await request(app).get("/api/health");
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ status: "ok" });
  });

  it("answers an unknown API path with the NOT_FOUND error body", async () => {
    const { app } = makeTestApp();
    const res = await request(app).get("/api/no-such-thing");
    expect(res.status).toBe(404);
    expect(ApiErrorSchema.parse(res.body).error.code).toBe("NOT_FOUND");
  });

  it("refuses a write whose Origin names another site", async () => {
    const t = makeTestApp();
    const { agents } = await seedRoles(t);
    const res = await agents.lead.post("/api/health").set("Origin", "https://evil.example.com").send({});
    expect(res.status).toBe(403);
    expect(ApiErrorSchema.parse(res.body).error.code).toBe("FORBIDDEN");
  });
});
