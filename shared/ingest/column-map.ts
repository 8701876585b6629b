/*
 * Proposes which column is temperature, heat capacity, its uncertainty, the field and a per-point
 * addenda, from the words and units of the header. A proposal only: the user confirms it.
 */
import type { ImportMapping, MappingProposal, ParsedUnit, SigmaScale } from "@shared/schemas/ingest";
import { splitHeaderLabel } from "./units";

const ADDENDA_WORDS = new Set(["addenda", "addendum", "addendas"]);
const SIGMA_WORDS = new Set([
  "error",
  "errors",
  "err",
  "uncertainty",
  "unc",
  "sigma",
  "\u03c3",
  "std",
  "stdev",
  "stddev",
  "sd",
  "dev",
  "deviation",
  "esd",
  "\u00b1",
]);
const FIELD_WORDS = new Set(["field", "h", "b", "mu0h", "\u00b50h", "\u03bc0h", "magnetic", "magnet"]);
const TEMPERATURE_WORDS = new Set(["temperature", "temp", "t", "temperatures"]);
const HEAT_CAPACITY_WORDS = new Set(["cp", "c", "hc", "capacity", "heatcapacity", "c_p"]);

/** Lower-case words of a header name; "SampleTemp" → sample, temp; "Cp±" → cp, ±. */
function words(label: string): string[] {
  return label
    .replace(/([a-z])([A-Z])/g, "$1 $2")
    .toLowerCase()
    .replace(/\u00b1/g, " \u00b1 ")
    .split(/[^a-z0-9\u00b5\u03bc\u03c3\u00b1]+/)
    .filter((w) => w.length > 0);
}

function has(ws: readonly string[], set: ReadonlySet<string>): boolean {
  return ws.some((w) => set.has(w));
}

interface Candidate {
  index: number;
  name: string;
  ws: string[];
  unit: ParsedUnit | null;
  unitText: string | null;
  derived: boolean;
}

/**
 * Proposes a mapping from header names and the units found in them.
 * Rules: addenda/addendum → addenda; error/uncertainty/sigma/std/± → uncertainty of Cp (not when it
 * names a temperature); field/H/B (or a field unit) → field; temperature/temp/T (or a temperature unit)
 * → temperature; heat capacity/Cp/C/HC (or a heat-capacity unit) → heat capacity. A name with a "/" in
 * it ("C/T") is a derived quantity and is not placed. Among several candidates one naming "sample" wins,
 * then the leftmost. A unit written in the header must be of the role's kind.
 * A temperature column without a unit is assumed to be in K (listed in `assumed`); a missing
 * heat-capacity or field unit is listed in `needs`.
 * @param header column names (DelimitedTable.header)
 * @param units recognised units per column (DelimitedTable.units), same length
 * @returns the proposal; `mapping` is set only when nothing is left in `needs`
 */
