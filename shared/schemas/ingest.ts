import { z } from "zod";

/*
 * Shapes of a run import: how a calorimeter export's columns and units are read (the mapping a user
 * confirms, or saves as a named preset), and what a preview returns (the table as read, the proposed
 * mapping, the reduced runs and plausibility warnings). Used by the server routes and the client forms.
 */

/** Temperature unit of a file column: kelvin or degree Celsius. */
export const TemperatureUnitSchema = z.enum(["K", "C"]);
export type TemperatureUnit = z.infer<typeof TemperatureUnitSchema>;

/**
 * Canonical heat-capacity unit codes. Total: J/K, mJ/K, uJ/K (u = micro). Specific: J/(g*K),
 * J/(kg*K). Molar (per mole of formula units): J/(mol*K), mJ/(mol*K), cal/(mol*K) (thermochemical).
 */
export const HEAT_CAPACITY_UNITS = [
  "J/K",
  "mJ/K",
  "uJ/K",
  "J/(g*K)",
  "J/(kg*K)",
  "J/(mol*K)",
  "mJ/(mol*K)",
  "cal/(mol*K)",
] as const;
export const CanonicalHeatCapacityUnitSchema = z.enum(HEAT_CAPACITY_UNITS);
export type HeatCapacityUnit = z.infer<typeof CanonicalHeatCapacityUnitSchema>;

/** Accepts the canonical codes, and "µJ/K" (micro sign or Greek mu), stored as "uJ/K". */
export const HeatCapacityUnitSchema = z.union([
  CanonicalHeatCapacityUnitSchema,
  z.enum(["\u00b5J/K", "\u03bcJ/K"]).transform((): HeatCapacityUnit => "uJ/K"),
]);

/** Magnetic field unit of a file column: tesla (µ0H) or oersted. */
export const FieldUnitSchema = z.enum(["T", "Oe"]);
export type FieldUnit = z.infer<typeof FieldUnitSchema>;

/** How the uncertainty column is expressed: in heat-capacity units, as a fraction of Cp, or in percent of Cp. */
export const SigmaScaleSchema = z.enum(["absolute", "fraction", "percent"]);
export type SigmaScale = z.infer<typeof SigmaScaleSchema>;

const ColumnName = z.string().min(1, "Name the column").max(200);

/**
 * Which file column holds what, and in which unit. Column names are the header names as the reader
 * returns them (`DelimitedTable.header`). σ and the per-point addenda column are in the heat-capacity
 * unit (σ may instead be a fraction or percent of Cp, see `sigmaScale`).
 */
export const ImportMappingSchema = z
  .object({
    columns: z.object({
      temperature: ColumnName,
      heatCapacity: ColumnName,
      sigma: ColumnName.optional(),
      field: ColumnName.optional(),
      addenda: ColumnName.optional(),
    }),
    units: z.object({
      temperature: TemperatureUnitSchema,
      heatCapacity: HeatCapacityUnitSchema,
      field: FieldUnitSchema.optional(),
    }),
    /** Absent means "absolute". */
    sigmaScale: SigmaScaleSchema.optional(),
    /** Field values within this many tesla of a run's first value belong to that run; absent: 0.05 T. */
    fieldToleranceT: z.number().positive().max(10).optional(),
    /** Points whose temperatures differ by at most this fraction are averaged; absent: 1e-4. */
    temperatureToleranceRelative: z.number().min(0).max(0.01).optional(),
  })
  .superRefine((m, ctx) => {
    if (m.columns.field !== undefined && m.units.field === undefined) {
      ctx.addIssue({ code: "custom", path: ["units", "field"], message: "Choose the unit of the field column" });
    }
    const seen = new Map<string, string>();
    for (const [role, name] of Object.entries(m.columns)) {
      if (name === undefined) continue;
      const other = seen.get(name);
      if (other !== undefined) {
        ctx.addIssue({
          code: "custom",
          path: ["columns", role],
          message: `Column '${name}' is already used for ${other}`,
        });
      }
      seen.set(name, role);
    }
  });
export type ImportMapping = z.infer<typeof ImportMappingSchema>;
export type ImportMappingInput = z.input<typeof ImportMappingSchema>;

/** A lab's saved column map and unit set. */
export const ImportPresetSchema = z.object({
  id: z.string(),
  name: z.string(),
  mapping: ImportMappingSchema,
  createdAt: z.string(),
});
export type ImportPreset = z.infer<typeof ImportPresetSchema>;

export const CreateImportPresetBody = z.object({
  name: z.string().trim().min(1, "Name the preset").max(80, "Use at most 80 characters"),
  mapping: ImportMappingSchema,
});
export type CreateImportPresetBody = z.infer<typeof CreateImportPresetBody>;

/** A unit recognised in a header cell. */
export const ParsedUnitSchema = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("temperature"), code: TemperatureUnitSchema }),
  z.object({ kind: z.literal("heatCapacity"), code: CanonicalHeatCapacityUnitSchema }),
  z.object({ kind: z.literal("field"), code: FieldUnitSchema }),
]);
export type ParsedUnit = z.infer<typeof ParsedUnitSchema>;

