import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import request from "supertest";
import { beforeAll, describe, expect, it } from "vitest";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { createLucia } from "../../server/auth/lucia";
import { comparisons, importPresets, samples, users } from "../../server/db/schema";
import { makeTestApp, seedRoles, TEST_PASSWORD, type TestApp } from "../helpers/app";
import { listRoutes, routeKey } from "../helpers/route-list";
import {
  buildLabWorld,
  insertInvitation,
  insertMember,
  insertResetToken,
  LOW_T_MODEL,
  LOW_T_WINDOW,
  restorePassword,
  saveDraftFit,
  SYNTHETIC_MAPPING,
  syntheticExport,
  upload,
  type LabWorld,
} from "./lab-world";

/*
 * Every API route × every kind of caller, with the status each must get. The route list is read from
 * the app itself (tests/helpers/route-list.ts), so a route added without a row here fails the first test.
 *
 * Callers: signed out; guest, researcher and lead of lab A; the lead of lab B ("another lab"); a site
 * administrator who is in no lab. Expected: 401 signed out, 403 for a role below the route's, 404 for
 * anyone outside the lab (as if the lab did not exist), and the route's documented success code.
 * Each request gets a fresh session, and routes that use something up (delete, accept, approve,
 * reset) get a fresh object for each caller, so the order of callers does not matter.
 */

type Who = "anonymous" | "guest" | "researcher" | "lead" | "outsider" | "admin";
const COLUMNS: readonly Who[] = ["anonymous", "guest", "researcher", "lead", "outsider", "admin"];