export function proposeMapping(header: readonly string[], units: readonly (ParsedUnit | null)[]): MappingProposal {
  const candidates: Candidate[] = header.map((name, index) => {
    const split = splitHeaderLabel(name);
    return {
      index,
      name,
      ws: words(split.label),
      unit: units[index] ?? split.unit,
      unitText: split.unitText,
      derived: split.label.includes("/"),
    };
  });
  const taken = new Set<number>();
  const pick = (accept: (c: Candidate) => boolean): Candidate | undefined => {
    const open = candidates.filter((c) => !taken.has(c.index) && !c.derived && accept(c));
    const chosen = open.find((c) => c.ws.includes("sample") || c.ws.includes("samp")) ?? open[0];
    if (chosen) taken.add(chosen.index);
    return chosen;
  };
  const plain = (c: Candidate): boolean => !has(c.ws, SIGMA_WORDS) && !has(c.ws, ADDENDA_WORDS);
  const unitOk = (c: Candidate, kind: ParsedUnit["kind"]): boolean =>
    c.unit !== null ? c.unit.kind === kind : c.unitText === null || c.unitText === "";

  const addenda = pick((c) => has(c.ws, ADDENDA_WORDS) && unitOk(c, "heatCapacity"));
  const sigma = pick(
    (c) =>
      has(c.ws, SIGMA_WORDS) &&
      !has(c.ws, TEMPERATURE_WORDS) &&
      !has(c.ws, FIELD_WORDS) &&
      (unitOk(c, "heatCapacity") || c.unitText === "%"),
  );
  const field = pick((c) => plain(c) && ((has(c.ws, FIELD_WORDS) && unitOk(c, "field")) || c.unit?.kind === "field"));
  const temperature = pick(
    (c) => plain(c) && ((has(c.ws, TEMPERATURE_WORDS) && unitOk(c, "temperature")) || c.unit?.kind === "temperature"),
  );
  const heatCapacity = pick(
    (c) =>
      plain(c) &&
      (((has(c.ws, HEAT_CAPACITY_WORDS) || (c.ws.includes("heat") && c.ws.includes("capacity"))) &&
        unitOk(c, "heatCapacity")) ||
        c.unit?.kind === "heatCapacity"),
  );

  const columns: MappingProposal["columns"] = {};
  const unitsOut: MappingProposal["units"] = {};
  const needs: string[] = [];
  const assumed: string[] = [];
  let sigmaScale: SigmaScale | undefined;

  if (temperature) {
    columns.temperature = temperature.name;
    if (temperature.unit?.kind === "temperature") unitsOut.temperature = temperature.unit.code;
    else {
      unitsOut.temperature = "K";
      assumed.push("units.temperature");
    }
  } else needs.push("columns.temperature");

  if (heatCapacity) {
    columns.heatCapacity = heatCapacity.name;
    if (heatCapacity.unit?.kind === "heatCapacity") unitsOut.heatCapacity = heatCapacity.unit.code;
  } else needs.push("columns.heatCapacity");
  const cpUnit = heatCapacity?.unit?.kind === "heatCapacity" ? heatCapacity.unit.code : undefined;
  if (cpUnit === undefined) {
    // σ or addenda in a stated unit tell the Cp unit when Cp itself has none.
    const hint = [sigma, addenda].find((c) => c?.unit?.kind === "heatCapacity")?.unit;
    if (heatCapacity && hint?.kind === "heatCapacity") {
      unitsOut.heatCapacity = hint.code;
      assumed.push("units.heatCapacity");
    } else needs.push("units.heatCapacity");
  }

  const unplaced: string[] = [];
  const sameUnit = (c: Candidate): boolean =>
    c.unit === null || unitsOut.heatCapacity === undefined || (c.unit.kind === "heatCapacity" && c.unit.code === unitsOut.heatCapacity);
  if (sigma) {
    if (sigma.unitText === "%") {
      columns.sigma = sigma.name;
      sigmaScale = "percent";
    } else if (sameUnit(sigma)) columns.sigma = sigma.name;
    else taken.delete(sigma.index);
  }
  if (addenda) {
    if (sameUnit(addenda)) columns.addenda = addenda.name;
    else taken.delete(addenda.index);
  }
  if (field) {
    columns.field = field.name;
    if (field.unit?.kind === "field") unitsOut.field = field.unit.code;
    else needs.push("units.field");
  }
  for (const c of candidates) if (!Object.values(columns).includes(c.name)) unplaced.push(c.name);

  let mapping: ImportMapping | null = null;
  if (needs.length === 0 && columns.temperature && columns.heatCapacity && unitsOut.temperature && unitsOut.heatCapacity) {
    mapping = {
      columns: {
        temperature: columns.temperature,
        heatCapacity: columns.heatCapacity,
        ...(columns.sigma !== undefined ? { sigma: columns.sigma } : {}),
        ...(columns.field !== undefined ? { field: columns.field } : {}),
        ...(columns.addenda !== undefined ? { addenda: columns.addenda } : {}),
      },
      units: {
        temperature: unitsOut.temperature,
        heatCapacity: unitsOut.heatCapacity,
        ...(unitsOut.field !== undefined ? { field: unitsOut.field } : {}),
      },
      ...(sigmaScale !== undefined ? { sigmaScale } : {}),
    };
  }
  return {
    mapping,
    columns,
    units: unitsOut,
    ...(sigmaScale !== undefined ? { sigmaScale } : {}),
    unplaced,
    needs,
    assumed,
  };
}
