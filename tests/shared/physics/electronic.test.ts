import { describe, expect, it } from "vitest";
import { evaluate, jacobian, params } from "@shared/physics/electronic";
import { expectClose } from "../../helpers/expect-close";
import { checkJacobian } from "./jacobian-check";

describe("electronic term γT", () => {
  it("is γT (definition; e.g. copper's γ = 0.695 mJ/(mol·K²), Kittel ISSP 8th ed., ch. 6 table of γ, from memory)", () => {
    expectClose(evaluate([0.695e-3], 1), 0.695e-3, { rel: 1e-15 });
    expectClose(evaluate([0.695e-3], 10), 6.95e-3, { rel: 1e-15 });
  });

  it("declares gamma in J/(mol·K²), unbounded so that a negative fit result stays visible", () => {
    expect(params).toEqual([
      { name: "gamma", unit: "J/(mol·K²)", lower: Number.NEGATIVE_INFINITY, upper: Number.POSITIVE_INFINITY },
    ]);
  });

  it("has the jacobian T (finite differences)", () => {
    checkJacobian(evaluate, jacobian, [1.2e-3], [2, 50, 300], ["gamma"]);
    expect(jacobian([5], 7)).toEqual([7]);
  });
});
