import { describe, expect, it } from "vitest";
import { evaluate, jacobian, params } from "@shared/physics/t3";
import { expectClose } from "../../helpers/expect-close";
import { checkJacobian } from "./jacobian-check";

describe("cubic term βT³", () => {
  it("gives C/T = 2.08 + 2.57 T² mJ/(mol·K²) for potassium at 0.5 K with γT added (Kittel, ISSP 8th ed., ch. 6 fig. 9, Lien & Phillips data, from memory)", () => {
    const t = 0.5;
    const c = 2.08e-3 * t + evaluate([2.57e-3], t);
    expectClose(c / t, 2.08e-3 + 2.57e-3 * t * t, { rel: 1e-15 });
  });

  it("declares beta in J/(mol·K⁴)", () => {
    expect(params.map((p) => [p.name, p.unit])).toEqual([["beta", "J/(mol·K⁴)"]]);
  });

  it("has the jacobian T³ (finite differences)", () => {
    checkJacobian(evaluate, jacobian, [4.7e-5], [2, 10, 30], ["beta"]);
  });
});