// prettier-ignore
const TABLE: Record<string, readonly [anonymous: number, guest: number, researcher: number, lead: number, otherLab: number, siteAdmin: number]> = {
  //                                                            signed  guest  resea- lead  other  site
  //                                                            out            rcher        lab    admin
  "GET /api/health":                                            [200,   200,   200,   200,  200,   200],
  "GET /api/setup":                                             [200,   200,   200,   200,  200,   200],
  "POST /api/setup":                                            [409,   409,   409,   409,  409,   409],
  "POST /api/auth/sign-in":                                     [200,   200,   200,   200,  200,   200],
  "POST /api/auth/sign-out":                                    [204,   204,   204,   204,  204,   204],
  "POST /api/auth/password":                                    [401,   204,   204,   204,  204,   204],
  "POST /api/auth/reset-request":                               [202,   202,   202,   202,  202,   202],
  "POST /api/auth/reset":                                       [204,   204,   204,   204,  204,   204],
  "GET /api/me":                                                [401,   200,   200,   200,  200,   200],
  "GET /api/outbox":                                            [401,   403,   403,   403,  403,   200],
  "GET /api/invitations/:token":                                [200,   200,   200,   200,  200,   200],
  "POST /api/invitations/:token/accept":                        [200,   200,   200,   200,  200,   200],
  "GET /api/shared/:token":                                     [200,   200,   200,   200,  200,   200],

  "GET /api/labs/:labId/members":                               [401,   200,   200,   200,  404,   404],
  "PATCH /api/labs/:labId/members/:userId":                     [401,   403,   403,   200,  404,   404],
  "DELETE /api/labs/:labId/members/:userId":                    [401,   403,   403,   204,  404,   404],
  "GET /api/labs/:labId/invitations":                           [401,   403,   403,   200,  404,   404],
  "POST /api/labs/:labId/invitations":                          [401,   403,   403,   201,  404,   404],
  "DELETE /api/labs/:labId/invitations/:invitationId":          [401,   403,   403,   204,  404,   404],
  "GET /api/labs/:labId/audit":                                 [401,   403,   403,   200,  404,   404],

  "GET /api/labs/:labId/batches":                               [401,   200,   200,   200,  404,   404],
  "POST /api/labs/:labId/batches":                              [401,   403,   201,   201,  404,   404],
  "GET /api/labs/:labId/samples":                               [401,   200,   200,   200,  404,   404],
  "POST /api/labs/:labId/samples":                              [401,   403,   201,   201,  404,   404],
  "GET /api/labs/:labId/samples/:sampleId":                     [401,   200,   200,   200,  404,   404],
  "PATCH /api/labs/:labId/samples/:sampleId":                   [401,   403,   200,   200,  404,   404],
  "DELETE /api/labs/:labId/samples/:sampleId":                  [401,   403,   403,   204,  404,   404],
  "GET /api/labs/:labId/samples/:sampleId/runs":                [401,   200,   200,   200,  404,   404],
  "POST /api/labs/:labId/samples/:sampleId/runs":               [401,   403,   201,   201,  404,   404],
  "POST /api/labs/:labId/samples/:sampleId/runs/preview":       [401,   403,   200,   200,  404,   404],
  "GET /api/labs/:labId/addenda-runs":                          [401,   200,   200,   200,  404,   404],
  "POST /api/labs/:labId/addenda-runs":                         [401,   403,   201,   201,  404,   404],
  "POST /api/labs/:labId/addenda-runs/preview":                 [401,   403,   200,   200,  404,   404],
  "GET /api/labs/:labId/runs/:runId":                           [401,   200,   200,   200,  404,   404],
  "GET /api/labs/:labId/runs/:runId/raw":                       [401,   200,   200,   200,  404,   404],
  "GET /api/labs/:labId/runs/:runId/reduced.csv":               [401,   200,   200,   200,  404,   404],
  "PATCH /api/labs/:labId/runs/:runId/mask":                    [401,   403,   200,   200,  404,   404],
  "GET /api/labs/:labId/import-presets":                        [401,   200,   200,   200,  404,   404],
  "POST /api/labs/:labId/import-presets":                       [401,   403,   201,   201,  404,   404],
  "DELETE /api/labs/:labId/import-presets/:presetId":           [401,   403,   204,   204,  404,   404],

  "POST /api/labs/:labId/runs/:runId/fits/preview":             [401,   403,   200,   200,  404,   404],
  "POST /api/labs/:labId/runs/:runId/fits":                     [401,   403,   201,   201,  404,   404],
  "GET /api/labs/:labId/runs/:runId/fits":                      [401,   200,   200,   200,  404,   404],
  "POST /api/labs/:labId/runs/:runId/rank":                     [401,   403,   200,   200,  404,   404],
  "GET /api/labs/:labId/runs/:runId/theta-d":                   [401,   200,   200,   200,  404,   404],
  "GET /api/labs/:labId/runs/:runId/thermo":                    [401,   200,   200,   200,  404,   404],
  "GET /api/labs/:labId/runs/:runId/thermo.csv":                [401,   200,   200,   200,  404,   404],
  "GET /api/labs/:labId/fits/:fitId":                           [401,   200,   200,   200,  404,   404],
  "POST /api/labs/:labId/fits/:fitId/approve":                  [401,   403,   403,   200,  404,   404],

  "GET /api/labs/:labId/compare":                               [401,   200,   200,   200,  404,   404],
  "GET /api/labs/:labId/compare.csv":                           [401,   200,   200,   200,  404,   404],
  "GET /api/labs/:labId/compare/curves":                        [401,   200,   200,   200,  404,   404],
  "GET /api/labs/:labId/comparisons":                           [401,   200,   200,   200,  404,   404],
  "POST /api/labs/:labId/comparisons":                          [401,   403,   201,   201,  404,   404],
  "GET /api/labs/:labId/comparisons/:comparisonId":             [401,   200,   200,   200,  404,   404],
  "DELETE /api/labs/:labId/comparisons/:comparisonId":          [401,   403,   204,   204,  404,   404],
  "GET /api/labs/:labId/bundles":                               [401,   200,   200,   200,  404,   404],
  "POST /api/labs/:labId/bundles":                              [401,   403,   201,   201,  404,   404],
  "GET /api/labs/:labId/bundles/:bundleId":                     [401,   200,   200,   200,  404,   404],
  "GET /api/labs/:labId/bundles/:bundleId/download":            [401,   200,   200,   200,  404,   404],
  "POST /api/labs/:labId/bundles/:bundleId/links":              [401,   403,   201,   201,  404,   404],
  "DELETE /api/labs/:labId/bundles/:bundleId/links/:linkId":    [401,   403,   204,   204,  404,   404],
};

