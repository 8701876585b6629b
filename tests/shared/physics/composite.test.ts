import { describe, expect, it } from "vitest";
import { buildComposite } from "@shared/physics/composite";
import { GAS_CONSTANT } from "@shared/physics/constants";
import * as debye from "@shared/physics/debye";
import * as einstein from "@shared/physics/einstein";
import * as schottky from "@shared/physics/schottky";
import type { ModelDefinition } from "@shared/physics/model-types";
import { expectClose } from "../../helpers/expect-close";
import { checkJacobian } from "./jacobian-check";

const R = GAS_CONSTANT;

const everything: ModelDefinition = {
  components: [
    { kind: "electronic" },
    { kind: "t3" },
    { kind: "t5" },
    { kind: "debye" },
    { kind: "einstein" },
    { kind: "einstein" },
    { kind: "schottky" },
    { kind: "nuclear" },
    { kind: "debye", dimension: 2 },
  ],
};
// gamma, beta, delta, thetaD, nD, thetaE, nE, thetaE2, nE2, gap, nS, gRatio, nuclearA, thetaD2, nD2
const everythingP = [1.1e-3, 2e-5, -3e-9, 310, 2.2, 95, 0.6, 210, 0.9, 6, 0.02, 0.5, 4e-5, 480, 1.3];

describe("buildComposite: parameters and labels", () => {
  it("orders parameters by component and numbers repeats from the second on", () => {
    const m = buildComposite(everything, 5);
    expect(m.params.map((p) => p.name)).toEqual([
      "gamma", "beta", "delta", "thetaD", "nD", "thetaE", "nE", "thetaE2", "nE2",
      "gap", "nS", "gRatio", "nuclearA", "thetaD2", "nD2",
    ]);
    expect(m.indexOf("thetaE2")).toBe(7);
    expect(m.indexOf("nD2")).toBe(14);
    expect(m.indexOf("thetaE3")).toBe(-1);
    expect(m.definition).toBe(everything);
  });

  it("gives units and physical bounds: θ's and gap in (0, 1e5] K, counts ≥ 0, gRatio > 0, amplitudes unbounded", () => {
    const m = buildComposite(everything, 5);
    const spec = (name: string) => m.params[m.indexOf(name)];
    expect(spec("thetaD2")).toEqual({ name: "thetaD2", unit: "K", lower: 0, upper: 1e5 });
    expect(spec("nE2")).toEqual({ name: "nE2", unit: "1", lower: 0, upper: Number.POSITIVE_INFINITY });
    expect(spec("gap").upper).toBe(1e5);
    expect(spec("gRatio").lower).toBe(0);
    expect(spec("gamma").unit).toBe("J/(mol·K²)");
    expect(spec("beta").unit).toBe("J/(mol·K⁴)");
    expect(spec("delta").unit).toBe("J/(mol·K⁶)");
    expect(spec("nuclearA").unit).toBe("J·K/mol");
    expect(spec("nuclearA").lower).toBe(Number.NEGATIVE_INFINITY);
  });

  it("labels each part for plots", () => {
    const m = buildComposite(everything, 5);
    expect(m.parts(everythingP, 20).map((q) => q.label)).toEqual([
      "Electronic", "T³ term", "T⁵ term", "Debye", "Einstein", "Einstein 2", "Schottky", "Nuclear", "Debye 2",
    ]);
  });
});

