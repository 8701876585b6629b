// @vitest-environment jsdom
import { describe, expect, it } from "vitest";
import { formatUncertainty } from "@/lib/format-uncertainty";

const both = (value: number, sigma: number) => [
  formatUncertainty(value, sigma, "parenthesis").text,
  formatUncertainty(value, sigma, "plus-minus").text,
];

describe("formatUncertainty: two significant digits of u, value to the same last digit (JCGM 100:2008 GUM §7.2.6)", () => {
  it("writes 342.81 ± 1.234 as 342.8(1.2), keeping the point when u reaches past it (GUM §7.2.2 concise form)", () => {
    expect(both(342.81, 1.234)).toEqual(["342.8(1.2)", "342.8 ± 1.2"]);
  });

  it("writes 0.6951 ± 0.0032 as 0.6951(32): the digits in parentheses are the last digits of the value (GUM §7.2.2)", () => {
    expect(both(0.6951, 0.0032)).toEqual(["0.6951(32)", "0.6951 ± 0.0032"]);
  });

  it("reproduces GUM §7.2.2 example: m_S = 100.021 47 g with u_c = 0.35 mg is 100.02147(35)", () => {
    expect(both(100.02147, 0.00035)).toEqual(["100.02147(35)", "100.02147 ± 0.00035"]);
  });

  it("reproduces CODATA 2018 (physics.nist.gov/constants) proton mass 1.007 276 466 621(53) u", () => {
    expect(formatUncertainty(1.007276466621, 5.3e-11, "parenthesis").text).toBe("1.007276466621(53)");
  });

  it("switches to a power of ten for CODATA 2018 G = 6.674 30(15)×10⁻¹¹ and m_e = 9.109 383 7015(28)×10⁻³¹", () => {
    expect(both(6.6743e-11, 1.5e-15)).toEqual(["6.67430(15)×10⁻¹¹", "(6.67430 ± 0.00015)×10⁻¹¹"]);
    expect(formatUncertainty(9.1093837015e-31, 2.8e-40, "parenthesis")).toEqual({
      value: "9.1093837015",
      uncertainty: "28",
      exponent: -31,
      text: "9.1093837015(28)×10⁻³¹",
    });
  });

  it("carries into the next decade: u = 0.0996 rounds to 0.10, not 0.100 (worked by hand, common practice)", () => {
    expect(both(1.0, 0.0996)).toEqual(["1.00(10)", "1.00 ± 0.10"]);
  });

  it("rounds u of 678 on 12345 to the tens: 12350(680) (worked by hand: two digits of u are 6 and 8)", () => {
    expect(both(12345, 678)).toEqual(["12350(680)", "12350 ± 680"]);
  });

  it("keeps a u larger than the value: 0.5 ± 3.2 → 0.5(3.2) (worked by hand)", () => {
    expect(both(0.5, 3.2)).toEqual(["0.5(3.2)", "0.5 ± 3.2"]);
  });

  it("rounds negative values symmetrically: −12.3456 ± 0.0123 → -12.346(12) (worked by hand)", () => {
    expect(both(-12.3456, 0.0123)).toEqual(["-12.346(12)", "-12.346 ± 0.012"]);
  });

  it("rounds the written decimal half away from zero, unlike toFixed: 1.005 ± 0.1 → 1.01(10) (common practice, no source)", () => {
    // (1.005).toFixed(2) is "1.00" because the binary double is 1.00499999999999989…; people read "1.005".
    expect(formatUncertainty(1.005, 0.1, "parenthesis").text).toBe("1.01(10)");
    expect(formatUncertainty(-1.005, 0.1, "parenthesis").text).toBe("-1.01(10)");
  });

  it("never writes minus zero: −0.00001 ± 0.01 → 0.000(10) (worked by hand)", () => {
    expect(formatUncertainty(-0.00001, 0.01, "parenthesis").text).toBe("0.000(10)");
  });

  it("keeps one digit when asked (GUM §7.2.6 allows one or two): 342.81 ± 1.234 → 343(1)", () => {
    expect(formatUncertainty(342.81, 1.234, "parenthesis", { significantDigits: 1 }).text).toBe("343(1)");
    expect(formatUncertainty(0.6951, 0.0032, "plus-minus", { significantDigits: 1 }).text).toBe("0.695 ± 0.003");
  });

  it("shows the value alone when there is no usable uncertainty (zero, negative, NaN, Infinity)", () => {
    for (const sigma of [0, -1, Number.NaN, Number.POSITIVE_INFINITY]) {
      expect(formatUncertainty(342.81, sigma, "parenthesis")).toEqual({ value: "342.81", uncertainty: null, exponent: null, text: "342.81" });
    }
    expect(formatUncertainty(Number.NaN, 1, "parenthesis").text).toBe("—");
  });
});
