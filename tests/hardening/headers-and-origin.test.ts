import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import request from "supertest";
import { describe, expect, it } from "vitest";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { makeTestApp, seedRoles, TEST_ORIGIN } from "../helpers/app";
import { listRoutes, routeKey } from "../helpers/route-list";

/*
 * What tests/server/ does not cover yet: the helmet headers on every kind of answer (JSON, an error,
 * the client page), and the Origin check on EVERY state-changing route, generated from the route list.
 */

/** Parses a Content-Security-Policy header into directive → sources. */
function csp(header: string | undefined): Map<string, string[]> {
  const out = new Map<string, string[]>();
  for (const part of (header ?? "").split(";")) {
    const [name, ...sources] = part.trim().split(/\s+/);
    if (name) out.set(name.toLowerCase(), sources);
  }
  return out;
}

function withClient() {
  const clientDir = mkdtempSync(path.join(tmpdir(), "thetafold-client-"));
  writeFileSync(path.join(clientDir, "index.html"), "<!doctype html><title>Thetafold</title><div id=root></div>");
  return makeTestApp({ clientDir });
}

describe("helmet headers (helmet 8 defaults plus the app's CSP changes)", () => {
  const answers = async () => {
    const t = withClient();
    const { agents, lab } = await seedRoles(t);
    return {
      "a JSON answer (GET /api/health)": await request(t.app).get("/api/health"),
      "a lab read (GET …/samples as guest)": await agents.guest.get(`/api/labs/${lab.id}/samples`),
      "an error (unknown API route)": await request(t.app).get("/api/no-such-thing"),
      "a 401": await request(t.app).get("/api/me"),
      "the client page (deep link)": await request(t.app).get("/labs/x/samples"),
    };
  };

  it("sends a CSP that allows only this origin's scripts and no framing by others", async () => {
    for (const [what, res] of Object.entries(await answers())) {
      const policy = csp(res.headers["content-security-policy"]);
      expect(policy.get("default-src"), what).toEqual(["'self'"]);
      expect(policy.get("script-src"), what).toEqual(["'self'"]);
      expect(policy.get("object-src"), what).toEqual(["'none'"]);
      expect(policy.get("frame-ancestors"), what).toEqual(["'self'"]);
      expect(policy.get("base-uri"), what).toEqual(["'self'"]);
      expect(policy.get("form-action"), what).toEqual(["'self'"]);
      // The app allows data: and blob: images (chart exports) and drops upgrade-insecure-requests (plain http on localhost).
      expect(policy.get("img-src"), what).toEqual(["'self'", "data:", "blob:"]);
      expect(policy.has("upgrade-insecure-requests"), what).toBe(false);
      for (const sources of policy.values()) expect(sources, what).not.toContain("'unsafe-eval'");
      expect(policy.get("script-src"), what).not.toContain("'unsafe-inline'");
    }
  });

  it("sends nosniff, same-origin framing and opener policy, no referrer, and no x-powered-by", async () => {
    for (const [what, res] of Object.entries(await answers())) {
      expect(res.headers["x-content-type-options"], what).toBe("nosniff");
      expect(res.headers["x-frame-options"], what).toBe("SAMEORIGIN");
      expect(res.headers["referrer-policy"], what).toBe("no-referrer");
      expect(res.headers["cross-origin-opener-policy"], what).toBe("same-origin");
      expect(res.headers["cross-origin-resource-policy"], what).toBe("same-origin");
      expect(res.headers["x-dns-prefetch-control"], what).toBe("off");
      expect(res.headers["x-permitted-cross-domain-policies"], what).toBe("none");
      expect(res.headers["x-powered-by"], what).toBeUndefined();
    }
  });

  it("sends Strict-Transport-Security as helmet does, also over http (browsers only heed it over https): 365 days, subdomains", async () => {
    for (const [what, res] of Object.entries(await answers())) {
      const hsts = String(res.headers["strict-transport-security"] ?? "");
      expect(hsts, what).toMatch(/max-age=31536000/);
      expect(hsts, what).toMatch(/includeSubDomains/);
    }
  });
});

describe("the Origin check on every state-changing route (generated from the route list)", () => {
  it("refuses each POST, PATCH and DELETE from another origin with 403 FORBIDDEN before anything else runs", async () => {
    const t = makeTestApp();
    const { agents, lab } = await seedRoles(t);
    const writes = listRoutes(t.app).filter((r) => r.method !== "GET");
    expect(writes.length).toBeGreaterThan(20);
    const counts = () =>
      (t.db.$client.prepare("select name from sqlite_master where type = 'table' and name not like 'sqlite_%' and name not like '__drizzle%'").all() as { name: string }[])
        .filter((r) => r.name !== "sessions")
        .map((r) => `${r.name}:${(t.db.$client.prepare(`select count(*) n from "${r.name}"`).get() as { n: number }).n}`)
        .join(",");
    const rowsBefore = counts();
    for (const route of writes) {
      const url = route.path.replace(":labId", lab.id).replace(/:(\w+)/g, "x");
      for (const origin of ["https://elsewhere.example.com", "null", "http://localhost:3001", "http://localhost:3000.evil.example"]) {
        const m = route.method.toLowerCase() as "post" | "patch" | "delete";
        const res = await agents.lead[m](url).set("Origin", origin).send({});
        expect(res.status, `${routeKey(route)} from ${origin}`).toBe(403);
        expect(ApiErrorSchema.parse(res.body).error.code).toBe("FORBIDDEN");
      }
    }
    expect(counts()).toBe(rowsBefore);
  });

  it("lets the same writes through to the route's own checks from the app's origin", async () => {
    const t = makeTestApp();
    const writes = listRoutes(t.app).filter((r) => r.method !== "GET");
    for (const route of writes) {
      const m = route.method.toLowerCase() as "post" | "patch" | "delete";
      const res = await request(t.app)[m](route.path.replace(/:(\w+)/g, "x")).set("Origin", TEST_ORIGIN).send({});
      // Signed out, so no route's role check can answer 403: any 403 here would be the Origin refusal.
      expect(res.status, routeKey(route)).not.toBe(403);
    }
  });
});