/** What one request sends. Path parameters not given come from the lab world the builder was handed. */
interface Call {
  params?: Record<string, string>;
  query?: Record<string, string>;
  body?: unknown;
  upload?: { bytes: Buffer; name: string; fields: Record<string, unknown> };
}

interface BuildContext {
  /** The lab whose objects the call names: lab A normally, lab B in the cross-lab checks. */
  lab: LabWorld;
  who: Who;
}

type Builder = (c: BuildContext) => Call | Promise<Call>;

let t: TestApp;
let cast: Awaited<ReturnType<typeof seedRoles>>;
let labA: LabWorld;
let labB: LabWorld;
let passwordHashes: Record<string, string>;
const signInUser = { email: "sign-in-probe@example.org" };
let n = 0;
const next = () => (n += 1);

const BUILDERS: Record<string, Builder> = {
  "GET /api/health": () => ({}),
  "GET /api/setup": () => ({}),
  "POST /api/setup": () => ({ body: { email: `setup-${next()}@example.org`, displayName: "Late setup", password: "a long enough password", labName: "Second lab" } }),
  "POST /api/auth/sign-in": () => ({ body: { email: signInUser.email, password: TEST_PASSWORD } }),
  "POST /api/auth/sign-out": () => ({}),
  "POST /api/auth/password": ({ who }) => {
    if (who !== "anonymous") restorePassword(t.db, userOf(who), passwordHashes[who]);
    return { body: { currentPassword: TEST_PASSWORD, newPassword: "another long password 2" } };
  },
  "POST /api/auth/reset-request": () => ({ body: { email: "nobody-here@example.org" } }),
  "POST /api/auth/reset": async () => ({ body: { token: (await insertResetToken(t.db)).token, newPassword: "a brand new password" } }),
  "GET /api/me": () => ({}),
  "GET /api/outbox": () => ({}),
  "GET /api/invitations/:token": ({ lab }) => ({ params: { token: lab.invitationToken } }),
  "POST /api/invitations/:token/accept": ({ lab }) => ({
    params: { token: insertInvitation(t.db, lab.labId, lab.leadId).token },
    body: { displayName: "New member", password: "a long enough password" },
  }),
  "GET /api/shared/:token": ({ lab }) => ({ params: { token: lab.token } }),

  "GET /api/labs/:labId/members": () => ({}),
  "PATCH /api/labs/:labId/members/:userId": async ({ lab }) => ({ params: { userId: (await insertMember(t.db, lab.labId)).id }, body: { role: "researcher" } }),
  "DELETE /api/labs/:labId/members/:userId": async ({ lab }) => ({ params: { userId: (await insertMember(t.db, lab.labId)).id } }),
  "GET /api/labs/:labId/invitations": () => ({}),
  "POST /api/labs/:labId/invitations": () => ({ body: { email: `new-${next()}@example.org`, role: "guest" } }),
  "DELETE /api/labs/:labId/invitations/:invitationId": ({ lab }) => ({ params: { invitationId: insertInvitation(t.db, lab.labId, lab.leadId).id } }),
  "GET /api/labs/:labId/audit": () => ({}),

  "GET /api/labs/:labId/batches": () => ({}),
  "POST /api/labs/:labId/batches": () => ({ body: { code: `M-${next()}` } }),
  "GET /api/labs/:labId/samples": () => ({}),
  "POST /api/labs/:labId/samples": ({ lab }) => ({ body: { label: `probe ${next()}`, formula: "Cu", massMg: 5, batchId: lab.batchId } }),
  "GET /api/labs/:labId/samples/:sampleId": () => ({}),
  "PATCH /api/labs/:labId/samples/:sampleId": () => ({ body: { notes: `edited ${next()}` } }),
  "DELETE /api/labs/:labId/samples/:sampleId": async ({ lab }) => ({ params: { sampleId: await freshSample(lab) } }),
  "GET /api/labs/:labId/samples/:sampleId/runs": () => ({}),
  "POST /api/labs/:labId/samples/:sampleId/runs": () => ({ upload: { bytes: syntheticExport(20), name: "probe.csv", fields: { mapping: SYNTHETIC_MAPPING } } }),
  "POST /api/labs/:labId/samples/:sampleId/runs/preview": ({ lab }) => ({
    upload: { bytes: syntheticExport(20), name: "probe.csv", fields: { mapping: SYNTHETIC_MAPPING, addendaRunId: lab.addendaRunId } },
  }),
  "GET /api/labs/:labId/addenda-runs": () => ({}),
  "POST /api/labs/:labId/addenda-runs": () => ({ upload: { bytes: syntheticExport(20, 0.5), name: "addenda.csv", fields: { mapping: SYNTHETIC_MAPPING, platform: "P-probe" } } }),
  "POST /api/labs/:labId/addenda-runs/preview": () => ({ upload: { bytes: syntheticExport(20, 0.5), name: "addenda.csv", fields: { mapping: SYNTHETIC_MAPPING, platform: "P-probe" } } }),
  "GET /api/labs/:labId/runs/:runId": () => ({}),
  "GET /api/labs/:labId/runs/:runId/raw": () => ({}),
  "GET /api/labs/:labId/runs/:runId/reduced.csv": () => ({}),
  "PATCH /api/labs/:labId/runs/:runId/mask": () => ({ body: { indices: [0], masked: next() % 2 === 0 } }),
  "GET /api/labs/:labId/import-presets": () => ({}),
  "POST /api/labs/:labId/import-presets": () => ({ body: { name: `preset ${next()}`, mapping: SYNTHETIC_MAPPING } }),
  "DELETE /api/labs/:labId/import-presets/:presetId": async ({ lab }) => ({ params: { presetId: await freshPreset(lab) } }),

  "POST /api/labs/:labId/runs/:runId/fits/preview": () => ({ body: { model: LOW_T_MODEL, window: LOW_T_WINDOW } }),
  "POST /api/labs/:labId/runs/:runId/fits": () => ({ body: { model: LOW_T_MODEL, window: LOW_T_WINDOW } }),
  "GET /api/labs/:labId/runs/:runId/fits": () => ({}),
  "POST /api/labs/:labId/runs/:runId/rank": () => ({ body: { window: LOW_T_WINDOW, candidates: [{ label: "γT + βT³", model: LOW_T_MODEL }] } }),
  "GET /api/labs/:labId/runs/:runId/theta-d": ({ lab }) => ({ query: { fitId: lab.fitId } }),
  "GET /api/labs/:labId/runs/:runId/thermo": ({ lab }) => ({ query: { fitId: lab.fitId, at: "10,15" } }),
  "GET /api/labs/:labId/runs/:runId/thermo.csv": ({ lab }) => ({ query: { fitId: lab.fitId, at: "10,15" } }),
  "GET /api/labs/:labId/fits/:fitId": () => ({}),
  "POST /api/labs/:labId/fits/:fitId/approve": ({ lab }) => ({ params: { fitId: saveDraftFit(t.db, lab.labId, lab.spareRunId, lab.leadId) } }),

  "GET /api/labs/:labId/compare": ({ lab }) => ({ query: { parameter: "gamma", batchIds: lab.batchId } }),
  "GET /api/labs/:labId/compare.csv": ({ lab }) => ({ query: { parameter: "gamma", batchIds: lab.batchId } }),
  "GET /api/labs/:labId/compare/curves": ({ lab }) => ({ query: { parameter: "gamma", sampleIds: lab.sampleId } }),
  "GET /api/labs/:labId/comparisons": () => ({}),
  "POST /api/labs/:labId/comparisons": ({ lab }) => ({
    body: { name: `saved ${next()}`, selection: { batchIds: [lab.batchId], sampleIds: [lab.sampleId] }, parameter: "gamma", groupBy: "batch" },
  }),
  "GET /api/labs/:labId/comparisons/:comparisonId": () => ({}),
  "DELETE /api/labs/:labId/comparisons/:comparisonId": async ({ lab }) => ({ params: { comparisonId: await freshComparison(lab) } }),
  "GET /api/labs/:labId/bundles": () => ({}),
  "POST /api/labs/:labId/bundles": ({ lab }) => ({ body: { name: `bundle ${next()}`, sampleIds: [lab.sampleId], runIds: [lab.runId], fitIds: [lab.fitId] } }),
  "GET /api/labs/:labId/bundles/:bundleId": () => ({}),
  "GET /api/labs/:labId/bundles/:bundleId/download": () => ({}),
  "POST /api/labs/:labId/bundles/:bundleId/links": () => ({ body: { expiresInDays: 3 } }),
  "DELETE /api/labs/:labId/bundles/:bundleId/links/:linkId": async ({ lab }) => ({ params: { linkId: await freshLink(lab) } }),
};

