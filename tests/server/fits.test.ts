import { createHash } from "node:crypto";
import { spawnSync } from "node:child_process";
import { count, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { buildComposite } from "@shared/physics/composite";
import { FitHistorySchema, FitOutcomeSchema, FitSchema, RankResultSchema, RankStreamLineSchema } from "@shared/schemas/fits";
import { auditLog, fitParameters, fits } from "../../server/db/schema";
import { canonicalFitInput, fitInputSha256, recomputeFit, SOFTWARE_VERSION } from "../../server/services/fits";
import { makeTestApp, seedRoles, TEST_ORIGIN, type TestApp } from "../helpers/app";
import { expectClose } from "../helpers/expect-close";
import { gaussian, insertSyntheticRun, logSpaced, seededRandom } from "./fits-helpers";

/*
 * The fit API end to end: fit, preview, rank, approve, supersede, history, bad input, stored fits that
 * re-compute. Every run here is synthetic, generated from the engine's own models with fixed seeds.
 */

type Agent = Awaited<ReturnType<typeof seedRoles>>["agents"]["lead"];

const GAMMA = 0.695e-3; // J/(mol·K²); a copper-like Sommerfeld coefficient, invented for the synthetic run
const THETA_D = 343; // K
const N_ATOMS = 1;
const GAMMA_DEBYE = { components: [{ kind: "electronic" }, { kind: "debye" }] } as const;

/** A synthetic γT + Debye run, 120 points 2–300 K log-spaced, σ = 1 % of Cp, Gaussian noise from seed 20261201. */
function syntheticRun(seed = 20261201, nPoints = 120, masked: number[] = []) {
  const model = buildComposite({ components: [{ kind: "electronic" }, { kind: "debye" }] }, N_ATOMS);
  const noise = gaussian(seededRandom(seed));
  return logSpaced(2, 300, nPoints).map((T, i) => {
    const c = model.evaluate([GAMMA, THETA_D, N_ATOMS], T);
    const sigma = 0.01 * c;
    return { temperatureK: T, cp: c + sigma * noise(), sigma, masked: masked.includes(i) };
  });
}

function rowCounts(t: TestApp) {
  return {
    fits: t.db.select({ n: count() }).from(fits).get()!.n,
    parameters: t.db.select({ n: count() }).from(fitParameters).get()!.n,
  };
}

let t: TestApp;
let s: Awaited<ReturnType<typeof seedRoles>>;
let runId: string;
let rawSha: string;
const post = (agent: Agent, url: string, body?: unknown) => agent.post(url).set("Origin", TEST_ORIGIN).send(body as object);

beforeAll(async () => {
  t = makeTestApp();
  s = await seedRoles(t);
  const r = insertSyntheticRun(t.db, s.lab.id, { points: syntheticRun(20261201, 120, [5, 60]), atomsPerFormulaUnit: N_ATOMS });
  runId = r.runId;
  rawSha = r.fileSha256;
});

const runUrl = () => `/api/labs/${s.lab.id}/runs/${runId}`;

describe("POST …/fits (fit and save a draft)", () => {
  it("recovers γ and θ_D of a synthetic γT + Debye run (seed 20261201) within 3 stated σ, and stores everything", async () => {
    const before = rowCounts(t);
    const res = await post(s.agents.researcher, `${runUrl()}/fits`, { model: GAMMA_DEBYE, window: [2, 300], notes: "synthetic check" });
    expect(res.status).toBe(201);
    const fit = FitSchema.parse(res.body);
    expect(fit.state).toBe("draft");
    expect(fit.converged).toBe(true);
    const gamma = fit.parameters.find((p) => p.name === "gamma")!;
    const theta = fit.parameters.find((p) => p.name === "thetaD")!;
    const nD = fit.parameters.find((p) => p.name === "nD")!;
    // Generating values are the test's own (synthetic); 3σ covers 99.7 % of noise draws.
    expect(Math.abs(gamma.value - GAMMA)).toBeLessThan(3 * gamma.stderr!);
    expect(Math.abs(theta.value - THETA_D)).toBeLessThan(3 * theta.stderr!);
    expect(Math.abs(nD.value - N_ATOMS)).toBeLessThan(3 * nD.stderr!);
    // σ are the true noise level, so χ²/dof is near 1 and the scaled and unscaled errors agree within ~30 %.
    expect(fit.reducedChiSquare).toBeGreaterThan(0.6);
    expect(fit.reducedChiSquare).toBeLessThan(1.5);
    expect(fit.pointsUsed).toBe(118);
    expect(fit.maskedExcluded).toBe(2);
    expect(fit.maskedPointIndices).toEqual([5, 60]);
    expect(fit.dof).toBe(115);
    expect(fit.freeParameters).toEqual(["gamma", "thetaD", "nD"]);
    expect(fit.covariance).toHaveLength(3);
    expect(fit.correlation![0][0]).toBe(1);
    expect(fit.softwareVersion).toBe(SOFTWARE_VERSION);
    expect(fit.rawFileSha256).toBe(rawSha);
    expect(fit.createdBy?.id).toBe(s.users.researcher.id);
    expect(fit.notes).toBe("synthetic check");
    expect(fit.residuals).toHaveLength(118);
    expect(fit.curve.length).toBeGreaterThan(50);
    expect(rowCounts(t)).toEqual({ fits: before.fits + 1, parameters: before.parameters + 3 });
    const stored = t.db.select().from(fitParameters).where(eq(fitParameters.fitId, fit.id)).all();
    expect(stored.map((p) => p.name).sort()).toEqual(["gamma", "nD", "thetaD"]);
    expect(stored.find((p) => p.name === "thetaD")!.unit).toBe("K");
  });

  it("hashes the documented canonical text of the points used (T, Cp, σ at 17 digits)", async () => {
    const res = await post(s.agents.researcher, `${runUrl()}/fits/preview`, { model: GAMMA_DEBYE, window: [10, 100] });
    expect(res.status).toBe(200);
    const outcome = FitOutcomeSchema.parse(res.body);
    // Rebuild the text from the documentation in server/services/fits.ts, independently of it.
    const pts = syntheticRun(20261201, 120, [5, 60]).filter((p) => !p.masked && p.temperatureK >= 10 && p.temperatureK <= 100);
    let text = "thetafold-fit-input v1\nT_K,Cp_J_per_mol_K,sigma_J_per_mol_K\n";
    for (const p of pts) text += `${p.temperatureK.toExponential(16)},${p.cp.toExponential(16)},${p.sigma.toExponential(16)}\n`;
    expect(canonicalFitInput(pts)).toBe(text);
    expect(outcome.inputSha256).toBe(createHash("sha256").update(text, "utf8").digest("hex"));
    expect(outcome.pointsUsed).toBe(pts.length);
  });

  it("the documented Python recipe gives the same SHA-256 (python3 hashlib; skipped only when python3 is absent)", async () => {
    const pts = syntheticRun(7, 30);
    const probe = spawnSync("python3", ["--version"]);
    if (probe.error) return;
    const script = [
      "import hashlib, json, sys",
      "pts = json.load(sys.stdin)",
      "def f(x):",
      '    m, e = f"{x:.16e}".split("e")',
      '    return f"{m}e{int(e):+d}"',
      'text = "thetafold-fit-input v1\\nT_K,Cp_J_per_mol_K,sigma_J_per_mol_K\\n"',
      'text += "".join(f"{f(p[0])},{f(p[1])},{f(p[2])}\\n" for p in pts)',
      "print(hashlib.sha256(text.encode()).hexdigest())",
    ].join("\n");
    const out = spawnSync("python3", ["-c", script], { input: JSON.stringify(pts.map((p) => [p.temperatureK, p.cp, p.sigma])) });
    expect(out.stderr.toString()).toBe("");
    expect(out.stdout.toString().trim()).toBe(fitInputSha256(pts));
  });

  it("a stored fit re-computes from its stored definition and input to the same numbers (rel 1e-9)", async () => {
    const res = await post(s.agents.researcher, `${runUrl()}/fits`, {
      model: { components: [{ kind: "electronic" }, { kind: "debye" }], parameters: { nD: { value: 1, fixed: true } } },
      window: [2, 120],
    });
    expect(res.status).toBe(201);
    const fit = FitSchema.parse(res.body);
    const { outcome, sameInput } = recomputeFit(t.db, { labId: s.lab.id, fitId: fit.id });
    expect(sameInput).toBe(true);
    expect(outcome.inputSha256).toBe(fit.inputSha256);
    // The engine is deterministic (no random starts), so the same input gives the same numbers; 1e-9
    // leaves room only for a change of evaluation order, none for a different minimum.
    for (const p of fit.parameters) {
      const again = outcome.parameters.find((q) => q.name === p.name)!;
      expectClose(again.value, p.value, { rel: 1e-9 });
      if (p.stderr !== null) expectClose(again.stderr!, p.stderr, { rel: 1e-9 });
    }
    expectClose(outcome.chiSquare, fit.chiSquare, { rel: 1e-9 });
    expectClose(outcome.bic, fit.bic, { rel: 1e-9 });
    expect(outcome.dof).toBe(fit.dof);
    expect(outcome.pointsUsed).toBe(fit.pointsUsed);
  });

  it("a stored fit keeps the mask it saw: masking a point later does not change its input hash", async () => {
    const res = await post(s.agents.researcher, `${runUrl()}/fits`, { model: GAMMA_DEBYE, window: [2, 300] });
    const fit = FitSchema.parse(res.body);
    const { runPoints } = await import("../../server/db/schema");
    const { and } = await import("drizzle-orm");
    t.db.update(runPoints).set({ masked: true }).where(and(eq(runPoints.runId, runId), eq(runPoints.idx, 30))).run();
    try {
      const again = FitSchema.parse((await s.agents.guest.get(`/api/labs/${s.lab.id}/fits/${fit.id}`)).body);
      expect(again.warnings.some((w) => w.includes("no longer match"))).toBe(false);
      expect(again.residuals).toHaveLength(fit.pointsUsed);
      expect(recomputeFit(t.db, { labId: s.lab.id, fitId: fit.id }).sameInput).toBe(true);
    } finally {
      t.db.update(runPoints).set({ masked: false }).where(and(eq(runPoints.runId, runId), eq(runPoints.idx, 30))).run();
    }
  });
});

describe("POST …/fits/preview", () => {
  it("fits without storing anything", async () => {
    const before = rowCounts(t);
    const res = await post(s.agents.researcher, `${runUrl()}/fits/preview`, { model: GAMMA_DEBYE, window: [2, 300] });
    expect(res.status).toBe(200);
    const outcome = FitOutcomeSchema.parse(res.body);
    expect(outcome.converged).toBe(true);
    expect(rowCounts(t)).toEqual(before);
  });

  it("normalises residuals by σ: their mean square is χ²/N", async () => {
    const res = await post(s.agents.researcher, `${runUrl()}/fits/preview`, { model: GAMMA_DEBYE, window: [2, 300] });
    const outcome = FitOutcomeSchema.parse(res.body);
    const meanSquare = outcome.residuals.reduce((a, r) => a + r.normalized ** 2, 0);
    expectClose(meanSquare, outcome.chiSquare, { rel: 1e-9 });
  });
});

describe("POST …/rank", () => {
  it("ranks the default candidates by BIC, lowest first, and the generating model γT + Debye wins", async () => {
    const res = await post(s.agents.researcher, `${runUrl()}/rank`, { window: [2, 300] });
    expect(res.status).toBe(200);
    const r = RankResultSchema.parse(res.body);
    expect(r.entries.map((e) => e.label).sort()).toEqual(["γT + Debye", "γT + Debye + 2 Einstein", "γT + Debye + Einstein", "γT + Debye + Schottky"].sort());
    const bics = r.entries.filter((e) => e.outcome?.converged).map((e) => e.outcome!.bic);
    expect(bics).toEqual([...bics].sort((a, b) => a - b));
    expect(r.entries[0].label).toBe("γT + Debye");
    expect(r.entries[0].deltaBic).toBe(0);
    expect(r.pointsUsed).toBe(118);
  });

  it("ranks a given candidate set and streams progress as NDJSON when asked", async () => {
    const res = await post(s.agents.researcher, `${runUrl()}/rank`, {
      window: [2, 40],
      candidates: [
        { label: "low-T line", model: { components: [{ kind: "electronic" }, { kind: "t3" }] } },
        { model: GAMMA_DEBYE },
      ],
    }).set("Accept", "application/x-ndjson");
    expect(res.status).toBe(200);
    const lines = res.text.trim().split("\n").map((l) => RankStreamLineSchema.parse(JSON.parse(l)));
    expect(lines.filter((l) => l.type === "progress").map((l) => (l.type === "progress" ? l.done : 0))).toEqual([1, 2]);
    const last = lines[lines.length - 1];
    expect(last.type).toBe("result");
    if (last.type !== "result") return;
    expect(last.result.entries).toHaveLength(2);
    const [a, b] = last.result.entries;
    expect(a.outcome!.bic).toBeLessThanOrEqual(b.outcome!.bic);
    expect(last.result.entries.map((e) => e.label)).toContain("γT + Debye");
  });
});

describe("approval and supersession", () => {
  it("a lead approves a draft; approving another supersedes it in the same step; both stay readable", async () => {
    const first = FitSchema.parse((await post(s.agents.researcher, `${runUrl()}/fits`, { model: GAMMA_DEBYE, window: [2, 300] })).body);
    const approved = await post(s.agents.lead, `/api/labs/${s.lab.id}/fits/${first.id}/approve`);
    expect(approved.status).toBe(200);
    const a = FitSchema.parse(approved.body);
    expect(a.state).toBe("approved");
    expect(a.approvedBy?.id).toBe(s.users.lead.id);
    expect(a.approvedAt).not.toBeNull();
    const auditRows = t.db.select().from(auditLog).where(eq(auditLog.action, "fit.approved")).all();
    expect(auditRows.some((r) => (r.details as { fitId?: string })?.fitId === first.id)).toBe(true);

    const second = FitSchema.parse((await post(s.agents.lead, `${runUrl()}/fits`, { model: GAMMA_DEBYE, window: [3, 250] })).body);
    const b = FitSchema.parse((await post(s.agents.lead, `/api/labs/${s.lab.id}/fits/${second.id}/approve`)).body);
    expect(b.state).toBe("approved");
    const old = FitSchema.parse((await s.agents.guest.get(`/api/labs/${s.lab.id}/fits/${first.id}`)).body);
    expect(old.state).toBe("superseded");
    expect(old.supersededBy).toBe(second.id);
    expect(old.supersededAt).not.toBeNull();
    // The superseded fit's numbers are untouched.
    expect(old.chiSquare).toBe(first.chiSquare);
    expect(old.parameters).toEqual(first.parameters);

    expect((await post(s.agents.lead, `/api/labs/${s.lab.id}/fits/${first.id}/approve`)).body.error.code).toBe("CONFLICT");
    const again = await post(s.agents.lead, `/api/labs/${s.lab.id}/fits/${second.id}/approve`);
    expect(again.status).toBe(409);
    const approvedNow = t.db.select().from(fits).where(eq(fits.runId, runId)).all().filter((f) => f.state === "approved");
    expect(approvedNow.map((f) => f.id)).toEqual([second.id]);
  });

  it("the history lists every fit of the run, newest first, in every state", async () => {
    const res = await s.agents.guest.get(`${runUrl()}/fits`);
    expect(res.status).toBe(200);
    const history = FitHistorySchema.parse(res.body);
    const rows = t.db.select().from(fits).where(eq(fits.runId, runId)).all();
    expect(history).toHaveLength(rows.length);
    const times = history.map((h) => Date.parse(h.createdAt));
    expect(times).toEqual([...times].sort((x, y) => y - x));
    expect(new Set(history.map((h) => h.state))).toEqual(new Set(["draft", "approved", "superseded"]));
  });
});

describe("bad input: a clear 4xx and nothing stored", () => {
  const cases: { name: string; body: unknown; status: number; code: string }[] = [
    { name: "no components", body: { model: { components: [] }, window: [2, 300] }, status: 400, code: "VALIDATION_FAILED" },
    {
      name: "a negative fixed atom count",
      body: { model: { ...GAMMA_DEBYE, parameters: { nD: { value: -1, fixed: true } } }, window: [2, 300] },
      status: 400,
      code: "VALIDATION_FAILED",
    },
    {
      name: "bounds crossed",
      body: { model: { ...GAMMA_DEBYE, parameters: { thetaD: { lower: 400, upper: 100 } } }, window: [2, 300] },
      status: 400,
      code: "VALIDATION_FAILED",
    },
    { name: "a window that ends before it starts", body: { model: GAMMA_DEBYE, window: [300, 2] }, status: 400, code: "VALIDATION_FAILED" },
    { name: "an unknown component", body: { model: { components: [{ kind: "phonon" }] }, window: [2, 300] }, status: 400, code: "VALIDATION_FAILED" },
    {
      name: "a window with fewer points than free parameters",
      body: { model: GAMMA_DEBYE, window: [2, 2.1] },
      status: 422,
      code: "UNPROCESSABLE",
    },
    {
      name: "a setting for a parameter the model does not have",
      body: { model: { ...GAMMA_DEBYE, parameters: { thetaE: { value: 100 } } }, window: [2, 300] },
      status: 422,
      code: "UNPROCESSABLE",
    },
    {
      name: "the atom constraint without a Debye term",
      body: { model: { components: [{ kind: "einstein" }], constrainAtoms: true }, window: [2, 300] },
      status: 400,
      code: "VALIDATION_FAILED",
    },
  ];
  for (const c of cases) {
    it(`refuses ${c.name} with ${c.status} ${c.code}`, async () => {
      const before = rowCounts(t);
      const res = await post(s.agents.researcher, `${runUrl()}/fits`, c.body);
      expect(res.status).toBe(c.status);
      expect(res.body.error.code).toBe(c.code);
      expect(res.body.error.message.length).toBeGreaterThan(10);
      expect(rowCounts(t)).toEqual(before);
    });
  }

  it("says how few points the window holds", async () => {
    const res = await post(s.agents.researcher, `${runUrl()}/fits`, { model: GAMMA_DEBYE, window: [2, 2.1] });
    expect(res.body.error.message).toMatch(/3 free parameter/);
  });

  it("a fit that does not converge (two identical T³ terms: the data cannot split β) is refused unless saved knowingly, then flagged and not approvable", async () => {
    const model = { components: [{ kind: "t3" }, { kind: "t3" }] };
    const before = rowCounts(t);
    const refused = await post(s.agents.researcher, `${runUrl()}/fits`, { model, window: [2, 30] });
    expect(refused.status).toBe(422);
    expect(refused.body.error.code).toBe("UNPROCESSABLE");
    expect(refused.body.error.message).toMatch(/did not converge/);
    expect(rowCounts(t)).toEqual(before);

    const saved = await post(s.agents.researcher, `${runUrl()}/fits`, { model, window: [2, 30], saveUnconverged: true });
    expect(saved.status).toBe(201);
    const fit = FitSchema.parse(saved.body);
    expect(fit.converged).toBe(false);
    expect(fit.warnings.some((w) => /did not converge/.test(w))).toBe(true);
    const approve = await post(s.agents.lead, `/api/labs/${s.lab.id}/fits/${fit.id}/approve`);
    expect(approve.status).toBe(422);
    expect(FitSchema.parse((await s.agents.lead.get(`/api/labs/${s.lab.id}/fits/${fit.id}`)).body).state).toBe("draft");
  });

  it("a run of another lab is 404, even with a valid id", async () => {
    const other = insertSyntheticRun(t.db, s.otherLab.id, { points: syntheticRun(3, 40), atomsPerFormulaUnit: 1 });
    const res = await post(s.agents.researcher, `/api/labs/${s.lab.id}/runs/${other.runId}/fits`, { model: GAMMA_DEBYE, window: [2, 300] });
    expect(res.status).toBe(404);
  });
});
