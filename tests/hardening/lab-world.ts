import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import type { Test } from "supertest";
import type { Db } from "../../server/db/client";
import { invitations, memberships, passwordResets, users } from "../../server/db/schema";
import { newLinkToken } from "../../server/services/auth";
import { approveFit, createFit } from "../../server/services/fits";
import { insertUser, type TestApp } from "../helpers/app";

/*
 * A small lab with one of everything, made through the API as its lead (and the fit engine's service
 * for fits), for the hardening tests. All data are synthetic.
 */

/** Molar mass of Cu, g/mol (IUPAC standard atomic weight 63.546, common practice, no source here). */
const CU_MOLAR_MASS = 63.546;

let uploadCounter = 0;

/**
 * A synthetic copper-like calorimeter export (total heat capacity in J/K of a `massMg` piece), unique
 * bytes on every call (a counter in its first line) so no two uploads are duplicates.
 * Molar Cp = γT + βT³ with γ = 0.000695 J/(mol·K²) and β = 4.8e-5 J/(mol·K⁴) (copper's low-T values,
 * from memory; they only need to be plausible here).
 * @param points how many rows (default 30), T from 2 K to 20 K
 * @param massMg sample mass the totals are for
 */
export function syntheticExport(points = 30, massMg = 10, tag = ""): Buffer {
  uploadCounter += 1;
  const moles = (massMg * 1e-3) / CU_MOLAR_MASS;
  const rows: string[] = [];
  for (let i = 0; i < points; i++) {
    const t = 2 + (18 * i) / Math.max(1, points - 1);
    const molar = 0.000695 * t + 4.8e-5 * t ** 3;
    const total = molar * moles * (1 + 0.002 * Math.sin(7 * i + uploadCounter));
    rows.push(`${t.toFixed(4)},${total.toExponential(6)},${(total * 0.005).toExponential(3)}`);
  }
  return Buffer.from(
    `# SYNTHETIC DATA, invented for Thetafold tests (upload ${uploadCounter}${tag ? ` ${tag}` : ""} ${randomUUID()})\n` +
      "Temperature (K),Heat capacity (J/K),Uncertainty (J/K)\n" +
      rows.join("\n") +
      "\n",
    "utf8",
  );
}

/** The mapping of syntheticExport's columns. */
export const SYNTHETIC_MAPPING = {
  columns: { temperature: "Temperature (K)", heatCapacity: "Heat capacity (J/K)", sigma: "Uncertainty (J/K)" },
  units: { temperature: "K", heatCapacity: "J/K" },
} as const;

/** A model that fits syntheticExport well: γT + βT³ (a low-temperature line). */
export const LOW_T_MODEL = { components: [{ kind: "electronic" }, { kind: "t3" }] } as const;
export const LOW_T_WINDOW: [number, number] = [2, 12];

/** Attaches a file and text fields to a multipart request. */
export function upload(req: Test, bytes: Buffer, fileName: string, fields: Record<string, unknown> = {}): Test {
  for (const [k, v] of Object.entries(fields)) {
    if (v === undefined) continue;
    req.field(k, typeof v === "string" ? v : JSON.stringify(v));
  }
  return req.attach("file", bytes, fileName);
}

/** Ids of one lab's objects. */
export interface LabWorld {
  labId: string;
  leadId: string;
  batchId: string;
  sampleId: string;
  runId: string;
  /** A second run of the sample, for fits that get approved during a test (approval supersedes the run's earlier fit). */
  spareRunId: string;
  addendaRunId: string;
  fitId: string;
  comparisonId: string;
  bundleId: string;
  linkId: string;
  token: string;
  presetId: string;
  invitationId: string;
  invitationToken: string;
}

type Agent = ReturnType<typeof import("supertest").agent>;

function ok(res: { status: number; body: unknown; text?: string }, what: string, status: number) {
  if (res.status !== status) throw new Error(`${what}: expected ${status}, got ${res.status} ${JSON.stringify(res.body ?? res.text)}`);
}

/**
 * Fills a lab with a batch, a sample, an uploaded run, an addenda run, an approved fit, a saved
 * comparison, a bundle with a share link, an import preset and an open invitation.
 * @param t the test app
 * @param labId the lab
 * @param leadId its lead
 * @param lead an agent signed in as that lead
 * @param tag distinguishes labels between labs
 */