/**
 * Routes whose request names other objects in its body or query (not only in the path): their
 * cross-lab check sends lab B's ids there too.
 */
const IDS_OUTSIDE_PATH = new Set([
  "POST /api/labs/:labId/samples",
  "POST /api/labs/:labId/samples/:sampleId/runs/preview",
  "POST /api/labs/:labId/comparisons",
  "POST /api/labs/:labId/bundles",
  "GET /api/labs/:labId/compare",
  "GET /api/labs/:labId/compare.csv",
  "GET /api/labs/:labId/compare/curves",
  "GET /api/labs/:labId/runs/:runId/theta-d",
  "GET /api/labs/:labId/runs/:runId/thermo",
  "GET /api/labs/:labId/runs/:runId/thermo.csv",
]);

function userOf(who: Exclude<Who, "anonymous">): string {
  return cast.users[who].id;
}

async function freshSample(lab: LabWorld): Promise<string> {
  const now = Date.now();
  const id = randomUUID();
  t.db.insert(samples).values({ id, labId: lab.labId, label: `doomed ${next()}`, formula: "Cu", molarMassGPerMol: 63.546, atomsPerFormulaUnit: 1, massMg: 3, createdAt: now, updatedAt: now }).run();
  return id;
}

async function freshPreset(lab: LabWorld): Promise<string> {
  const id = randomUUID();
  t.db.insert(importPresets).values({ id, labId: lab.labId, name: `doomed preset ${next()}`, mapping: { ...SYNTHETIC_MAPPING }, createdAt: Date.now() }).run();
  return id;
}

