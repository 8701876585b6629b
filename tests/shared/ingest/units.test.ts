import { describe, expect, it } from "vitest";
import { IngestError } from "@shared/ingest/ingest-error";
import {
  CELSIUS_ZERO_K,
  THERMOCHEMICAL_CALORIE_J,
  fieldToTesla,
  isTotalHeatCapacityUnit,
  molarHeatCapacityFactor,
  parseUnit,
  perMoleOfAtoms,
  splitHeaderLabel,
  temperatureToKelvin,
  toMolarHeatCapacity,
  totalToJoulePerKelvin,
} from "@shared/ingest/units";
import { expectClose } from "../../helpers/expect-close";

const CU = { massMg: 25, molarMassGPerMol: 63.546 };

describe("unit conversions, each against its definition", () => {
  it("°C to K: T = t + 273.15 exactly (BIPM SI Brochure, 9th ed. 2019, §2.3.1)", () => {
    expect(CELSIUS_ZERO_K).toBe(273.15);
    expect(temperatureToKelvin(0, "C")).toBe(273.15);
    expect(temperatureToKelvin(-273.15, "C")).toBe(0);
    expectClose(temperatureToKelvin(25, "C"), 298.15, { rel: 1e-15 });
    expect(temperatureToKelvin(4.2, "K")).toBe(4.2);
  });

  it("Oe to T: 1 Oe ↔ µ0H = 1e-4 T in free space (NIST SP 811, 2008, Appendix B.8)", () => {
    expect(fieldToTesla(1, "Oe")).toBe(1e-4);
    expectClose(fieldToTesla(90000, "Oe"), 9, { rel: 1e-15 });
    expect(fieldToTesla(3, "T")).toBe(3);
  });

  it("cal_th/(mol·K) to J/(mol·K): 1 cal_th = 4.184 J exactly (NIST SP 811, 2008, B.8 footnote)", () => {
    expect(THERMOCHEMICAL_CALORIE_J).toBe(4.184);
    expect(toMolarHeatCapacity(1, "cal/(mol*K)", { molarMassGPerMol: Number.NaN })).toBe(4.184);
    expectClose(toMolarHeatCapacity(5.82, "cal/(mol*K)", CU), 5.82 * 4.184, { rel: 1e-15 });
  });

  it("total J/K to molar: C_m = C / n with n = m / M (molar quantity X_m = X/n, IUPAC Green Book 3rd ed. 2007; from memory)", () => {
    // 1 g of Cu (M = 63.546 g/mol) is 1/63.546 mol, so 1 J/K of it is 63.546 J/(mol·K).
    expectClose(toMolarHeatCapacity(1, "J/K", { massMg: 1000, molarMassGPerMol: 63.546 }), 63.546, { rel: 1e-15 });
    // 25 mg: n = 0.025/63.546 mol; 9.274263e-3 J/K → 9.274263e-3 × 63.546 / 0.025 = 23.573692... J/(mol·K)
    expectClose(toMolarHeatCapacity(9.274263e-3, "J/K", CU), (9.274263e-3 * 63.546) / 0.025, { rel: 1e-15 });
  });

  it("mJ/K and µJ/K are 1e-3 and 1e-6 J/K (SI prefixes, BIPM SI Brochure 9th ed., Table 7)", () => {
    expect(totalToJoulePerKelvin("J/K")).toBe(1);
    expect(totalToJoulePerKelvin("mJ/K")).toBe(1e-3);
    expect(totalToJoulePerKelvin("uJ/K")).toBe(1e-6);
    expectClose(toMolarHeatCapacity(9274.263, "uJ/K", CU), toMolarHeatCapacity(9.274263e-3, "J/K", CU), { rel: 1e-15 });
    expectClose(toMolarHeatCapacity(9.274263, "mJ/K", CU), toMolarHeatCapacity(9.274263e-3, "J/K", CU), { rel: 1e-15 });
  });

  it("specific to molar: c·M for J/(g·K), c·M/1000 for J/(kg·K)", () => {
    expectClose(toMolarHeatCapacity(0.385, "J/(g*K)", CU), 0.385 * 63.546, { rel: 1e-15 });
    expectClose(toMolarHeatCapacity(385, "J/(kg*K)", CU), 0.385 * 63.546, { rel: 1e-15 });
  });

  it("molar units: J/(mol·K) unchanged, mJ/(mol·K) × 1e-3, no mass or molar mass needed", () => {
    const none = { molarMassGPerMol: Number.NaN, massMg: null };
    expect(molarHeatCapacityFactor("J/(mol*K)", none)).toBe(1);
    expect(molarHeatCapacityFactor("mJ/(mol*K)", none)).toBe(1e-3);
  });

  it("per mole of atoms divides by atoms per formula unit (Ba8Ga16Ge30 has 54)", () => {
    expectClose(perMoleOfAtoms(1347.3, 54), 1347.3 / 54, { rel: 1e-15 });
  });

  it("refuses a total unit without a positive sample mass, and a specific unit without a molar mass", () => {
    for (const massMg of [0, -1, Number.NaN, null, undefined]) {
      const e = (() => {
        try {
          molarHeatCapacityFactor("uJ/K", { massMg, molarMassGPerMol: 63.546 });
        } catch (err) {
          return err;
        }
      })();
      expect(e).toBeInstanceOf(IngestError);
      expect((e as IngestError).code).toBe("INVALID_SAMPLE");
    }
    expect(() => molarHeatCapacityFactor("J/(g*K)", { molarMassGPerMol: 0 })).toThrow(IngestError);
    expect(() => totalToJoulePerKelvin("J/(mol*K)")).toThrow(IngestError);
    expect(isTotalHeatCapacityUnit("mJ/K")).toBe(true);
    expect(isTotalHeatCapacityUnit("mJ/(mol*K)")).toBe(false);
  });
});

