/*
 * Units of calorimeter exports: recognising them in header text, and converting to SI (kelvin, tesla)
 * and to molar heat capacity J/(mol·K) per mole of formula units. Every conversion is linear, so the
 * same factor converts a value and its standard uncertainty.
 */
import type { FieldUnit, HeatCapacityUnit, ParsedUnit, TemperatureUnit } from "@shared/schemas/ingest";
import { IngestError } from "./ingest-error";

// BIPM, The International System of Units (SI Brochure), 9th ed. (2019), section 2.3.1:
// t/°C = T/K − 273.15 (exact, by definition of the degree Celsius).
export const CELSIUS_ZERO_K = 273.15;

// NIST SP 811 (2008 ed.), Appendix B.8 and footnote 9: 1 cal_th = 4.184 J exactly.
export const THERMOCHEMICAL_CALORIE_J = 4.184;

// 1 Oe = (1000/4π) A/m; in free space B = µ0·H = 4π×1e-7 × 1000/(4π) T = 1e-4 T (NIST SP 811, B.8, from
// memory; with the 2019 SI µ0 differs from 4π×1e-7 N/A² by ~1e-10 relative, far below any field reading).
export const TESLA_PER_OERSTED = 1e-4;

/** Sample data needed to turn total or specific heat capacity into molar heat capacity. */
export interface MolarBasis {
  /** Sample mass in mg; needed only for total units (J/K, mJ/K, µJ/K). */
  massMg?: number | null;
  /** Molar mass of one formula unit, g/mol. */
  molarMassGPerMol: number;
}

/**
 * Converts a temperature reading to kelvin.
 * @param value reading in `unit`
 * @param unit "K" or "C" (degree Celsius)
 * @returns thermodynamic temperature, K (T = t + 273.15 for °C)
 * @see BIPM SI Brochure, 9th ed. (2019), section 2.3.1
 */
export function temperatureToKelvin(value: number, unit: TemperatureUnit): number {
  return unit === "C" ? value + CELSIUS_ZERO_K : value;
}

/**
 * Converts a magnetic-field reading to tesla (µ0H in free space).
 * @param value reading in `unit`
 * @param unit "T" or "Oe"
 * @returns µ0H, T (1 Oe ↔ 1e-4 T)
 * @see NIST SP 811 (2008), Appendix B.8
 */
export function fieldToTesla(value: number, unit: FieldUnit): number {
  return unit === "Oe" ? value * TESLA_PER_OERSTED : value;
}

/** True for J/K, mJ/K and µJ/K: heat capacity of the whole piece, not per gram or per mole. */
export function isTotalHeatCapacityUnit(unit: HeatCapacityUnit): boolean {
  return unit === "J/K" || unit === "mJ/K" || unit === "uJ/K";
}

/**
 * Factor from a total heat-capacity unit to J/K.
 * @param unit "J/K", "mJ/K" or "uJ/K"
 * @returns J/K per unit (1, 1e-3, 1e-6)
 * @throws IngestError (UNIT_NOT_TOTAL) for a specific or molar unit
 */
export function totalToJoulePerKelvin(unit: HeatCapacityUnit): number {
  switch (unit) {
    case "J/K":
      return 1;
    case "mJ/K":
      return 1e-3;
    case "uJ/K":
      return 1e-6;
    default:
      throw new IngestError("UNIT_NOT_TOTAL", `${unit} is not a total heat-capacity unit (J/K, mJ/K or µJ/K)`);
  }
}

/**
 * Factor that turns a heat capacity in `unit` into J/(mol·K) per mole of formula units.
 * Total C (J/K) → C·M/m with m in g; specific c (J/(g·K)) → c·M; molar units by their prefix;
 * cal_th/(mol·K) → ×4.184.
 * @param unit canonical heat-capacity unit code
 * @param basis sample mass (mg, total units only) and molar mass (g/mol)
 * @returns J/(mol·K) per unit of `unit`
 * @throws IngestError (INVALID_SAMPLE) when a needed mass or molar mass is missing, zero, negative or not finite
 * @see NIST SP 811 (2008) for cal_th = 4.184 J
 */