async function freshComparison(lab: LabWorld): Promise<string> {
  const id = randomUUID();
  t.db.insert(comparisons).values({ id, labId: lab.labId, name: `doomed ${next()}`, selection: { batchIds: [lab.batchId], sampleIds: [] }, parameter: "gamma", groupBy: "batch", createdAt: Date.now() }).run();
  return id;
}

async function freshLink(lab: LabWorld): Promise<string> {
  const res = await (await sessionAgentFor(lab.leadId)).post(`/api/labs/${lab.labId}/bundles/${lab.bundleId}/links`).send({ expiresInDays: 1 });
  if (res.status !== 201) throw new Error(`share link: ${res.status}`);
  return res.body.id;
}

let lucia: ReturnType<typeof createLucia>;

async function cookieFor(userId: string): Promise<string> {
  const session = await lucia.createSession(userId, {});
  return lucia.createSessionCookie(session.id).serialize();
}

async function sessionAgentFor(userId: string) {
  const agent = request.agent(t.app);
  agent.set("Cookie", await cookieFor(userId));
  return agent;
}

function fill(path: string, lab: LabWorld, labId: string, params: Record<string, string> = {}): string {
  const values: Record<string, string> = { ...(lab as unknown as Record<string, string>), labId, userId: lab.leadId, ...params };
  return path.replace(/:(\w+)/g, (_, name: string) => {
    const v = values[name];
    if (v === undefined) throw new Error(`no value for :${name} in ${path}`);
    return encodeURIComponent(v);
  });
}

