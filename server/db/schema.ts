import { index, integer, primaryKey, real, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";

/*
 * The whole Thetafold schema. Times are integer milliseconds since the Unix epoch (`…At` keys),
 * except `sessions.expiresAt`, which lucia's adapter stores as Unix seconds. Physical quantities are
 * SI unless the column name carries its unit (`massMg`, `molarMassGPerMol`).
 */

const id = () => text("id").primaryKey();
const createdAt = () => integer("created_at").notNull();

export const users = sqliteTable("users", {
  id: id(),
  email: text("email").notNull().unique(),
  displayName: text("display_name").notNull(),
  passwordHash: text("password_hash").notNull(),
  isSiteAdmin: integer("is_site_admin", { mode: "boolean" }).notNull().default(false),
  createdAt: createdAt(),
});

export const sessions = sqliteTable("sessions", {
  id: text("id").primaryKey(),
  userId: text("user_id")
    .notNull()
    .references(() => users.id, { onDelete: "cascade" }),
  expiresAt: integer("expires_at").notNull(),
});

export const labs = sqliteTable("labs", {
  id: id(),
  name: text("name").notNull(),
  organisation: text("organisation").notNull().default(""),
  contactEmail: text("contact_email").notNull().default(""),
  createdAt: createdAt(),
});

export const memberships = sqliteTable(
  "memberships",
  {
    labId: text("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    role: text("role", { enum: ["lead", "researcher", "guest"] }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.labId, t.userId] }), index("memberships_user_idx").on(t.userId)],
);

export const invitations = sqliteTable(
  "invitations",
  {
    id: id(),
    labId: text("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    email: text("email").notNull(),
    role: text("role", { enum: ["lead", "researcher", "guest"] }).notNull(),
    tokenHash: text("token_hash").notNull().unique(),
    invitedBy: text("invited_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    expiresAt: integer("expires_at").notNull(),
    acceptedAt: integer("accepted_at"),
  },
  (t) => [index("invitations_lab_idx").on(t.labId)],
);

export const passwordResets = sqliteTable("password_resets", {
  id: id(),
  userId: text("user_id")
    .notNull()
    .references(() => users.id, { onDelete: "cascade" }),
  tokenHash: text("token_hash").notNull().unique(),
  createdAt: createdAt(),
  expiresAt: integer("expires_at").notNull(),
  usedAt: integer("used_at"),
});

/** Messages received by the in-process fake SMTP server (local default only). */
export const mailMessages = sqliteTable("mail_messages", {
  id: id(),
  from: text("from_address").notNull(),
  to: text("to_address").notNull(),
  subject: text("subject").notNull(),
  text: text("text_body").notNull(),
  raw: text("raw").notNull(),
  receivedAt: integer("received_at").notNull(),
});

export const auditLog = sqliteTable(
  "audit_log",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    labId: text("lab_id").references(() => labs.id, { onDelete: "cascade" }),
    userId: text("user_id").references(() => users.id, { onDelete: "set null" }),
    action: text("action").notNull(),
    target: text("target").notNull().default(""),
    details: text("details", { mode: "json" }).$type<Record<string, unknown>>(),
    createdAt: createdAt(),
  },
  (t) => [index("audit_lab_idx").on(t.labId, t.createdAt)],
);

export const batches = sqliteTable(
  "batches",
  {
    id: id(),
    labId: text("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    code: text("code").notNull(),
    synthesisDate: text("synthesis_date"),
    method: text("method").notNull().default(""),
    notes: text("notes").notNull().default(""),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("batches_lab_code_idx").on(t.labId, t.code)],
);

export const samples = sqliteTable(
  "samples",
  {
    id: id(),
    labId: text("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    batchId: text("batch_id").references(() => batches.id, { onDelete: "set null" }),
    label: text("label").notNull(),
    formula: text("formula").notNull(),
    molarMassGPerMol: real("molar_mass_g_per_mol").notNull(),
    molarMassOverrideReason: text("molar_mass_override_reason"),
    atomsPerFormulaUnit: real("atoms_per_formula_unit").notNull(),
    atomsOverrideReason: text("atoms_override_reason"),
    massMg: real("mass_mg").notNull(),
    massSigmaMg: real("mass_sigma_mg").notNull().default(0),
    compositionX: real("composition_x"),
    compositionName: text("composition_name"),
    notes: text("notes").notNull().default(""),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: integer("updated_at").notNull(),
  },
  (t) => [index("samples_lab_idx").on(t.labId), index("samples_batch_idx").on(t.batchId)],
);

/** Raw uploads and built bundles, stored on disk under DATA_DIR/files by their SHA-256. */
export const storedFiles = sqliteTable("stored_files", {
  sha256: text("sha256").primaryKey(),
  sizeBytes: integer("size_bytes").notNull(),
  createdAt: createdAt(),
});

export const runs = sqliteTable(
  "runs",
  {
    id: id(),
    labId: text("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    /** Null for an addenda run that belongs to a platform, not to a sample. */
    sampleId: text("sample_id").references(() => samples.id, { onDelete: "cascade" }),
    kind: text("kind", { enum: ["sample", "addenda"] }).notNull().default("sample"),
    /** Instrument platform or puck the run was measured on (addenda runs are per platform). */
    platform: text("platform").notNull().default(""),
    label: text("label").notNull().default(""),
    fileSha256: text("file_sha256")
      .notNull()
      .references(() => storedFiles.sha256),
    fileName: text("file_name").notNull(),
    /** Column map and units used to read the file (shared/schemas ImportMapping). */
    mapping: text("mapping", { mode: "json" }).notNull().$type<Record<string, unknown>>(),
    /** Magnetic field of this run in tesla, when the file was split by field. */
    fieldT: real("field_t"),
    addendaRunId: text("addenda_run_id"),
    /** Reduction inputs as used (a later edit of the sample does not silently change stored points). */
    massMg: real("mass_mg"),
    molarMassGPerMol: real("molar_mass_g_per_mol"),
    atomsPerFormulaUnit: real("atoms_per_formula_unit"),
    pointCount: integer("point_count").notNull(),
    tMinK: real("t_min_k").notNull(),
    tMaxK: real("t_max_k").notNull(),
    warnings: text("warnings", { mode: "json" }).notNull().$type<string[]>(),
    notes: text("notes").notNull().default(""),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [
    index("runs_lab_idx").on(t.labId),
    index("runs_sample_idx").on(t.sampleId),
    index("runs_file_idx").on(t.fileSha256),
  ],
);

export const runPoints = sqliteTable(
  "run_points",
  {
    runId: text("run_id")
      .notNull()
      .references(() => runs.id, { onDelete: "cascade" }),
    idx: integer("idx").notNull(),
    temperatureK: real("temperature_k").notNull(),
    /** Molar heat capacity per mole of formula units, J/(mol·K); for an addenda run, J/K total. */
    cp: real("cp").notNull(),
    cpSigma: real("cp_sigma"),
    fieldT: real("field_t"),
    /** How many raw rows were averaged into this point, and the first file line among them. */
    rowsAveraged: integer("rows_averaged").notNull().default(1),
    sourceLine: integer("source_line").notNull(),
    masked: integer("masked", { mode: "boolean" }).notNull().default(false),
  },
  (t) => [primaryKey({ columns: [t.runId, t.idx] })],
);

export const importPresets = sqliteTable(
  "import_presets",
  {
    id: id(),
    labId: text("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    mapping: text("mapping", { mode: "json" }).notNull().$type<Record<string, unknown>>(),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("import_presets_lab_name_idx").on(t.labId, t.name)],
);

export const fits = sqliteTable(
  "fits",
  {
    id: id(),
    labId: text("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    runId: text("run_id")
      .notNull()
      .references(() => runs.id, { onDelete: "cascade" }),
    state: text("state", { enum: ["draft", "approved", "superseded"] }).notNull().default("draft"),
    /** Model definition: components, atom counts, constraints, bounds, start values. */
    model: text("model", { mode: "json" }).notNull().$type<Record<string, unknown>>(),
    windowMinK: real("window_min_k").notNull(),
    windowMaxK: real("window_max_k").notNull(),
    pointsUsed: integer("points_used").notNull(),
    maskedExcluded: integer("masked_excluded").notNull().default(0),
    converged: integer("converged", { mode: "boolean" }).notNull(),
    stopReason: text("stop_reason").notNull(),
    chiSquare: real("chi_square").notNull(),
    reducedChiSquare: real("reduced_chi_square").notNull(),
    dof: integer("dof").notNull(),
    aic: real("aic").notNull(),
    bic: real("bic").notNull(),
    covariance: text("covariance", { mode: "json" }).notNull().$type<number[][]>(),
    correlation: text("correlation", { mode: "json" }).notNull().$type<number[][]>(),
    /** Everything else the engine returned (warnings, residuals summary, start values used). */
    result: text("result", { mode: "json" }).notNull().$type<Record<string, unknown>>(),
    inputSha256: text("input_sha256").notNull(),
    softwareVersion: text("software_version").notNull(),
    notes: text("notes").notNull().default(""),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    approvedBy: text("approved_by").references(() => users.id, { onDelete: "set null" }),
    approvedAt: integer("approved_at"),
    supersededBy: text("superseded_by"),
    supersededAt: integer("superseded_at"),
  },
  (t) => [index("fits_run_idx").on(t.runId), index("fits_lab_state_idx").on(t.labId, t.state)],
);

export const fitParameters = sqliteTable(
  "fit_parameters",
  {
    fitId: text("fit_id")
      .notNull()
      .references(() => fits.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    value: real("value").notNull(),
    /** Standard error scaled by sqrt(reduced chi-square). */
    stderr: real("stderr"),
    /** Standard error from the stated sigmas alone (unscaled covariance). */
    stderrUnscaled: real("stderr_unscaled"),
    /** Systematic part from the sample-mass uncertainty (refit at m ± sigma_m). */
    stderrMass: real("stderr_mass"),
    unit: text("unit").notNull(),
    fixed: integer("fixed", { mode: "boolean" }).notNull().default(false),
  },
  (t) => [primaryKey({ columns: [t.fitId, t.name] }), index("fit_parameters_name_idx").on(t.name)],
);

export const comparisons = sqliteTable("comparisons", {
  id: id(),
  labId: text("lab_id")
    .notNull()
    .references(() => labs.id, { onDelete: "cascade" }),
  name: text("name").notNull(),
  selection: text("selection", { mode: "json" }).notNull().$type<Record<string, unknown>>(),
  parameter: text("parameter").notNull(),
  groupBy: text("group_by", { enum: ["batch", "x"] }).notNull().default("batch"),
  createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
  createdAt: createdAt(),
});

export const bundles = sqliteTable(
  "bundles",
  {
    id: id(),
    labId: text("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    fileSha256: text("file_sha256")
      .notNull()
      .references(() => storedFiles.sha256),
    sizeBytes: integer("size_bytes").notNull(),
    /** SHA-256 of manifest-sha256.txt: equal for equal inputs (reproducible payload). */
    payloadManifestSha256: text("payload_manifest_sha256").notNull(),
    selection: text("selection", { mode: "json" }).notNull().$type<Record<string, unknown>>(),
    contents: text("contents", { mode: "json" }).notNull().$type<{ path: string; bytes: number }[]>(),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [index("bundles_lab_idx").on(t.labId)],
);

export const shareLinks = sqliteTable("share_links", {
  id: id(),
  bundleId: text("bundle_id")
    .notNull()
    .references(() => bundles.id, { onDelete: "cascade" }),
  tokenHash: text("token_hash").notNull().unique(),
  expiresAt: integer("expires_at").notNull(),
  maxDownloads: integer("max_downloads"),
  downloadCount: integer("download_count").notNull().default(0),
  emailTo: text("email_to"),
  revokedAt: integer("revoked_at"),
  createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
  createdAt: createdAt(),
});
