import { beforeAll, describe, expect, it } from "vitest";
import { buildComposite } from "@shared/physics/composite";
import { GAS_CONSTANT } from "@shared/physics/constants";
import { FitSchema, ThermoTableSchema, ThetaDCurveSchema } from "@shared/schemas/fits";
import { makeTestApp, seedRoles, TEST_ORIGIN, type TestApp } from "../helpers/app";
import { expectClose } from "../helpers/expect-close";
import { insertSyntheticRun, logSpaced } from "./fits-helpers";

/*
 * θ_D(T) and the thermodynamic functions through the API, against closed forms and a published value.
 * Runs are synthetic (noise-free curves of the engine's models, or a published curve), labelled so.
 */

let t: TestApp;
let s: Awaited<ReturnType<typeof seedRoles>>;
const post = (url: string, body: unknown) => s.agents.researcher.post(url).set("Origin", TEST_ORIGIN).send(body as object);

beforeAll(async () => {
  t = makeTestApp();
  s = await seedRoles(t);
});

async function saveFit(runId: string, model: unknown, window: [number, number]) {
  const res = await post(`/api/labs/${s.lab.id}/runs/${runId}/fits`, { model, window });
  expect(res.status).toBe(201);
  return FitSchema.parse(res.body);
}

describe("GET …/theta-d", () => {
  it("θ_D(T) of data from a single Debye solid (θ_D = 250 K, n = 2) is flat at 250 K to rel 1e-6", async () => {
    const debye = buildComposite({ components: [{ kind: "debye" }] }, 2);
    const points = logSpaced(2, 300, 80).map((T) => {
      const c = debye.evaluate([250, 2], T);
      return { temperatureK: T, cp: c, sigma: 0.005 * c };
    });
    const { runId } = insertSyntheticRun(t.db, s.lab.id, { points, atomsPerFormulaUnit: 2, label: "synthetic single Debye" });
    const fit = await saveFit(runId, { components: [{ kind: "electronic" }, { kind: "debye" }], parameters: { nD: { value: 2, fixed: true } } }, [2, 300]);
    const res = await s.agents.guest.get(`/api/labs/${s.lab.id}/runs/${runId}/theta-d`);
    expect(res.status).toBe(200);
    const curve = ThetaDCurveSchema.parse(res.body);
    expect(curve.fitId).toBe(fit.id);
    expect(curve.subtracted).toEqual(["electronic"]);
    expect(curve.points).toHaveLength(80);
    for (const p of curve.points) expectClose(p.thetaD!, 250, { rel: 1e-6 }, `θ_D at ${p.temperatureK} K`);
    expectClose(curve.fittedThetaD!.value, 250, { rel: 1e-6 });
  });

  it("takes off the fitted γT: γT + Debye data give a flat θ_D(T) too, and points with no solution are marked", async () => {
    const model = buildComposite({ components: [{ kind: "electronic" }, { kind: "debye" }] }, 1);
    const points: { temperatureK: number; cp: number; sigma: number }[] = logSpaced(2, 200, 70).map((T) => {
      const c = model.evaluate([1.2e-3, 300, 1], T);
      return { temperatureK: T, cp: c, sigma: 0.005 * c };
    });
    // Outside the fit window: one point above 3nR and one negative (a glitch), which have no θ_D.
    points.push({ temperatureK: 250, cp: 4 * GAS_CONSTANT, sigma: 0.1 }, { temperatureK: 260, cp: -0.5, sigma: 0.1 });
    const { runId } = insertSyntheticRun(t.db, s.lab.id, { points, atomsPerFormulaUnit: 1, label: "synthetic γT + Debye with glitches" });
    await saveFit(runId, { components: [{ kind: "electronic" }, { kind: "debye" }], parameters: { nD: { value: 1, fixed: true } } }, [2, 200]);
    const curve = ThetaDCurveSchema.parse((await s.agents.guest.get(`/api/labs/${s.lab.id}/runs/${runId}/theta-d`)).body);
    const solved = curve.points.filter((p) => p.temperatureK <= 200);
    for (const p of solved) expectClose(p.thetaD!, 300, { rel: 1e-6 }, `θ_D at ${p.temperatureK} K`);
    const [hot, negative] = curve.points.filter((p) => p.temperatureK > 200);
    expect(hot.thetaD).toBeNull();
    expect(hot.noSolution).toMatch(/3nR/);
    expect(negative.thetaD).toBeNull();
    expect(negative.noSolution).toMatch(/negative/);
  });

  it("defaults to the approved fit, else the newest; a fit of another run is 404", async () => {
    const debye = buildComposite({ components: [{ kind: "debye" }] }, 1);
    const points = logSpaced(3, 100, 40).map((T) => ({ temperatureK: T, cp: debye.evaluate([200, 1], T), sigma: 0.01 * debye.evaluate([200, 1], T) }));
    const { runId } = insertSyntheticRun(t.db, s.lab.id, { points, atomsPerFormulaUnit: 1 });
    expect((await s.agents.guest.get(`/api/labs/${s.lab.id}/runs/${runId}/theta-d`)).status).toBe(422);
    const a = await saveFit(runId, { components: [{ kind: "debye" }] }, [3, 100]);
    const b = await saveFit(runId, { components: [{ kind: "electronic" }, { kind: "debye" }] }, [3, 100]);
    expect(ThetaDCurveSchema.parse((await s.agents.guest.get(`/api/labs/${s.lab.id}/runs/${runId}/theta-d`)).body).fitId).toBe(b.id);
    await s.agents.lead.post(`/api/labs/${s.lab.id}/fits/${a.id}/approve`).set("Origin", TEST_ORIGIN);
    expect(ThetaDCurveSchema.parse((await s.agents.guest.get(`/api/labs/${s.lab.id}/runs/${runId}/theta-d`)).body).fitId).toBe(a.id);
    const other = insertSyntheticRun(t.db, s.lab.id, { points, atomsPerFormulaUnit: 1 });
    expect((await s.agents.guest.get(`/api/labs/${s.lab.id}/runs/${other.runId}/theta-d?fitId=${a.id}`)).status).toBe(404);
  });
});