/** Builds one call as `who` (making any fresh object it needs) and returns a function that sends it. */
async function prepare(key: string, who: Who, lab: LabWorld, labId = lab.labId, overrideParams: Record<string, string> = {}) {
  const [method, path] = key.split(" ");
  const call = await BUILDERS[key]!({ lab, who });
  const url = fill(path, lab, labId, { ...call.params, ...overrideParams });
  const cookie = who === "anonymous" ? undefined : await cookieFor(userOf(who));
  return async (): Promise<request.Response> => {
    const m = method.toLowerCase() as "get" | "post" | "patch" | "delete";
    let req = request(t.app)[m](url);
    if (cookie) req = req.set("Cookie", cookie);
    if (call.query) req = req.query(call.query);
    if (call.upload) return upload(req, call.upload.bytes, call.upload.name, call.upload.fields);
    if (call.body !== undefined) return req.send(call.body as object);
    return req;
  };
}

/** Sends one call as `who` with a new session, returns the response. */
async function send(key: string, who: Who, lab: LabWorld, labId = lab.labId): Promise<request.Response> {
  return (await prepare(key, who, lab, labId))();
}

/** Everything of lab B a request could change, to prove the cross-lab attempts changed nothing there. */
function labBFootprint() {
  const id = labB.labId;
  const $ = t.db.$client;
  const one = (sql: string) => $.prepare(sql).all(id);
  return {
    batches: one("select id, code, notes from batches where lab_id = ? order by id"),
    samples: one("select id, label, notes, updated_at from samples where lab_id = ? order by id"),
    runs: one("select id, point_count from runs where lab_id = ? order by id"),
    masked: one("select count(*) as n from run_points where masked = 1 and run_id in (select id from runs where lab_id = ?)"),
    fits: one("select id, state from fits where lab_id = ? order by id"),
    comparisons: one("select id from comparisons where lab_id = ? order by id"),
    bundles: one("select id from bundles where lab_id = ? order by id"),
    links: one("select id, revoked_at, download_count from share_links where bundle_id in (select id from bundles where lab_id = ?) order by id"),
    presets: one("select id from import_presets where lab_id = ? order by id"),
    invitations: one("select id, accepted_at from invitations where lab_id = ? order by id"),
    members: one("select user_id, role from memberships where lab_id = ? order by user_id"),
  };
}

let routes: string[] = [];

beforeAll(async () => {
  t = makeTestApp();
  cast = await seedRoles(t);
  lucia = createLucia(t.db, false);
  await (await import("../helpers/app")).insertUser(t.db, signInUser);
  labA = await buildLabWorld(t, cast.lab.id, cast.users.lead.id, cast.agents.lead, "A");
  labB = await buildLabWorld(t, cast.otherLab.id, cast.users.outsider.id, cast.agents.outsider, "B");
  passwordHashes = Object.fromEntries(
    (["guest", "researcher", "lead", "outsider", "admin"] as const).map((w) => [w, t.db.select().from(users).where(eq(users.id, userOf(w))).get()!.passwordHash]),
  );
  routes = listRoutes(t.app).map(routeKey);
}, 60_000);

