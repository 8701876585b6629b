import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { and, eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { openDb } from "../../server/db/client";
import { runMigrations } from "../../server/db/migrate";
import { fitParameters, fits, runs, samples } from "../../server/db/schema";
import { seedDemo } from "../../server/db/seed";
import { readDemoData } from "../../server/db/seed-demo-runs";

/*
 * The demo seed leaves one approved fit on every SYNTHETIC demo sample run, and those fits find the
 * parameters the demo generator used (fixtures/demo/data.json "model").
 */

describe("demo seed: fits", () => {
  it("approves one fit per demo sample run, saved by the researcher and approved by the lead", async () => {
    const dataDir = mkdtempSync(path.join(tmpdir(), "thetafold-demo-fits-"));
    const db = openDb(path.join(dataDir, "thetafold.db"));
    runMigrations(db);
    const { labId, userIds } = await seedDemo(db, { password: "one demo password" });
    const sampleRuns = db.select({ id: runs.id, fieldT: runs.fieldT, sampleId: runs.sampleId }).from(runs).where(and(eq(runs.labId, labId), eq(runs.kind, "sample"))).all();
    expect(sampleRuns.length).toBeGreaterThanOrEqual(7);
    const generator = new Map(readDemoData().samples.map((s) => [s.label, s as unknown as { model: Record<string, number> }]));
    for (const run of sampleRuns) {
      const runFits = db.select().from(fits).where(eq(fits.runId, run.id)).all();
      expect(runFits).toHaveLength(1);
      const [fit] = runFits;
      expect(fit.state).toBe("approved");
      expect(fit.converged).toBe(true);
      expect(fit.createdBy).toBe(userIds["researcher@example.org"]);
      expect(fit.approvedBy).toBe(userIds["lead@example.org"]);
      const sample = db.select().from(samples).where(eq(samples.id, run.sampleId!)).get()!;
      const params = db.select().from(fitParameters).where(eq(fitParameters.fitId, fit.id)).all();
      const theta = params.find((p) => p.name === "thetaD")!;
      const truth = generator.get(sample.label)!.model.thetaD;
      // Within 3 combined standard uncertainties (statistical and mass systematic) of the generator's θ_D.
      const sigma = Math.hypot(theta.stderr!, theta.stderrMass ?? 0);
      expect(Math.abs(theta.value - truth), `${sample.label} θ_D ${theta.value} vs ${truth}`).toBeLessThan(3 * sigma);
    }
  });
});