describe("GET …/thermo", () => {
  it("S(298.15) and H(298.15) − H(0) of an Einstein solid match the closed forms (rel 2e-8)", async () => {
    // Einstein solid, θ_E = 150 K, n = 1: S = 3R[x/(eˣ−1) − ln(1 − e⁻ˣ)], H − H(0) = 3Rθ_E/(eˣ−1), x = θ_E/T
    // (the standard statistical mechanics of 3N independent oscillators; common practice, no source).
    const thetaE = 150;
    const einstein = buildComposite({ components: [{ kind: "einstein" }] }, 1);
    const points = logSpaced(2, 320, 400).map((T) => {
      const c = einstein.evaluate([thetaE, 1], T);
      return { temperatureK: T, cp: c, sigma: Math.max(0.005 * c, 1e-9) };
    });
    const { runId } = insertSyntheticRun(t.db, s.lab.id, { points, atomsPerFormulaUnit: 1, label: "synthetic Einstein solid" });
    await saveFit(runId, { components: [{ kind: "einstein" }], parameters: { nE: { value: 1, fixed: true } } }, [10, 60]);
    const res = await s.agents.guest.get(`/api/labs/${s.lab.id}/runs/${runId}/thermo?at=298.15,100`);
    expect(res.status).toBe(200);
    const table = ThermoTableSchema.parse(res.body);
    expect(table.rows.map((r) => r.temperatureK)).toEqual([100, 298.15]);
    for (const row of table.rows) {
      const x = thetaE / row.temperatureK;
      const S = 3 * GAS_CONSTANT * (x / Math.expm1(x) - Math.log(-Math.expm1(-x)));
      const H = (3 * GAS_CONSTANT * thetaE) / Math.expm1(x);
      // Monotone cubic interpolation between 400 log-spaced points (spacing 1.3 %) integrates this smooth
      // curve to about 2e-9 (measured); 2e-8 is that with a tenfold margin, the interpolation error and nothing else.
      expectClose(row.entropy, S, { rel: 2e-8 }, `S(${row.temperatureK} K)`);
      expectClose(row.enthalpy, H, { rel: 2e-8 }, `H(${row.temperatureK} K)`);
    }
  });

  it("S(298.15) of copper from the NIST cryogenic copper curve agrees with the CODATA key value 33.150 J/(mol·K) within 2 %", async () => {
    // Cp of OFHC copper: NIST Cryogenic Material Properties, "OFHC Copper (UNS C10100/C10200)", specific heat fit
    // log10 Cp = Σ a_i (log10 T)^i in J/(kg·K), valid 4–300 K, stated curve-fit error 10 % below 15 K and 5 % above,
    // https://trc.nist.gov/cryogenics/materials/OFHC%20Copper/OFHC_Copper_rev1.htm (revised 02/03/2010).
    const a = [-1.91844, -0.15973, 8.61013, -18.996, 21.9661, -12.7328, 3.54322, -0.3797, 0];
    // Molar mass of Cu 63.546 g/mol (IUPAC standard atomic weight, conventional value).
    const molarKg = 0.063546;
    const cpCopper = (T: number) => {
      const l = Math.log10(T);
      return 10 ** a.reduce((sum, c, i) => sum + c * l ** i, 0) * molarKg;
    };
    const points = logSpaced(4, 300, 160).map((T) => ({ temperatureK: T, cp: cpCopper(T), sigma: 0.01 * cpCopper(T) }));
    const { runId } = insertSyntheticRun(t.db, s.lab.id, { points, atomsPerFormulaUnit: 1, label: "copper from the NIST curve" });
    await saveFit(runId, { components: [{ kind: "electronic" }, { kind: "t3" }] }, [4, 10]);
    const table = ThermoTableSchema.parse((await s.agents.guest.get(`/api/labs/${s.lab.id}/runs/${runId}/thermo?at=298.15`)).body);
    const S298 = table.rows[0].entropy;
    // CODATA Key Values for Thermodynamics (Cox, Wagman, Medvedev, Hemisphere 1989): Cu(cr) S°(298.15 K) =
    // 33.150 ± 0.080 J/(K·mol) — from memory (the table was found, the copper row not read). The 2 % allows for the
    // NIST curve's own 5 % pointwise fit error, which largely averages out in the integral (its integral is 0.9 % high).
    expectClose(S298, 33.15, { rel: 0.02 });
    // Below 4 K the fitted γT + βT³ carries a negligible share of S(298.15).
    expect(table.modelShareOfEntropy).toBeLessThan(1e-3);
  });

  it("the default table has round temperatures and 298.15 K inside the data, and the CSV gives the same numbers", async () => {
    const einstein = buildComposite({ components: [{ kind: "einstein" }] }, 1);
    const points = logSpaced(2, 310, 120).map((T) => ({ temperatureK: T, cp: einstein.evaluate([180, 1], T), sigma: 0.01 * einstein.evaluate([180, 1], T) + 1e-9 }));
    const { runId } = insertSyntheticRun(t.db, s.lab.id, { points, atomsPerFormulaUnit: 1 });
    await saveFit(runId, { components: [{ kind: "einstein" }] }, [5, 80]);
    const table = ThermoTableSchema.parse((await s.agents.guest.get(`/api/labs/${s.lab.id}/runs/${runId}/thermo`)).body);
    const temps = table.rows.map((r) => r.temperatureK);
    expect(temps).toContain(298.15);
    expect(temps).toContain(100);
    expect(Math.min(...temps)).toBeGreaterThanOrEqual(2);
    expect(Math.max(...temps)).toBeLessThanOrEqual(310);
    const csv = await s.agents.guest.get(`/api/labs/${s.lab.id}/runs/${runId}/thermo.csv`);
    expect(csv.status).toBe(200);
    expect(csv.headers["content-type"]).toMatch(/text\/csv/);
    expect(csv.headers["content-disposition"]).toMatch(/attachment; filename="thermo-.*\.csv"/);
    const lines = csv.text.trim().split("\n");
    expect(lines[0]).toBe("T_K,Cp_J_per_mol_K,S_J_per_mol_K,H_minus_H0_J_per_mol");
    expect(lines).toHaveLength(table.rows.length + 1);
    const at298 = lines.find((l) => l.startsWith("298.15,"))!.split(",").map(Number);
    const row = table.rows.find((r) => r.temperatureK === 298.15)!;
    expectClose(at298[2], row.entropy, { rel: 1e-9 });
    expectClose(at298[3], row.enthalpy, { rel: 1e-9 });
  });

  it("refuses a temperature above the data, and junk in ?at=", async () => {
    const einstein = buildComposite({ components: [{ kind: "einstein" }] }, 1);
    const points = logSpaced(2, 100, 40).map((T) => ({ temperatureK: T, cp: einstein.evaluate([180, 1], T), sigma: 0.01 * einstein.evaluate([180, 1], T) + 1e-9 }));
    const { runId } = insertSyntheticRun(t.db, s.lab.id, { points, atomsPerFormulaUnit: 1 });
    await saveFit(runId, { components: [{ kind: "einstein" }] }, [5, 80]);
    const high = await s.agents.guest.get(`/api/labs/${s.lab.id}/runs/${runId}/thermo?at=298.15`);
    expect(high.status).toBe(422);
    expect(high.body.error.message).toMatch(/above the last data point/);
    const junk = await s.agents.guest.get(`/api/labs/${s.lab.id}/runs/${runId}/thermo?at=50,abc`);
    expect(junk.status).toBe(400);
    expect(junk.body.error.code).toBe("VALIDATION_FAILED");
  });
});
