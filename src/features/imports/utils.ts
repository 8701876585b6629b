import {
  HEAT_CAPACITY_UNITS,
  ImportMappingSchema,
  type FieldUnit,
  type HeatCapacityUnit,
  type ImportMapping,
  type MappingProposal,
  type SigmaScale,
  type TemperatureUnit,
} from "@shared/schemas/ingest";

/** What a file column is used for in the import dialog. */
export type ColumnRole = "temperature" | "heatCapacity" | "sigma" | "field" | "addenda" | "ignore";
export type MappedRole = Exclude<ColumnRole, "ignore">;

export const COLUMN_ROLES: readonly { value: ColumnRole; label: string }[] = [
  { value: "ignore", label: "Not used" },
  { value: "temperature", label: "Temperature" },
  { value: "heatCapacity", label: "Heat capacity" },
  { value: "sigma", label: "Uncertainty of heat capacity" },
  { value: "field", label: "Magnetic field" },
  { value: "addenda", label: "Addenda (per point)" },
];

export const ROLE_LABELS: Record<MappedRole, string> = {
  temperature: "temperature",
  heatCapacity: "heat capacity",
  sigma: "uncertainty",
  field: "field",
  addenda: "addenda",
};

/** How each heat-capacity unit code reads on screen. */
export const HEAT_CAPACITY_UNIT_LABELS: Record<HeatCapacityUnit, string> = {
  "J/K": "J/K (whole piece)",
  "mJ/K": "mJ/K (whole piece)",
  "uJ/K": "µJ/K (whole piece)",
  "J/(g*K)": "J/(g·K)",
  "J/(kg*K)": "J/(kg·K)",
  "J/(mol*K)": "J/(mol·K)",
  "mJ/(mol*K)": "mJ/(mol·K)",
  "cal/(mol*K)": "cal/(mol·K) (thermochemical)",
};

export const HEAT_CAPACITY_UNIT_OPTIONS = HEAT_CAPACITY_UNITS.map((u) => ({ value: u, label: HEAT_CAPACITY_UNIT_LABELS[u] }));
export const TEMPERATURE_UNIT_OPTIONS: readonly { value: TemperatureUnit; label: string }[] = [
  { value: "K", label: "K" },
  { value: "C", label: "°C" },
];
export const FIELD_UNIT_OPTIONS: readonly { value: FieldUnit; label: string }[] = [
  { value: "T", label: "T (µ0H)" },
  { value: "Oe", label: "Oe" },
];
export const SIGMA_SCALE_OPTIONS: readonly { value: SigmaScale; label: string }[] = [
  { value: "absolute", label: "in heat-capacity units" },
  { value: "percent", label: "percent of the value" },
  { value: "fraction", label: "fraction of the value" },
];

/** A column map being edited: any part may still be missing. */
export interface MappingDraft {
  columns: Partial<Record<MappedRole, string>>;
  units: { temperature?: TemperatureUnit; heatCapacity?: HeatCapacityUnit; field?: FieldUnit };
  sigmaScale?: SigmaScale;
}

export const EMPTY_DRAFT: MappingDraft = { columns: {}, units: {} };

/** The dialog's starting point: what the server proposed from the header. */
export function draftFromProposal(p: MappingProposal): MappingDraft {
  return {
    columns: Object.fromEntries(Object.entries(p.columns).filter(([, v]) => v !== undefined)) as MappingDraft["columns"],
    units: Object.fromEntries(Object.entries(p.units).filter(([, v]) => v !== undefined)) as MappingDraft["units"],
    sigmaScale: p.sigmaScale,
  };
}

/** A saved mapping (a preset, or the one a run was read with) as a draft. */
export function draftFromMapping(m: ImportMapping): MappingDraft {
  return {
    columns: Object.fromEntries(Object.entries(m.columns).filter(([, v]) => v !== undefined)) as MappingDraft["columns"],
    units: Object.fromEntries(Object.entries(m.units).filter(([, v]) => v !== undefined)) as MappingDraft["units"],
    sigmaScale: m.sigmaScale,
  };
}

/** The role a column has in the draft. */
export function roleOfColumn(draft: MappingDraft, column: string): ColumnRole {
  for (const [role, name] of Object.entries(draft.columns)) if (name === column) return role as MappedRole;
  return "ignore";
}

/**
 * Gives a column a role. A role belongs to one column only: the column that had it is set to "not used".
 * @returns a new draft
 */
export function assignRole(draft: MappingDraft, column: string, role: ColumnRole): MappingDraft {
  const columns: MappingDraft["columns"] = {};
  for (const [r, name] of Object.entries(draft.columns) as [MappedRole, string][]) {
    if (name !== column && r !== role) columns[r] = name;
  }
  if (role !== "ignore") columns[role] = column;
  const units = { ...draft.units };
  if (!columns.field) delete units.field;
  return { ...draft, columns, units };
}

/** The checked mapping, or the choices still to make, in words. */
export function draftToMapping(draft: MappingDraft): { mapping: ImportMapping; problems: [] } | { mapping: null; problems: string[] } {
  const problems: string[] = [];
  if (!draft.columns.temperature) problems.push("Choose the temperature column.");
  if (!draft.columns.heatCapacity) problems.push("Choose the heat-capacity column.");
  if (!draft.units.temperature) problems.push("Choose the temperature unit.");
  if (!draft.units.heatCapacity) problems.push("Choose the heat-capacity unit.");
  if (draft.columns.field && !draft.units.field) problems.push("Choose the unit of the field column.");
  if (problems.length > 0) return { mapping: null, problems };
  const parsed = ImportMappingSchema.safeParse({
    columns: draft.columns,
    units: draft.units,
    ...(draft.columns.sigma && draft.sigmaScale && draft.sigmaScale !== "absolute" ? { sigmaScale: draft.sigmaScale } : {}),
  });
  if (!parsed.success) return { mapping: null, problems: parsed.error.issues.map((i) => i.message) };
  return { mapping: parsed.data, problems: [] };
}

/** Columns a preset names that this file does not have. */
export function missingColumns(mapping: ImportMapping, header: readonly string[]): string[] {
  return Object.values(mapping.columns).filter((c): c is string => c !== undefined && !header.includes(c));
}

/** 1234567 → "1.2 MB". */
export function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} kB`;
  return `${(bytes / (1024 * 1024)).toFixed(1)} MB`;
}

/** The server's size limit for one upload (server/routes/runs.ts MAX_UPLOAD_BYTES). */
export const MAX_UPLOAD_BYTES = 20 * 1024 * 1024;

/** "4.2 T" for a run's field; "zero field" near 0. */
export function formatField(fieldT: number | null): string {
  if (fieldT === null) return "no field column";
  if (Math.abs(fieldT) < 5e-4) return "0 T";
  return `${Number(fieldT.toPrecision(4))} T`;
}
