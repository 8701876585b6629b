import { describe, expect, it } from "vitest";
import { evaluate, jacobian, params } from "@shared/physics/t3";
import * as debye from "@shared/physics/debye";
import { betaFromThetaD } from "@shared/physics/theta-d";
import { expectClose } from "../../helpers/expect-close";
import { checkJacobian } from "./jacobian-check";

describe("cubic term βT³", () => {
  it("is βT³ (definition)", () => {
    expectClose(evaluate([2.57e-3], 0.5), 2.57e-3 * 0.125, { rel: 1e-15 });
  });

  it("equals the Debye heat capacity at T = θ_D/1000 when β = 12π⁴nR/(5θ_D³) (Debye T³ law)", () => {
    for (const [thetaD, n] of [
      [91, 1],
      [343, 1],
      [300, 54],
    ]) {
      const t = thetaD / 1000;
      expectClose(evaluate([betaFromThetaD(thetaD, n)], t), debye.evaluate([thetaD, n], t), { rel: 1e-13 });
    }
  });

  it("declares beta in J/(mol·K⁴)", () => {
    expect(params.map((p) => [p.name, p.unit])).toEqual([["beta", "J/(mol·K⁴)"]]);
  });

  it("has the jacobian T³ (finite differences)", () => {
    checkJacobian(evaluate, jacobian, [4.7e-5], [2, 10, 30], ["beta"]);
  });
});
