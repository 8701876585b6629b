import { and, asc, eq } from "drizzle-orm";
import type { ModelDefinitionInput } from "@shared/schemas/fits";
import { approveFit, createFit } from "../services/fits";
import type { Db } from "./client";
import { runs, samples } from "./schema";
import type { SeedStep } from "./seed";

/*
 * Demo fits: every SYNTHETIC demo sample run gets a fit saved by the demo researcher and approved by the
 * demo lead, so that comparison and bundles have approved fits on first start. The models are the ones
 * the demo series was generated with (fixtures/demo/generate.py): γT + Debye for the copper piece;
 * γT + Debye + one Einstein mode with the atom count constrained for the invented compound series, plus a
 * two-level Schottky term for runs in a magnetic field (the impurity anomaly the generator adds there).
 */

/** The model the demo seed fits to a run: by formula and field. */
export function demoModelFor(formula: string, fieldT: number | null): ModelDefinitionInput {
  if (formula === "Cu") return { components: [{ kind: "electronic" }, { kind: "debye" }], parameters: { nD: { value: 1, fixed: true } } };
  const components: ModelDefinitionInput["components"] = [{ kind: "electronic" }, { kind: "debye" }, { kind: "einstein" }];
  if (fieldT !== null && Math.abs(fieldT) > 0.5) components.push({ kind: "schottky" });
  return { components, constrainAtoms: true };
}

/** Seed step: fit and approve each demo sample run (runs after the demo runs step). */
export const seedDemoFits: SeedStep = {
  name: "demo fits",
  run(db: Db, ctx) {
    const labId = ctx.labId;
    const researcher = ctx.userIds["researcher@example.org"];
    const lead = ctx.userIds["lead@example.org"];
    if (!labId || !researcher || !lead) throw new Error("seedDemoFits needs the demo lab, researcher and lead (run seedLabAndPeople first)");
    const sampleRuns = db
      .select({ id: runs.id, tMinK: runs.tMinK, tMaxK: runs.tMaxK, fieldT: runs.fieldT, formula: samples.formula })
      .from(runs)
      .innerJoin(samples, eq(samples.id, runs.sampleId))
      .where(and(eq(runs.labId, labId), eq(runs.kind, "sample")))
      .orderBy(asc(runs.createdAt), asc(runs.id))
      .all();
    for (const run of sampleRuns) {
      const fit = createFit(
        db,
        { labId, runId: run.id },
        { model: demoModelFor(run.formula, run.fieldT), window: [run.tMinK, run.tMaxK], notes: "Demo fit made by the seed (synthetic data)" },
        researcher,
      );
      approveFit(db, { labId, fitId: fit.id }, lead);
    }
  },
};
