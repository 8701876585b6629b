import { describe, expect, it } from "vitest";
import { modelLabel, rankModels } from "@shared/fitting/rank";
import type { ModelDefinition } from "@shared/physics/model-types";
import { createSeededRandom } from "@shared/numerics/seeded-random";
import { syntheticRun } from "./synthetic-runs";

describe("rankModels", () => {
  const truthDef: ModelDefinition = { components: [{ kind: "electronic" }, { kind: "debye" }, { kind: "einstein" }] };
  // Synthetic run (seed 201): γT + Debye + Einstein, 0.5 % noise.
  const run = syntheticRun(truthDef, 5, [2e-3, 250, 3, 80, 2], { points: 300, tMinK: 2, tMaxK: 300 }, 0.005, createSeededRandom(201));
  const candidates: ModelDefinition[] = [
    { components: [{ kind: "electronic" }, { kind: "debye" }] },
    truthDef,
    { components: [{ kind: "electronic" }, { kind: "einstein" }] },
    { components: [{ kind: "electronic" }, { kind: "debye" }], parameters: { nD: { fixed: true } } },
  ];

  it("puts the generating model first by BIC, gives ΔBIC against it, and lists a failure last with its reason", () => {
    const progress: [number, number][] = [];
    const ranked = rankModels(run, candidates, { atomsPerFormulaUnit: 5 }, (done, total) => progress.push([done, total]));
    expect(progress).toEqual([[1, 4], [2, 4], [3, 4], [4, 4]]);
    expect(ranked[0].definition).toBe(truthDef);
    expect(ranked[0].rank).toBe(1);
    expect(ranked[0].deltaBic).toBe(0);
    expect(ranked[1].deltaBic!).toBeGreaterThan(10);
    for (let i = 1; i < 3; i++) expect(ranked[i].fit!.bic).toBeGreaterThanOrEqual(ranked[i - 1].fit!.bic);
    const last = ranked[3];
    expect(last.fit).toBeNull();
    expect(last.rank).toBeNull();
    expect(last.failure).toMatch(/nD is fixed but has no value/);
  });

  it("labels models in plain words", () => {
    expect(modelLabel(truthDef)).toBe("electronic + debye + einstein");
    expect(modelLabel({ components: [{ kind: "debye", dimension: 2 }], constrainAtoms: true })).toBe("debye (2D) (atoms constrained)");
  });

  it("refuses an empty candidate list", () => {
    expect(() => rankModels(run, [], { atomsPerFormulaUnit: 5 })).toThrow(RangeError);
  });
});
