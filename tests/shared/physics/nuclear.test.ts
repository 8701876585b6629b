import { describe, expect, it } from "vitest";
import { evaluate, jacobian, params } from "@shared/physics/nuclear";
import { expectClose } from "../../helpers/expect-close";
import { checkJacobian } from "./jacobian-check";

describe("nuclear tail A/T²", () => {
  it("is A/T² (definition): A = 1e-4 J·K/mol gives 0.1 mJ/(mol·K) at 1 K and a quarter of that at 2 K", () => {
    expectClose(evaluate([1e-4], 1), 1e-4, { rel: 1e-15 });
    expectClose(evaluate([1e-4], 2), 2.5e-5, { rel: 1e-15 });
  });

  it("declares nuclearA in J·K/mol", () => {
    expect(params.map((p) => [p.name, p.unit])).toEqual([["nuclearA", "J·K/mol"]]);
  });

  it("has the jacobian 1/T² (finite differences)", () => {
    checkJacobian(evaluate, jacobian, [3e-5], [0.4, 2, 10], ["nuclearA"]);
  });
});