export const DelimiterSchema = z.enum([",", ";", "\t", "whitespace"]);
export type Delimiter = z.infer<typeof DelimiterSchema>;
export const DecimalMarkSchema = z.enum([".", ","]);
export type DecimalMark = z.infer<typeof DecimalMarkSchema>;

/** What the reader found, without the full row list: for the import dialog's first-rows table. */
export const TableSummarySchema = z.object({
  header: z.array(z.string()),
  /** 1-based line of the column names; null when the file has none (columns are then "Column 1", …). */
  headerLine: z.number().int().nullable(),
  /** 1-based line of a separate row of units under the names, if any. */
  unitsLine: z.number().int().nullable(),
  unitTexts: z.array(z.string().nullable()),
  units: z.array(ParsedUnitSchema.nullable()),
  columnKinds: z.array(z.enum(["number", "text"])),
  delimiter: DelimiterSchema,
  decimalMark: DecimalMarkSchema,
  preamble: z.array(z.string()),
  rowCount: z.number().int(),
  firstRows: z.array(z.object({ line: z.number().int(), cells: z.array(z.string()) })),
});
export type TableSummary = z.infer<typeof TableSummarySchema>;

const MappingColumnsDraft = z.object({
  temperature: z.string().optional(),
  heatCapacity: z.string().optional(),
  sigma: z.string().optional(),
  field: z.string().optional(),
  addenda: z.string().optional(),
});
const MappingUnitsDraft = z.object({
  temperature: TemperatureUnitSchema.optional(),
  heatCapacity: CanonicalHeatCapacityUnitSchema.optional(),
  field: FieldUnitSchema.optional(),
});

/** A mapping proposed from the header words and units. */
export const MappingProposalSchema = z.object({
  /** The complete mapping, or null when a column or unit could not be placed (see `needs`). */
  mapping: ImportMappingSchema.nullable(),
  columns: MappingColumnsDraft,
  units: MappingUnitsDraft,
  sigmaScale: SigmaScaleSchema.optional(),
  /** Header names given no role. */
  unplaced: z.array(z.string()),
  /** Choices still to make, as mapping paths: "columns.heatCapacity", "units.heatCapacity", … */
  needs: z.array(z.string()),
  /** Choices made without support in the header, e.g. "units.temperature" defaulted to K. */
  assumed: z.array(z.string()),
});
export type MappingProposal = z.infer<typeof MappingProposalSchema>;

export const IngestWarningCodeSchema = z.enum([
  "ABOVE_DULONG_PETIT",
  "NEGATIVE_HEAT_CAPACITY",
  "TEMPERATURE_OUT_OF_RANGE",
  "NON_MONOTONIC_SCAN",
  "FEW_POINTS",
  "OUTSIDE_ADDENDA_RANGE",
  "ZERO_SIGMA",
  "UNIT_DIFFERS_FROM_HEADER",
]);
export type IngestWarningCode = z.infer<typeof IngestWarningCodeSchema>;

/** A plausibility warning: the data are read, but a scientist should look. */
export const IngestWarningSchema = z.object({
  code: IngestWarningCodeSchema,
  message: z.string(),
  /** How many points (or rows) it concerns. */
  count: z.number().int(),
  /** File lines of the first few points concerned (at most 10). */
  lines: z.array(z.number().int()),
});
export type IngestWarning = z.infer<typeof IngestWarningSchema>;

/** One reduced point: molar heat capacity per mole of formula units. */
export const ReducedPointSchema = z.object({
  temperatureK: z.number(),
  /** J/(mol·K) per mole of formula units. */
  heatCapacity: z.number(),
  /** Standard uncertainty, J/(mol·K); null when the file gave none. */
  sigma: z.number().nullable(),
  /** First (smallest) file line of the rows averaged into this point. */
  sourceLine: z.number().int(),
  rowsAveraged: z.number().int(),
  /** True when an attached addenda run did not cover this temperature: the point is not corrected. */
  outsideAddendaRange: z.boolean(),
});
export type ReducedPoint = z.infer<typeof ReducedPointSchema>;

export const ReducedRunSchema = z.object({
  /** Mean field of the run in tesla; null when the file has no field column. */
  fieldT: z.number().nullable(),
  points: z.array(ReducedPointSchema),
  warnings: z.array(IngestWarningSchema),
});
export type ReducedRun = z.infer<typeof ReducedRunSchema>;

/** The body of a run-upload preview. */
export const ImportPreviewSchema = z.object({
  table: TableSummarySchema,
  proposal: MappingProposalSchema,
  /** The mapping the runs were reduced with (the request's, else the complete proposal); null if none. */
  mapping: ImportMappingSchema.nullable(),
  runs: z.array(ReducedRunSchema),
});
export type ImportPreview = z.infer<typeof ImportPreviewSchema>;
