import { describe, expect, it } from "vitest";
import { ImportMappingSchema } from "@shared/schemas/ingest";
import { proposeMapping } from "@shared/ingest/column-map";
import { readDelimited } from "@shared/ingest/read-delimited";
import { splitHeaderLabel } from "@shared/ingest/units";
import { fixtureText } from "./fixture-files";

function propose(header: string[]) {
  return proposeMapping(header, header.map((h) => splitHeaderLabel(h).unit));
}

describe("proposeMapping from header words and units", () => {
  it("places every column of the fixture exports", () => {
    const fields = readDelimited(fixtureText("clathrate-fields", "fields-export.csv"));
    const p = proposeMapping(fields.header, fields.units);
    expect(p.mapping).toEqual({
      columns: {
        temperature: "Temperature (K)",
        heatCapacity: "Total heat capacity (\u00b5J/K)",
        sigma: "Total HC error (\u00b5J/K)",
        field: "Field (Oe)",
        addenda: "Addenda (\u00b5J/K)",
      },
      units: { temperature: "K", heatCapacity: "uJ/K", field: "Oe" },
    });
    expect(p.unplaced).toEqual(["Time (s)"]);
    expect(ImportMappingSchema.parse(p.mapping)).toEqual(p.mapping);

    const addenda = readDelimited(fixtureText("addenda-platform", "addenda-run.csv"));
    expect(proposeMapping(addenda.header, addenda.units).mapping).toEqual({
      columns: { temperature: "Temperature", heatCapacity: "Heat capacity", sigma: "Uncertainty" },
      units: { temperature: "K", heatCapacity: "uJ/K" },
    });
  });

  it("prefers the sample temperature over other thermometers, keeps σ of T out of σ of Cp", () => {
    const p = propose(["Time (s)", "Puck Temp (K)", "Sample Temp (K)", "Temp error (K)", "Samp HC (\u00b5J/K)", "Samp HC Err (\u00b5J/K)", "Addenda HC (\u00b5J/K)"]);
    expect(p.columns).toEqual({
      temperature: "Sample Temp (K)",
      heatCapacity: "Samp HC (\u00b5J/K)",
      sigma: "Samp HC Err (\u00b5J/K)",
      addenda: "Addenda HC (\u00b5J/K)",
    });
    expect(p.unplaced).toEqual(["Time (s)", "Puck Temp (K)", "Temp error (K)"]);
  });

  it("assumes K for a bare temperature and asks for a missing heat-capacity unit", () => {
    const p = propose(["T", "C"]);
    expect(p.columns).toEqual({ temperature: "T", heatCapacity: "C" });
    expect(p.mapping).toBeNull();
    expect(p.assumed).toEqual(["units.temperature"]);
    expect(p.needs).toEqual(["units.heatCapacity"]);
  });

  it("takes the Cp unit from its σ column, marks it assumed", () => {
    const p = propose(["Temperature (K)", "Cp", "Cp error (mJ/K)"]);
    expect(p.mapping?.units.heatCapacity).toBe("mJ/K");
    expect(p.assumed).toEqual(["units.heatCapacity"]);
  });

  it("leaves derived quantities such as C/T unplaced and reads °C, molar units and percent σ", () => {
    const p = propose(["Temperature (°C)", "C/T (mJ/mol K2)", "Cp (J/mol K)", "Cp uncertainty (%)"]);
    expect(p.mapping).toEqual({
      columns: { temperature: "Temperature (°C)", heatCapacity: "Cp (J/mol K)", sigma: "Cp uncertainty (%)" },
      units: { temperature: "C", heatCapacity: "J/(mol*K)" },
      sigmaScale: "percent",
    });
    expect(p.unplaced).toEqual(["C/T (mJ/mol K2)"]);
  });

  it("asks for the unit of a field column that has none, and for missing columns", () => {
    const p = propose(["T (K)", "H", "Cp (J/K)"]);
    expect(p.columns.field).toBe("H");
    expect(p.needs).toEqual(["units.field"]);
    expect(p.mapping).toBeNull();
    const none = propose(["time", "voltage"]);
    expect(none.needs).toEqual(["columns.temperature", "columns.heatCapacity", "units.heatCapacity"]);
    expect(none.unplaced).toEqual(["time", "voltage"]);
  });

  it("does not place σ whose unit differs from Cp's (one unit serves both)", () => {
    const p = propose(["T (K)", "Cp (mJ/K)", "sigma (uJ/K)"]);
    expect(p.columns.sigma).toBeUndefined();
    expect(p.unplaced).toEqual(["sigma (uJ/K)"]);
  });
});

describe("ImportMappingSchema", () => {
  it("stores µJ/K (micro sign or Greek mu) as the one code uJ/K", () => {
    for (const spelling of ["\u00b5J/K", "\u03bcJ/K", "uJ/K"]) {
      const m = ImportMappingSchema.parse({
        columns: { temperature: "T", heatCapacity: "C" },
        units: { temperature: "K", heatCapacity: spelling },
      });
      expect(m.units.heatCapacity).toBe("uJ/K");
    }
  });

  it("refuses a field column without a unit, one column in two roles and unknown units", () => {
    const base = { columns: { temperature: "T", heatCapacity: "C" }, units: { temperature: "K", heatCapacity: "J/K" } };
    expect(ImportMappingSchema.safeParse({ ...base, columns: { ...base.columns, field: "B" } }).success).toBe(false);
    expect(ImportMappingSchema.safeParse({ ...base, columns: { ...base.columns, sigma: "C" } }).success).toBe(false);
    expect(ImportMappingSchema.safeParse({ ...base, units: { temperature: "F", heatCapacity: "J/K" } }).success).toBe(false);
    expect(ImportMappingSchema.safeParse({ ...base, units: { temperature: "K", heatCapacity: "kJ/K" } }).success).toBe(false);
  });
});
