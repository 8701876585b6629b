import { count } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { buildComposite } from "@shared/physics/composite";
import { fits } from "../../server/db/schema";
import { createFit } from "../../server/services/fits";
import { makeTestApp, seedRoles, TEST_ORIGIN, type TestApp } from "../helpers/app";
import { insertSyntheticRun, logSpaced } from "./fits-helpers";

/*
 * The role matrix of every fit route: anonymous 401, guest reads but never writes (403), researcher
 * writes but does not approve (403), lead everything, a member of another lab 404 (the lab is hidden).
 */

type Caller = "anonymous" | "guest" | "researcher" | "lead" | "outsider";
const CALLERS: Caller[] = ["anonymous", "guest", "researcher", "lead", "outsider"];

let t: TestApp;
let s: Awaited<ReturnType<typeof seedRoles>>;
let runId: string;

const MODEL = { components: [{ kind: "electronic" }, { kind: "t3" }] };
const WINDOW: [number, number] = [2, 10];

beforeAll(async () => {
  t = makeTestApp();
  s = await seedRoles(t);
  const m = buildComposite({ components: [{ kind: "electronic" }, { kind: "t3" }] }, 1);
  const points = logSpaced(2, 20, 30).map((T) => ({ temperatureK: T, cp: m.evaluate([1e-3, 5e-5], T), sigma: 0.01 * m.evaluate([1e-3, 5e-5], T) }));
  runId = insertSyntheticRun(t.db, s.lab.id, { points, atomsPerFormulaUnit: 1, label: "synthetic low-T run" }).runId;
});

const draft = () => createFit(t.db, { labId: s.lab.id, runId }, { model: MODEL as never, window: WINDOW }, s.users.researcher.id).id;

interface RouteCase {
  method: "get" | "post";
  path: () => string;
  body?: unknown;
  expected: Record<Caller, number>;
}

const read = { anonymous: 401, guest: 200, researcher: 200, lead: 200, outsider: 404 };
const write = (ok: number) => ({ anonymous: 401, guest: 403, researcher: ok, lead: ok, outsider: 404 });

const ROUTES: Record<string, RouteCase> = {
  "POST …/runs/:runId/fits/preview": { method: "post", path: () => `/api/labs/${s.lab.id}/runs/${runId}/fits/preview`, body: { model: MODEL, window: WINDOW }, expected: write(200) },
  "POST …/runs/:runId/fits": { method: "post", path: () => `/api/labs/${s.lab.id}/runs/${runId}/fits`, body: { model: MODEL, window: WINDOW }, expected: write(201) },
  "GET …/runs/:runId/fits": { method: "get", path: () => `/api/labs/${s.lab.id}/runs/${runId}/fits`, expected: read },
  "POST …/runs/:runId/rank": { method: "post", path: () => `/api/labs/${s.lab.id}/runs/${runId}/rank`, body: { window: WINDOW, candidates: [{ model: MODEL }] }, expected: write(200) },
  "GET …/runs/:runId/theta-d": { method: "get", path: () => `/api/labs/${s.lab.id}/runs/${runId}/theta-d`, expected: read },
  "GET …/runs/:runId/thermo": { method: "get", path: () => `/api/labs/${s.lab.id}/runs/${runId}/thermo?at=5,10`, expected: read },
  "GET …/runs/:runId/thermo.csv": { method: "get", path: () => `/api/labs/${s.lab.id}/runs/${runId}/thermo.csv?at=5,10`, expected: read },
  "GET /api/labs/:labId/fits/:fitId": { method: "get", path: () => `/api/labs/${s.lab.id}/fits/${draft()}`, expected: read },
  "POST /api/labs/:labId/fits/:fitId/approve": {
    method: "post",
    path: () => `/api/labs/${s.lab.id}/fits/${draft()}/approve`,
    expected: { anonymous: 401, guest: 403, researcher: 403, lead: 200, outsider: 404 },
  },
};

describe("fit routes: who may do what", () => {
  for (const [name, route] of Object.entries(ROUTES)) {
    for (const caller of CALLERS) {
      it(`${name} as ${caller} → ${route.expected[caller]}`, async () => {
        // θ_D(T) and thermo need a saved fit of the run.
        if (name.includes("theta-d") || name.includes("thermo")) draft();
        const agent = s.agents[caller];
        const url = route.path();
        const afterSetup = t.db.select({ n: count() }).from(fits).get()!.n;
        const res =
          route.method === "get" ? await agent.get(url) : await agent.post(url).set("Origin", TEST_ORIGIN).send((route.body ?? {}) as object);
        expect(res.status, JSON.stringify(res.body)).toBe(route.expected[caller]);
        if (res.status >= 400) {
          expect(res.body.error.code).toBe({ 401: "UNAUTHENTICATED", 403: "FORBIDDEN", 404: "NOT_FOUND" }[res.status as 401 | 403 | 404]);
          // A refused request stores nothing.
          expect(t.db.select({ n: count() }).from(fits).get()!.n).toBe(afterSetup);
        }
      });
    }
  }
});
