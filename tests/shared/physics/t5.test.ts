import { describe, expect, it } from "vitest";
import { evaluate, jacobian, params } from "@shared/physics/t5";
import { expectClose } from "../../helpers/expect-close";
import { checkJacobian } from "./jacobian-check";

describe("quintic term δT⁵", () => {
  it("is δT⁵ (definition) for either sign of δ", () => {
    expectClose(evaluate([2e-8], 3), 2e-8 * 243, { rel: 1e-15 });
    expectClose(evaluate([-2e-8], 3), -2e-8 * 243, { rel: 1e-15 });
  });

  it("declares delta in J/(mol·K⁶)", () => {
    expect(params.map((p) => [p.name, p.unit])).toEqual([["delta", "J/(mol·K⁶)"]]);
  });

  it("has the jacobian T⁵ (finite differences)", () => {
    checkJacobian(evaluate, jacobian, [3e-9], [2, 10, 20], ["delta"]);
  });
});