export function molarHeatCapacityFactor(unit: HeatCapacityUnit, basis: MolarBasis): number {
  const needsMolarMass = unit !== "J/(mol*K)" && unit !== "mJ/(mol*K)" && unit !== "cal/(mol*K)";
  const molarMass = basis.molarMassGPerMol;
  if (needsMolarMass && !(Number.isFinite(molarMass) && molarMass > 0)) {
    throw new IngestError("INVALID_SAMPLE", `the molar mass must be a positive number of g/mol to convert ${unit}, got ${molarMass}`);
  }
  switch (unit) {
    case "J/K":
    case "mJ/K":
    case "uJ/K": {
      const massMg = basis.massMg;
      if (typeof massMg !== "number" || !(Number.isFinite(massMg) && massMg > 0)) {
        throw new IngestError(
          "INVALID_SAMPLE",
          `the sample mass must be a positive number of mg to convert a total heat capacity (${unit}), got ${massMg ?? "none"}`,
        );
      }
      // moles of formula units n = (massMg·1e-3 g)/(M g/mol); C_molar = C_total/n.
      return (totalToJoulePerKelvin(unit) * molarMass) / (massMg * 1e-3);
    }
    case "J/(g*K)":
      return molarMass;
    case "J/(kg*K)":
      return molarMass * 1e-3;
    case "J/(mol*K)":
      return 1;
    case "mJ/(mol*K)":
      return 1e-3;
    case "cal/(mol*K)":
      return THERMOCHEMICAL_CALORIE_J;
  }
}

/**
 * Converts one heat-capacity value to J/(mol·K) per mole of formula units.
 * @param value reading in `unit`
 * @param unit canonical unit code
 * @param basis sample mass (mg) and molar mass (g/mol)
 * @returns J/(mol·K)
 * @throws IngestError (INVALID_SAMPLE) as `molarHeatCapacityFactor`
 */
export function toMolarHeatCapacity(value: number, unit: HeatCapacityUnit, basis: MolarBasis): number {
  return value * molarHeatCapacityFactor(unit, basis);
}

/**
 * Molar heat capacity per mole of atoms from one per mole of formula units.
 * @param valuePerFormulaUnit J/(mol·K) per mole of formula units
 * @param atomsPerFormulaUnit n, atoms in one formula unit (> 0)
 * @returns J/(mol·K) per mole of atoms
 */
export function perMoleOfAtoms(valuePerFormulaUnit: number, atomsPerFormulaUnit: number): number {
  return valuePerFormulaUnit / atomsPerFormulaUnit;
}

const TEMPERATURE_WORDS: Record<string, TemperatureUnit> = {
  k: "K",
  kelvin: "K",
  "°k": "K",
  c: "C",
  "°c": "C",
  "ºc": "C",
  degc: "C",
  "degc.": "C",
  "deg.c": "C",
  celsius: "C",
  "°celsius": "C",
  "degreesc": "C",
  "degreescelsius": "C",
  "degreecelsius": "C",
};
const FIELD_WORDS: Record<string, FieldUnit> = { t: "T", tesla: "T", oe: "Oe", oersted: "Oe" };

const ENERGY: Record<string, { scale: number; calorie: boolean }> = {
  j: { scale: 1, calorie: false },
  mj: { scale: 1e-3, calorie: false },
  uj: { scale: 1e-6, calorie: false },
  cal: { scale: 1, calorie: true },
};
// Longest first, so "mol" is not read as "m" + …, and "kg" before "k".
const ATOMS = ["cal", "mol", "kg", "mj", "uj", "j", "g", "k"];

/**
 * Recognises a unit written in a header: "K", "°C", "T", "Oe", "J/K", "mJ/K", "µJ/K" or "uJ/K",
 * "J/(g·K)", "J/g/K", "J g-1 K-1", "J/kg K", "J/(mol K)", "mJ/mol-K", "cal/(mol·K)", …
 * @param text unit text, without the brackets around it
 * @returns the unit kind and canonical code, or null when it is not one of the supported units
 */
export function parseUnit(text: string): ParsedUnit | null {
  const s = text
    .trim()
    .replace(/[\u00b5\u03bc]/g, "u")
    .replace(/\u207b\u00b9/g, "-1")
    .replace(/\u00b2/g, "2")
    .toLowerCase();
  if (s.length === 0) return null;
  const compact = s.replace(/\s+/g, "");
  if (compact in TEMPERATURE_WORDS) return { kind: "temperature", code: TEMPERATURE_WORDS[compact] };
  if (compact in FIELD_WORDS) return { kind: "field", code: FIELD_WORDS[compact] };
  const powers = parseProduct(s);
  if (powers === null) return null;
  return heatCapacityCode(powers);
}

