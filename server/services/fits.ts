import { createHash, randomUUID } from "node:crypto";
import { readFileSync } from "node:fs";
import { and, asc, desc, eq, sql } from "drizzle-orm";
import type { Db } from "../db/client";
import { fitParameters, fits, runPoints, runs, samples, users } from "../db/schema";
import { HttpError, notFound, unprocessable } from "../http-error";

/** The version stored with every fit: package.json "version" of this build. */
export const SOFTWARE_VERSION: string = (
  JSON.parse(readFileSync(new URL("../../package.json", import.meta.url), "utf8")) as { version: string }
).version;

/** One reduced point as the fit uses it (SI: K and J/(mol·K) per mole of formula units). */
export interface FitInputPoint {
  temperatureK: number;
  cp: number;
  sigma: number;
}

/** The header line of the canonical fit input; part of the hashed text, and versioned so the rule can change visibly. */
export const CANONICAL_INPUT_HEADER = "thetafold-fit-input v1\nT_K,Cp_J_per_mol_K,sigma_J_per_mol_K\n";

/** 17 significant digits (enough to round-trip any float64), exponent with sign and without leading zeros. */
function canonicalNumber(x: number): string {
  return x.toExponential(16);
}

/**
 * The exact text whose SHA-256 a fit stores as `inputSha256`, so anyone holding the reduced table can
 * check which points a fit used. UTF-8, lines ending in "\n":
 *
 *     thetafold-fit-input v1
 *     T_K,Cp_J_per_mol_K,sigma_J_per_mol_K
 *     <T>,<Cp>,<sigma>          one line per point used, in the run's point order (ascending T)
 *
 * Points used are those with window[0] ≤ T ≤ window[1] that were not masked when the fit ran. σ is the
 * σ the fit weighted with. Each number is written with 17 significant digits in exponent form, as
 * JavaScript's `x.toExponential(16)`: `2.9814999999999998e+2`, `1.0000000000000000e-3`. In Python:
 * `m, e = f"{x:.16e}".split("e"); f"{m}e{int(e):+d}"`.
 * @param points the points used, in order
 * @returns the canonical text
 */
export function canonicalFitInput(points: readonly FitInputPoint[]): string {
  let out = CANONICAL_INPUT_HEADER;
  for (const p of points) out += `${canonicalNumber(p.temperatureK)},${canonicalNumber(p.cp)},${canonicalNumber(p.sigma)}\n`;
  return out;
}

/**
 * SHA-256 (lowercase hex) of canonicalFitInput(points).
 * @param points the points used, in order
 * @returns 64 hex digits
 */
export function fitInputSha256(points: readonly FitInputPoint[]): string {
  return createHash("sha256").update(canonicalFitInput(points), "utf8").digest("hex");
}