describe("buildComposite: values", () => {
  it("sums its parts, each equal to its own component", () => {
    const m = buildComposite(everything, 5);
    for (const t of [0.5, 4, 30, 300]) {
      const parts = m.parts(everythingP, t);
      const sum = parts.reduce((s, q) => s + q.value, 0);
      expectClose(m.evaluate(everythingP, t), sum, { rel: 1e-14 });
      expectClose(parts[0].value, 1.1e-3 * t, { rel: 1e-15 });
      expectClose(parts[3].value, debye.evaluate([310, 2.2], t), { rel: 1e-15 });
      expectClose(parts[5].value, einstein.evaluate([210, 0.9], t), { rel: 1e-15 });
      expectClose(parts[6].value, schottky.evaluate([6, 0.02, 0.5], t), { rel: 1e-15 });
      expectClose(parts[8].value, debye.evaluate([480, 1.3], t, 2), { rel: 1e-15 });
      expectClose(parts[7].value, 4e-5 / (t * t), { rel: 1e-15 });
    }
  });

  it("with constrainAtoms drops nD and uses n_D = n − Σ n_E, so the high-T limit is the Dulong–Petit 3nR", () => {
    const def: ModelDefinition = {
      components: [{ kind: "debye" }, { kind: "einstein" }, { kind: "einstein" }],
      constrainAtoms: true,
    };
    const m = buildComposite(def, 5);
    expect(m.params.map((p) => p.name)).toEqual(["thetaD", "thetaE", "nE", "thetaE2", "nE2"]);
    const p = [250, 80, 1.5, 160, 0.75];
    expectClose(m.parts(p, 40)[0].value, debye.evaluate([250, 5 - 1.5 - 0.75], 40), { rel: 1e-15 });
    expectClose(m.evaluate(p, 1e7), 15 * R, { rel: 1e-9 }); // 3nR with n = 5; leading correction ~ (θ/T)²
  });
});

describe("buildComposite: jacobian", () => {
  it("matches central finite differences for every component kind", () => {
    const m = buildComposite(everything, 5);
    checkJacobian(m.evaluate, (p, t) => m.jacobian!(p, t), everythingP, [0.7, 3, 15, 80, 290], m.params.map((q) => q.name), 1e-14);
  });

  it("matches central finite differences with the atom constraint (nE also moves n_D)", () => {
    const m = buildComposite(
      { components: [{ kind: "electronic" }, { kind: "einstein" }, { kind: "debye", dimension: 1 }], constrainAtoms: true },
      3,
    );
    checkJacobian(m.evaluate, (p, t) => m.jacobian!(p, t), [2e-3, 120, 0.8, 330], [1, 10, 60, 250], m.params.map((q) => q.name));
  });
});

describe("buildComposite: refusals", () => {
  it("throws RangeError on an empty component list and non-positive or non-finite atom counts", () => {
    expect(() => buildComposite({ components: [] }, 1)).toThrow(RangeError);
    expect(() => buildComposite({ components: [{ kind: "debye" }] }, 0)).toThrow(RangeError);
    expect(() => buildComposite({ components: [{ kind: "debye" }] }, -2)).toThrow(RangeError);
    expect(() => buildComposite({ components: [{ kind: "debye" }] }, Number.NaN)).toThrow(RangeError);
  });

  it("throws RangeError for constrainAtoms without exactly one Debye component", () => {
    expect(() => buildComposite({ components: [{ kind: "einstein" }], constrainAtoms: true }, 2)).toThrow(/exactly one Debye/);
    expect(() =>
      buildComposite({ components: [{ kind: "debye" }, { kind: "debye", dimension: 2 }], constrainAtoms: true }, 2),
    ).toThrow(RangeError);
  });

  it("throws RangeError for unknown kinds, dimensions and parameter settings, and for lower > upper", () => {
    expect(() => buildComposite({ components: [{ kind: "phonon" } as never] }, 1)).toThrow(RangeError);
    expect(() => buildComposite({ components: [{ kind: "toString" } as never] }, 1)).toThrow(/unknown component kind/);
    expect(() => buildComposite({ components: [{ kind: "debye", dimension: 4 as never }] }, 1)).toThrow(RangeError);
    expect(() => buildComposite({ components: [{ kind: "debye" }], parameters: { thetaE: { value: 100 } } }, 1)).toThrow(
      /unknown parameter "thetaE"/,
    );
    expect(() =>
      buildComposite({ components: [{ kind: "debye" }], constrainAtoms: true, parameters: { nD: { fixed: true } } }, 1),
    ).toThrow(/derived from the atom count/);
    expect(() => buildComposite({ components: [{ kind: "debye" }], parameters: { thetaD: { lower: 300, upper: 200 } } }, 1)).toThrow(
      RangeError,
    );
  });

  it("throws RangeError when the parameter vector has the wrong length", () => {
    const m = buildComposite({ components: [{ kind: "electronic" }, { kind: "debye" }] }, 1);
    expect(() => m.evaluate([1e-3, 300], 10)).toThrow(RangeError);
    expect(() => m.jacobian!([1e-3, 300, 1, 2], 10)).toThrow(RangeError);
  });
});