export async function buildLabWorld(t: TestApp, labId: string, leadId: string, lead: Agent, tag: string): Promise<LabWorld> {
  const base = `/api/labs/${labId}`;
  const batch = await lead.post(`${base}/batches`).send({ code: `${tag}-B1`, method: "arc melting (synthetic)" });
  ok(batch, "batch", 201);
  const sample = await lead.post(`${base}/samples`).send({ label: `${tag} copper piece`, formula: "Cu", massMg: 10, massSigmaMg: 0.01, batchId: batch.body.id });
  ok(sample, "sample", 201);
  const run = await upload(lead.post(`${base}/samples/${sample.body.id}/runs`), syntheticExport(30), `${tag}-run.csv`, { mapping: SYNTHETIC_MAPPING });
  ok(run, "run", 201);
  const runId = run.body.runs[0].id as string;
  const spare = await upload(lead.post(`${base}/samples/${sample.body.id}/runs`), syntheticExport(30), `${tag}-run-2.csv`, { mapping: SYNTHETIC_MAPPING });
  ok(spare, "second run", 201);
  const addenda = await upload(lead.post(`${base}/addenda-runs`), syntheticExport(30, 0.5), `${tag}-addenda.csv`, {
    mapping: SYNTHETIC_MAPPING,
    platform: `${tag}-P1`,
  });
  ok(addenda, "addenda run", 201);
  const fitId = saveApprovedFit(t.db, labId, runId, leadId);
  const comparison = await lead
    .post(`${base}/comparisons`)
    .send({ name: `${tag} comparison`, selection: { batchIds: [batch.body.id], sampleIds: [] }, parameter: "gamma", groupBy: "batch" });
  ok(comparison, "comparison", 201);
  const bundle = await lead.post(`${base}/bundles`).send({ name: `${tag} bundle`, sampleIds: [sample.body.id], runIds: [], fitIds: [fitId] });
  ok(bundle, "bundle", 201);
  const link = await lead.post(`${base}/bundles/${bundle.body.id}/links`).send({ expiresInDays: 14 });
  ok(link, "share link", 201);
  const preset = await lead.post(`${base}/import-presets`).send({ name: `${tag} preset`, mapping: SYNTHETIC_MAPPING });
  ok(preset, "import preset", 201);
  const invitation = insertInvitation(t.db, labId, leadId);
  return {
    labId,
    leadId,
    batchId: batch.body.id,
    sampleId: sample.body.id,
    runId,
    spareRunId: spare.body.runs[0].id,
    addendaRunId: addenda.body.runs[0].id,
    fitId,
    comparisonId: comparison.body.id,
    bundleId: bundle.body.id,
    linkId: link.body.id,
    token: String(link.body.url).split("/").pop()!,
    presetId: preset.body.id,
    invitationId: invitation.id,
    invitationToken: invitation.token,
  };
}

/** A draft fit of the low-T model through the fit service (the route has its own tests). */
export function saveDraftFit(db: Db, labId: string, runId: string, userId: string): string {
  return createFit(db, { labId, runId }, { model: structuredClone(LOW_T_MODEL) as never, window: LOW_T_WINDOW }, userId).id;
}

/** A draft fit, approved by the given lead. */
export function saveApprovedFit(db: Db, labId: string, runId: string, leadId: string): string {
  const fitId = saveDraftFit(db, labId, runId, leadId);
  approveFit(db, { labId, fitId }, leadId);
  return fitId;
}

/** An open invitation to a fresh address, stored the way the service stores it (hash only). */
export function insertInvitation(db: Db, labId: string, invitedBy: string, role: "guest" | "researcher" | "lead" = "guest") {
  const { token, tokenHash } = newLinkToken();
  const id = randomUUID();
  db.insert(invitations)
    .values({
      id,
      labId,
      email: `invitee-${id.slice(0, 8)}@example.org`,
      role,
      tokenHash,
      invitedBy,
      createdAt: Date.now(),
      expiresAt: Date.now() + 7 * 24 * 3600_000,
    })
    .run();
  return { id, token };
}

/** A fresh member of the lab (for role changes and removal). */
export async function insertMember(db: Db, labId: string, role: "guest" | "researcher" | "lead" = "guest") {
  const user = await insertUser(db, { email: `member-${randomUUID().slice(0, 8)}@example.org` });
  db.insert(memberships).values({ labId, userId: user.id, role, createdAt: Date.now() }).run();
  return user;
}

/** A fresh account with a usable password-reset token. */
export async function insertResetToken(db: Db) {
  const user = await insertUser(db, { email: `reset-${randomUUID().slice(0, 8)}@example.org` });
  const { token, tokenHash } = newLinkToken();
  db.insert(passwordResets)
    .values({ id: randomUUID(), userId: user.id, tokenHash, createdAt: Date.now(), expiresAt: Date.now() + 3600_000 })
    .run();
  return { userId: user.id, token };
}

/** Puts a user's password back to what it was (after a password-change attempt). */
export function restorePassword(db: Db, userId: string, passwordHash: string) {
  db.update(users).set({ passwordHash }).where(eq(users.id, userId)).run();
}
