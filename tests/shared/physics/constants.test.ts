import { describe, expect, it } from "vitest";
import { AVOGADRO, BOLTZMANN, GAS_CONSTANT, PLANCK, dulongPetit } from "@shared/physics/constants";
import { expectClose } from "../../helpers/expect-close";

describe("CODATA 2018 constants", () => {
  it("holds the exact defining values of k_B, N_A and h (CODATA 2018, Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021))", () => {
    expect(BOLTZMANN).toBe(1.380649e-23);
    expect(AVOGADRO).toBe(6.02214076e23);
    expect(PLANCK).toBe(6.62607015e-34);
  });

  it("gives R = k_B·N_A = 8.314462618… J/(mol·K) (CODATA 2018 lists R = 8.314 462 618... exact)", () => {
    expectClose(GAS_CONSTANT, 8.314462618, { rel: 1e-10 });
    // 8.31446261815324 is k_B·N_A written out to 15 digits (exact product of the two defining constants).
    expectClose(GAS_CONSTANT, 8.31446261815324, { rel: 1e-15 });
  });
});

describe("dulongPetit", () => {
  it("is 3R = 24.94 J/(mol·K) for one atom (Dulong–Petit law, common practice, no source)", () => {
    expectClose(dulongPetit(1), 24.94, { rel: 2e-4 }); // 24.94 is given to 4 digits
    expectClose(dulongPetit(1), 3 * 8.31446261815324, { rel: 1e-15 });
  });

  it("scales with atoms per formula unit: 54 atoms of Ba8Ga16Ge30 give 162R (definition 3nR)", () => {
    expectClose(dulongPetit(54), 162 * 8.31446261815324, { rel: 1e-15 });
  });

  it("returns NaN for negative or non-finite atom counts", () => {
    expect(dulongPetit(-1)).toBeNaN();
    expect(dulongPetit(Number.NaN)).toBeNaN();
    expect(dulongPetit(Number.POSITIVE_INFINITY)).toBeNaN();
  });
});
