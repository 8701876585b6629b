import { describe, expect, it } from "vitest";
import { parseFormula } from "@shared/ingest/formula";
import { IngestError } from "@shared/ingest/ingest-error";
import { expectClose } from "../../helpers/expect-close";

// IUPAC CIAAW standard atomic weights 2021 (ciaaw.org; Prohaska et al., Pure Appl. Chem. 94 (2022) 573),
// values from memory. Single values are v(u) with u the uncertainty of the last digits; elements
// with an interval give [low, high]. Cu, Ba, Ga, Fe agree with the 1997 IUPAC table read while
// writing this test; Ge changed to 72.630(8) in 2009 and Al to 26.981 5384(3) in 2017.
const IUPAC: Record<string, [number, number]> = {
  Cu: [63.546 - 0.003, 63.546 + 0.003],
  Al: [26.9815384 - 0.0000003, 26.9815384 + 0.0000003],
  O: [15.99903, 15.99977],
  Ba: [137.327 - 0.007, 137.327 + 0.007],
  Ga: [69.723 - 0.001, 69.723 + 0.001],
  Ge: [72.63 - 0.008, 72.63 + 0.008],
  Si: [28.084, 28.086],
  Fe: [55.845 - 0.002, 55.845 + 0.002],
  H: [1.00784, 1.00811],
  S: [32.059, 32.076],
};

/** Molar mass interval implied by the IUPAC values for element counts. */
function interval(elements: Record<string, number>): [number, number] {
  let lo = 0;
  let hi = 0;
  for (const [el, n] of Object.entries(elements)) {
    lo += n * IUPAC[el][0];
    hi += n * IUPAC[el][1];
  }
  return [lo, hi];
}

describe("parseFormula (mf-parser 3.9.3)", () => {
  it.each([
    ["Cu", { Cu: 1 }, 1],
    ["Al2O3", { Al: 2, O: 3 }, 5],
    ["Ba8Ga16Ge30", { Ba: 8, Ga: 16, Ge: 30 }, 54],
    ["Fe0.5Si", { Fe: 0.5, Si: 1 }, 1.5],
    ["CuSO4·5H2O", { Cu: 1, S: 1, O: 9, H: 10 }, 21],
  ])("%s lies within the IUPAC CIAAW 2021 standard-atomic-weight interval", (formula, elements, atoms) => {
    const info = parseFormula(formula);
    expect(info.elements).toEqual(elements);
    expectClose(info.atomsPerFormulaUnit, atoms, { rel: 1e-15 });
    const [lo, hi] = interval(elements);
    // mf-parser derives each element's weight from isotope abundances (e.g. O 15.99940, Ge 72.6276), not
    // the abridged conventional values, so the check is the IUPAC interval, widened by 1e-6 relative for rounding.
    expect(info.molarMassGPerMol).toBeGreaterThanOrEqual(lo * (1 - 1e-6));
    expect(info.molarMassGPerMol).toBeLessThanOrEqual(hi * (1 + 1e-6));
  });

  it("agrees with the conventional molar masses to rel 2e-5 (Cu 63.546, Al2O3 101.960, Ba8Ga16Ge30 4393.084; IUPAC CIAAW 2021, from memory)", () => {
    // Al2O3: 2 × 26.9815384 + 3 × 15.999 = 101.9600768. Ba8Ga16Ge30: 8 × 137.327 + 16 × 69.723 + 30 × 72.630 = 4393.084.
    // mf-parser's O (15.99940) and Ge (72.6276) differ from the conventional 15.999 and 72.630 by up to 3.4e-5 relative
    // per element; in these compounds that is ≤ 1.7e-5 of the total.
    expectClose(parseFormula("Cu").molarMassGPerMol, 63.546, { rel: 2e-5 });
    expectClose(parseFormula("Al2O3").molarMassGPerMol, 101.9600768, { rel: 2e-5 });
    expectClose(parseFormula("Ba8Ga16Ge30").molarMassGPerMol, 4393.084, { rel: 2e-5 });
  });

  it("reads subscript digits, hydrate dots, parentheses with fractions", () => {
    expect(parseFormula("Cu\u2082O").elements).toEqual({ Cu: 2, O: 1 });
    expect(parseFormula("CuSO4*5H2O").elements).toEqual({ Cu: 1, S: 1, O: 9, H: 10 });
    const sub = parseFormula("(Ba0.9Sr0.1)8Ga16Ge30");
    expectClose(sub.elements.Ba, 7.2, { rel: 1e-15 });
    expectClose(sub.atomsPerFormulaUnit, 54, { rel: 1e-14 });
  });

  it.each([
    ["", "empty"],
    ["cu", "lower case"],
    ["hello", "lower-case junk"],
    ["Xx2", "unknown element"],
    ["CuQ", "unknown element"],
    ["Cu2+", "a charge"],
    ["Cu-1", "a minus sign"],
    ["Cu0", "a zero count"],
    ["Al2O3)", "unbalanced parentheses"],
    ["Tc", "an element without a standard atomic weight"],
    ["Cu;", "a stray character"],
    ["[13C]", "isotope brackets"],
    ["Cu99999999999999999999999", "an absurd count (10^23 atoms per formula unit)"],
    ["U20000", "more atoms than any formula unit (above MAX_ATOMS_PER_FORMULA_UNIT)"],
  ])("refuses %j (%s) with an IngestError, not a crash", (formula) => {
    let error: unknown;
    try {
      parseFormula(formula);
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(IngestError);
    expect((error as IngestError).code).toBe("INVALID_FORMULA");
    expect((error as IngestError).message.length).toBeGreaterThan(10);
  });
});