/** Exponents of each atom (j, mj, uj, cal, mol, g, kg, k) in a unit expression, or null if unreadable. */
function parseProduct(s: string): Map<string, number> | null {
  const powers = new Map<string, number>();
  let i = 0;
  // A "/" puts every following factor without its own exponent in the denominator until ")" closes
  // the group it started in: headers write "J/mol K" for J/(mol·K).
  const signStack: number[] = [1];
  let divide = false;
  const depthSign = (): number => signStack[signStack.length - 1];
  const add = (atom: string, exponent: number): void => {
    powers.set(atom, (powers.get(atom) ?? 0) + exponent);
  };
  while (i < s.length) {
    const ch = s[i];
    if (ch === " " || ch === "*" || ch === "\u00b7" || ch === "\u22c5" || ch === "." || ch === "\u2022" || ch === "\u00d7") {
      i++;
      continue;
    }
    if (ch === "-" && !/[0-9]/.test(s[i + 1] ?? "")) {
      i++;
      continue;
    }
    if (ch === "/") {
      divide = true;
      i++;
      continue;
    }
    if (ch === "(") {
      signStack.push(divide ? -depthSign() : depthSign());
      divide = false;
      i++;
      continue;
    }
    if (ch === ")") {
      if (signStack.length === 1) return null;
      signStack.pop();
      divide = false;
      i++;
      continue;
    }
    const atom = ATOMS.find((a) => s.startsWith(a, i));
    if (atom === undefined) return null;
    i += atom.length;
    const m = /^(?:\^|\*\*)?\(?([+-]?[0-9]+)\)?/.exec(s.slice(i));
    let exponent = 1;
    let explicit = false;
    if (m) {
      exponent = Number(m[1]);
      explicit = true;
      i += m[0].length;
    }
    const sign = divide && !explicit ? -depthSign() : depthSign();
    add(atom, sign * exponent);
    if (explicit) divide = false;
  }
  if (signStack.length !== 1) return null;
  return powers;
}

function heatCapacityCode(powers: Map<string, number>): ParsedUnit | null {
  let energy: string | null = null;
  let amount: "none" | "mol" | "g" | "kg" = "none";
  let kelvin = 0;
  for (const [atom, p] of powers) {
    if (p === 0) continue;
    if (atom in ENERGY) {
      if (energy !== null || p !== 1) return null;
      energy = atom;
    } else if (atom === "k") {
      kelvin = p;
    } else if (atom === "mol" || atom === "g" || atom === "kg") {
      if (amount !== "none" || p !== -1) return null;
      amount = atom;
    }
  }
  if (energy === null || kelvin !== -1) return null;
  const code = (() => {
    if (amount === "none") return energy === "j" ? "J/K" : energy === "mj" ? "mJ/K" : energy === "uj" ? "uJ/K" : null;
    if (amount === "g") return energy === "j" ? "J/(g*K)" : null;
    if (amount === "kg") return energy === "j" ? "J/(kg*K)" : null;
    return energy === "j" ? "J/(mol*K)" : energy === "mj" ? "mJ/(mol*K)" : energy === "cal" ? "cal/(mol*K)" : null;
  })() as HeatCapacityUnit | null;
  return code === null ? null : { kind: "heatCapacity", code };
}

/** A header cell split into its name and its unit. */
export interface HeaderLabel {
  /** The name without the unit, trimmed ("Heat Capacity" from "Heat Capacity [mJ/K]"). */
  label: string;
  /** The unit text as written, or null when the cell carries none. */
  unitText: string | null;
  unit: ParsedUnit | null;
}

/**
 * Splits "Temperature (K)", "Cp [uJ/K]", "T/K", "Field (Oe)" into name and unit.
 * A trailing (…) or […] is always taken as the unit text; "name/unit" only when the part after the
 * last "/" is a recognised unit (so "C/T (mJ/mol K2)" keeps "C/T" as its name).
 * @param header one header cell
 * @returns name, unit text and the recognised unit
 */
export function splitHeaderLabel(header: string): HeaderLabel {
  const h = header.trim();
  const bracket = /^(.*?)\s*[([]([^()[\]]*(?:\([^()]*\)[^()[\]]*)*)[)\]]\s*$/.exec(h);
  if (bracket && bracket[1].length > 0) {
    return { label: bracket[1].trim(), unitText: bracket[2].trim(), unit: parseUnit(bracket[2]) };
  }
  const slash = h.indexOf("/");
  if (slash > 0) {
    const unitText = h.slice(slash + 1).trim();
    const unit = parseUnit(unitText);
    const label = h.slice(0, slash).trim();
    // "C/T" is heat capacity over temperature, not C in tesla: a field unit needs a field name.
    const fieldName = /^(field|magnetic field|h|b|mu0h|\u00b50h|\u03bc0h)$/i.test(label);
    if (unit !== null && (unit.kind !== "field" || fieldName)) return { label, unitText, unit };
  }
  const underscore = /^(.*[A-Za-z])_([A-Za-z\u00b5\u03bc°][^_]*)$/.exec(h);
  if (underscore) {
    const unit = parseUnit(underscore[2]);
    if (unit !== null) return { label: underscore[1].trim(), unitText: underscore[2], unit };
  }
  return { label: h, unitText: null, unit: null };
}