describe("units written in headers", () => {
  it.each([
    ["K", "K"],
    ["kelvin", "K"],
    ["°C", "C"],
    ["degC", "C"],
    ["T", "T"],
    ["Oe", "Oe"],
    ["J/K", "J/K"],
    ["mJ/K", "mJ/K"],
    ["\u00b5J/K", "uJ/K"],
    ["\u03bcJ/K", "uJ/K"],
    ["uJ/K", "uJ/K"],
    ["J/(g·K)", "J/(g*K)"],
    ["J/g/K", "J/(g*K)"],
    ["J g-1 K-1", "J/(g*K)"],
    ["J/kg K", "J/(kg*K)"],
    ["J/(kg*K)", "J/(kg*K)"],
    ["J/(mol K)", "J/(mol*K)"],
    ["J/mol/K", "J/(mol*K)"],
    ["J mol^-1 K^-1", "J/(mol*K)"],
    ["J K\u207b\u00b9 mol\u207b\u00b9", "J/(mol*K)"],
    ["J/molK", "J/(mol*K)"],
    ["mJ/mol-K", "mJ/(mol*K)"],
    ["mJ/(mol·K)", "mJ/(mol*K)"],
    ["cal/(mol K)", "cal/(mol*K)"],
    ["cal/mol/K", "cal/(mol*K)"],
  ])("reads %s as %s", (text, code) => {
    expect(parseUnit(text)?.code).toBe(code);
  });

  it.each(["kJ/(mol K)", "mJ/mol K2", "nJ/K", "J", "s", "%", "", "cal/K"])("does not read %s as a supported unit", (text) => {
    expect(parseUnit(text)).toBeNull();
  });

  it("splits names and units: brackets, quantity/unit, and leaves derived names alone", () => {
    expect(splitHeaderLabel("Heat Capacity [mJ/K]")).toEqual({
      label: "Heat Capacity",
      unitText: "mJ/K",
      unit: { kind: "heatCapacity", code: "mJ/K" },
    });
    expect(splitHeaderLabel("Cp (J/(mol K))").unit?.code).toBe("J/(mol*K)");
    expect(splitHeaderLabel("T/K")).toEqual({ label: "T", unitText: "K", unit: { kind: "temperature", code: "K" } });
    expect(splitHeaderLabel("B/T").unit?.code).toBe("T");
    expect(splitHeaderLabel("C/T")).toEqual({ label: "C/T", unitText: null, unit: null });
    expect(splitHeaderLabel("C/T (mJ/mol K2)")).toEqual({ label: "C/T", unitText: "mJ/mol K2", unit: null });
    expect(splitHeaderLabel("Cp (sample) (uJ/K)").label).toBe("Cp (sample)");
    expect(splitHeaderLabel("Temp_K").unit?.code).toBe("K");
  });
});