describe("the authorization table covers the server's routes exactly", () => {
  it("has a row for every registered route and no row without a route", () => {
    const inTable = Object.keys(TABLE);
    const missing = routes.filter((r) => !(r in TABLE));
    const stale = inTable.filter((r) => !routes.includes(r));
    expect(missing, "routes the server registers that the table lacks (add a row and a builder)").toEqual([]);
    expect(stale, "table rows naming no registered route").toEqual([]);
    expect(routes.length).toBeGreaterThan(40);
  });

  it("has a request builder for every row", () => {
    expect(Object.keys(TABLE).filter((k) => !(k in BUILDERS))).toEqual([]);
    expect(Object.keys(BUILDERS).filter((k) => !(k in TABLE))).toEqual([]);
  });
});

const ERROR_CODE: Record<number, string> = { 401: "UNAUTHENTICATED", 403: "FORBIDDEN", 404: "NOT_FOUND", 409: "CONFLICT" };

describe("each route answers each caller as the table says", () => {
  it.each(Object.entries(TABLE))("%s", async (key, expected) => {
    if (!routes.includes(key)) return expect.fail(`${key} is in the table but not registered (see the coverage test)`);
    for (const [i, who] of COLUMNS.entries()) {
      const res = await send(key, who, labA);
      const want = expected[i];
      expect(res.status, `${key} as ${who}: ${JSON.stringify(res.body).slice(0, 300)}`).toBe(want);
      if (want >= 400) expect(ApiErrorSchema.parse(res.body).error.code, `${key} as ${who}`).toBe(ERROR_CODE[want]);
    }
  });
});

/** Routes that name an object of the lab (in the path, body or query) and are lab routes. */
const OBJECT_ROUTES = Object.keys(TABLE).filter(
  (k) => k.includes("/labs/:labId/") && (/:(?!labId)\w+/.test(k.split(" ")[1]) || IDS_OUTSIDE_PATH.has(k)),
);

describe("objects of another lab answer 404, like ids that do not exist (no existence leak)", () => {
  it.each(OBJECT_ROUTES)("%s with lab B's ids, asked by lab A's lead in lab A", async (key) => {
    if (!routes.includes(key)) return expect.fail(`${key} is not registered`);
    const foreign = await prepare(key, "lead", labB, labA.labId);
    const before = labBFootprint();
    const res = await foreign();
    expect(res.status, `${key}: ${JSON.stringify(res.body).slice(0, 300)}`).toBe(404);
    expect(ApiErrorSchema.parse(res.body).error.code).toBe("NOT_FOUND");
    expect(labBFootprint(), `${key} changed something in lab B`).toEqual(before);
    // The same call with made-up ids gets the same answer: nothing tells a foreign id from a missing one.
    // Routes with ids in the body or query take them all from a made-up world; the others are built
    // on lab B (their builders may make a fresh object there) and get made-up path ids.
    const pathIds = Object.fromEntries([...key.matchAll(/:(\w+)/g)].map((m) => m[1]).filter((p) => p !== "labId").map((p) => [p, randomUUID()]));
    const world = IDS_OUTSIDE_PATH.has(key) ? fakeWorld(labB) : labB;
    const missing = await (await prepare(key, "lead", world, labA.labId, pathIds))();
    expect(missing.status, `${key} with made-up ids`).toBe(404);
    expect(ApiErrorSchema.parse(missing.body).error.code).toBe("NOT_FOUND");
  });
});

/** Lab B's world with every object id replaced by one that exists nowhere. */
function fakeWorld(lab: LabWorld): LabWorld {
  const out = { ...lab };
  for (const k of Object.keys(out) as (keyof LabWorld)[]) if (k !== "labId" && k !== "leadId" && k !== "token" && k !== "invitationToken") out[k] = randomUUID();
  return out;
}
