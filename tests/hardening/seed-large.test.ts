import { describe, expect, it } from "vitest";
import { FitSchema } from "@shared/schemas/fits";
import { seedLarge } from "../../server/db/seed-large";
import { sweepOrphanFiles } from "../../server/services/orphans";
import { makeTestApp, seedRoles } from "../helpers/app";
import { consistency, CONSISTENT } from "./server-harness";

describe("SEED=large (server/db/seed-large.ts)", () => {
  it("makes 200 samples, 2,000 runs with their points and 2,000 approved fits with θ_D, γ or β and standard errors, readable through the API", async () => {
    const t = makeTestApp();
    const cast = await seedRoles(t);
    const r = seedLarge(t.db, t.dataDir, [
      { userId: cast.users.lead.id, role: "lead" },
      { userId: cast.users.guest.id, role: "guest" },
    ]);
    console.log(`seed-large: ${r.samples} samples, ${r.runs} runs, ${r.points} points, ${r.approvedFits} fits in ${r.elapsedMs.toFixed(0)} ms`);
    expect(r).toMatchObject({ samples: 200, runs: 2000, points: 24000, approvedFits: 2000 });
    const $ = t.db.$client;
    const one = (sql: string) => ($.prepare(sql).get(r.labId) as { n: number }).n;
    expect(one("select count(*) n from samples where lab_id = ?")).toBe(200);
    expect(one("select count(*) n from runs where lab_id = ?")).toBe(2000);
    expect(one("select count(*) n from fits where lab_id = ? and state = 'approved'")).toBe(2000);
    // One approved fit per run, as approval keeps it.
    expect(one("select count(distinct run_id) n from fits where lab_id = ? and state = 'approved'")).toBe(2000);
    expect(one("select count(*) n from fit_parameters p join fits f on f.id = p.fit_id where f.lab_id = ? and p.name = 'thetaD' and p.stderr > 0")).toBe(1000);
    expect(one("select count(*) n from fit_parameters p join fits f on f.id = p.fit_id where f.lab_id = ? and p.name = 'beta' and p.stderr > 0")).toBe(1000);
    expect(one("select count(*) n from fit_parameters p join fits f on f.id = p.fit_id where f.lab_id = ? and p.name = 'gamma' and p.stderr > 0")).toBe(2000);
    expect(consistency(t.db)).toEqual(CONSISTENT);
    // Every run's raw file is on disk under its hash.
    expect(sweepOrphanFiles(t.db, t.dataDir, () => {})).toEqual({ tempFilesRemoved: 0, orphansRemoved: [], missingFiles: [] });

    const compare = await cast.agents.guest.get(`/api/labs/${r.labId}/compare?parameter=thetaD&groupBy=batch`);
    expect(compare.status).toBe(200);
    expect(compare.body.rows).toHaveLength(2000);
    expect(compare.body.groups).toHaveLength(10);
    const fitId = ($.prepare("select id from fits where lab_id = ? limit 1").get(r.labId) as { id: string }).id;
    const fit = await cast.agents.guest.get(`/api/labs/${r.labId}/fits/${fitId}`);
    expect(fit.status).toBe(200);
    FitSchema.parse(fit.body);
    const run = await cast.agents.guest.get(`/api/labs/${r.labId}/runs/${fit.body.runId}/raw`);
    expect(run.status).toBe(200);
  }, 120_000);
});
