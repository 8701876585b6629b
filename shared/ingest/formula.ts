/*
 * Molar mass and atoms per formula unit of a sample from its chemical formula, with mf-parser
 * (atomic weights from its own element table, which follows the IUPAC standard atomic weights).
 */
import { MF } from "mf-parser";
import { IngestError } from "./ingest-error";

/** What a formula gives the reduction. */
export interface FormulaInfo {
  /** Molar mass of one formula unit, g/mol. */
  molarMassGPerMol: number;
  /** Atoms in one formula unit (may be fractional for substitution series, e.g. 2 for Fe0.5Co0.5Si). */
  atomsPerFormulaUnit: number;
  /** Atoms per formula unit of each element. */
  elements: Record<string, number>;
}

const SUBSCRIPTS = "\u2080\u2081\u2082\u2083\u2084\u2085\u2086\u2087\u2088\u2089";

/**
 * Rewrites "CuSO4·5H2O" as "CuSO4(H2O)5": mf-parser reads "·", "*" and spaces in ways that do not
 * add hydrate parts (it gives H2O21 for CuSO4·5H2O), but it reads parentheses with a count correctly.
 */
function joinParts(text: string, original: string): string {
  const parts = text.replace(/\s+/g, "").split(/[\u00b7\u2022\u2219\u22c5*]/);
  if (parts.length === 1 && !/^[0-9]/.test(parts[0])) return parts[0];
  return parts
    .map((part) => {
      const m = /^([0-9]+(?:\.[0-9]+)?)?(.*)$/.exec(part)!;
      if (m[2] === "") throw new IngestError("INVALID_FORMULA", `'${original}': a part of the formula is empty or only a number`);
      return m[1] === undefined ? `(${m[2]})` : `(${m[2]})${m[1]}`;
    })
    .join("");
}

/** Largest atoms per formula unit a formula or override may give (large unit cells stay far below). */
export const MAX_ATOMS_PER_FORMULA_UNIT = 1e4;
/** Largest molar mass per formula unit, g/mol. */
export const MAX_MOLAR_MASS_G_PER_MOL = 1e6;

/**
 * Parses a formula such as "Cu", "Al2O3", "Ba8Ga16Ge30", "(Ba0.9Sr0.1)8Ga16Ge30", "CuSO4·5H2O".
 * Hydrate parts are joined with "·" or "*" ("CuSO4.5H2O" reads 4.5 as a number). Unicode subscript
 * digits are read as digits.
 * @param formula the formula as the user typed it
 * @returns molar mass (g/mol), atoms per formula unit and the element counts
 * @throws IngestError (INVALID_FORMULA) for an empty formula, an unknown element, lower-case or other
 *   characters a formula does not have, charges, zero or negative counts, or an element without a
 *   standard atomic weight (e.g. Tc: give the molar mass by hand), or more than MAX_ATOMS_PER_FORMULA_UNIT atoms
 *   or MAX_MOLAR_MASS_G_PER_MOL per formula unit
 */
export function parseFormula(formula: string): FormulaInfo {
  const text = formula.trim().replace(/[\u2080-\u2089]/g, (d) => String(SUBSCRIPTS.indexOf(d)));
  if (text.length === 0) throw new IngestError("INVALID_FORMULA", "enter a formula, e.g. Cu or Ba8Ga16Ge30");
  const bad = /[^A-Za-z0-9.()\u00b7\u2022\u2219\u22c5*\s]/.exec(text);
  if (bad) {
    const what = bad[0] === "+" || bad[0] === "-" ? "charges and minus signs are not part of a solid's formula" : `'${bad[0]}' is not part of a formula`;
    throw new IngestError("INVALID_FORMULA", `'${formula}': ${what}`);
  }
  if (!/^[A-Z(]/.test(text.replace(/^[0-9.\s]+/, ""))) {
    throw new IngestError("INVALID_FORMULA", `'${formula}': element symbols start with a capital letter (Cu, not cu)`);
  }
  let info: { mass: number; charge: number; atoms: Record<string, number> };
  try {
    info = new MF(joinParts(text, formula)).getInfo() as unknown as typeof info;
  } catch (e) {
    if (e instanceof IngestError) throw e;
    const raw = e instanceof Error ? e.message.split("\n")[0] : String(e);
    const reason = /lowercase/i.test(raw)
      ? "element symbols start with a capital letter followed by at most one lower-case letter (Cu, not cu or CU1x)"
      : /unknown element/i.test(raw)
        ? raw.replace(/^Unknown element: /i, "unknown element ")
        : /parenthesis/i.test(raw)
          ? "the parentheses do not match"
          : raw;
    throw new IngestError("INVALID_FORMULA", `'${formula}': ${reason}`);
  }
  if (info.charge !== 0) {
    throw new IngestError("INVALID_FORMULA", `'${formula}': charges are not part of a solid's formula`);
  }
  const elements: Record<string, number> = {};
  let atoms = 0;
  for (const [symbol, count] of Object.entries(info.atoms)) {
    if (!(Number.isFinite(count) && count > 0)) {
      throw new IngestError("INVALID_FORMULA", `'${formula}': ${symbol} has a count of ${count}; counts must be positive`);
    }
    const weight = (new MF(symbol).getInfo() as unknown as { mass: number }).mass;
    if (!(weight > 0)) {
      throw new IngestError(
        "INVALID_FORMULA",
        `'${formula}': ${symbol} has no standard atomic weight (no stable isotopes); enter the molar mass by hand`,
      );
    }
    elements[symbol] = count;
    atoms += count;
  }
  if (atoms === 0 || !(info.mass > 0)) throw new IngestError("INVALID_FORMULA", `'${formula}' contains no elements`);
  // The same ceilings as a hand-entered override (shared/schemas/samples.ts): beyond them the formula is a typo.
  if (atoms > MAX_ATOMS_PER_FORMULA_UNIT || info.mass > MAX_MOLAR_MASS_G_PER_MOL) {
    throw new IngestError(
      "INVALID_FORMULA",
      `'${formula}': ${atoms} atoms and ${info.mass.toPrecision(4)} g/mol per formula unit is beyond any crystal's formula unit (at most ${MAX_ATOMS_PER_FORMULA_UNIT} atoms, ${MAX_MOLAR_MASS_G_PER_MOL} g/mol)`,
    );
  }
  return { molarMassGPerMol: info.mass, atomsPerFormulaUnit: atoms, elements };
}
