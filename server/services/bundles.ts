import { createHash, randomBytes, randomUUID } from "node:crypto";
import { createReadStream, existsSync, mkdirSync, readFileSync, renameSync, rmSync } from "node:fs";
import path from "node:path";
import { and, asc, desc, eq, inArray } from "drizzle-orm";
import type { Bundle, BundleStreamLine, CreateBundleInput } from "@shared/schemas/bundles";
import type { ComparisonResult } from "@shared/schemas/compare";
import type { Role } from "@shared/schemas/auth";
import type { Db } from "../db/client";
import { batches, bundles, comparisons, fitParameters, fits, labs, runPoints, runs, samples, storedFiles, users } from "../db/schema";
import { HttpError, notFound, unprocessable } from "../http-error";
import { audit } from "./audit";
import { writeBagZip, type PayloadSource } from "./bagit";
import { compareFits, COMPARISON_CSV_COLUMNS, comparisonCsv, csvCell, modelLabel } from "./compare";
import { storedFilePath, tempFolder } from "./files";
import { listLinksFor } from "./share-links";

/*
 * Dataset bundles: a chosen set of samples, runs and approved fits (or a saved comparison) packed as a
 * BagIt 1.0 bag in a zip (see bagit.ts) and kept in the content-addressed file store. The payload is a
 * pure function of the inputs: files in a fixed order and with fixed names, numbers written as
 * JavaScript's shortest round-trip form, every date taken from the data (never the clock), no ids made
 * up for the build. Only bag-info.txt carries the Bagging-Date, and it is a tag file, not payload.
 */

/** The version of this build (package.json), written into bag-info.txt, README.txt and datapackage.json. */
const SOFTWARE_VERSION: string = (
  JSON.parse(readFileSync(new URL("../../package.json", import.meta.url), "utf8")) as { version: string }
).version;

type SampleRow = typeof samples.$inferSelect & { batchCode: string | null };
type RunRow = typeof runs.$inferSelect;
type FitRow = typeof fits.$inferSelect;
type ParamRow = typeof fitParameters.$inferSelect;

/** Everything a build needs, resolved and checked before anything is written. */
export interface BundlePlan {
  labId: string;
  userId: string;
  name: string;
  selection: { sampleIds: string[]; runIds: string[]; fitIds: string[]; comparisonId: string | null; comparisonName: string | null };
  lab: { name: string; organisation: string; contactEmail: string };
  creator: { displayName: string; email: string };
  samples: SampleRow[];
  runs: RunRow[];
  fits: FitRow[];
  parameters: Map<string, ParamRow[]>;
  comparison: ComparisonResult | null;
}

const uniq = (xs: readonly string[]) => [...new Set(xs)];

function missingIds(wanted: readonly string[], found: Iterable<string>): string[] {
  const f = new Set(found);
  return wanted.filter((id) => !f.has(id));
}

/**
 * Resolves and checks a bundle request: every id must be the lab's, every named fit approved; the
 * samples' runs and the runs' approved fits come along, and so does the addenda run of each run.
 * @param db the database
 * @param labId the lab
 * @param userId who builds it
 * @param body the parsed request
 * @returns the plan for buildBundle
 * @throws HttpError 422 for an empty selection or fits that are not approved (named in the message and
 *   details); 404 for an id that is not this lab's
 */
export function planBundle(db: Db, labId: string, userId: string, body: CreateBundleInput): BundlePlan {
  const sampleIds = uniq(body.sampleIds);
  const runIds = uniq(body.runIds);
  const fitIds = uniq(body.fitIds);
  const comparisonId = body.comparisonId ?? null;
  if (sampleIds.length + runIds.length + fitIds.length === 0 && !comparisonId) {
    throw unprocessable("Choose at least one sample, run or approved fit, or a saved comparison, to put in the bundle");
  }
  const lab = db.select().from(labs).where(eq(labs.id, labId)).get();
  if (!lab) throw notFound("No such lab");
  const creator = db.select({ displayName: users.displayName, email: users.email }).from(users).where(eq(users.id, userId)).get();

  const chosenSamples = sampleIds.length
    ? db.select({ id: samples.id }).from(samples).where(and(eq(samples.labId, labId), inArray(samples.id, sampleIds))).all()
    : [];
  const noSample = missingIds(sampleIds, chosenSamples.map((s) => s.id));
  if (noSample.length) throw notFound(`No such sample in this lab: ${noSample.join(", ")}`);
  const chosenRuns = runIds.length
    ? db.select({ id: runs.id }).from(runs).where(and(eq(runs.labId, labId), inArray(runs.id, runIds))).all()
    : [];
  const noRun = missingIds(runIds, chosenRuns.map((r) => r.id));
  if (noRun.length) throw notFound(`No such run in this lab: ${noRun.join(", ")}`);
  const chosenFits = fitIds.length ? db.select().from(fits).where(and(eq(fits.labId, labId), inArray(fits.id, fitIds))).all() : [];
  const noFit = missingIds(fitIds, chosenFits.map((f) => f.id));
  if (noFit.length) throw notFound(`No such fit in this lab: ${noFit.join(", ")}`);
  const notApproved = fitIds.map((id) => chosenFits.find((f) => f.id === id)!).filter((f) => f.state !== "approved");
  if (notApproved.length) {
    throw unprocessable(
      `Only approved fits go into a bundle; not approved: ${notApproved.map((f) => `${f.id} (${f.state})`).join(", ")}`,
      notApproved.map((f) => ({ path: `fitIds.${fitIds.indexOf(f.id)}`, message: `fit ${f.id} is ${f.state}, not approved` })),
    );
  }

  let comparison: ComparisonResult | null = null;
  let comparisonName: string | null = null;
  const fitIdSet = new Set(fitIds);
  if (comparisonId) {
    const saved = db.select().from(comparisons).where(and(eq(comparisons.labId, labId), eq(comparisons.id, comparisonId))).get();
    if (!saved) throw notFound("No such saved comparison in this lab");
    const sel = saved.selection as { batchIds?: string[]; sampleIds?: string[] };
    comparison = compareFits(db, labId, {
      parameter: saved.parameter,
      groupBy: saved.groupBy,
      batchIds: sel.batchIds ?? [],
      sampleIds: sel.sampleIds ?? [],
    });
    comparisonName = saved.name;
    if (comparison.rows.length === 0 && sampleIds.length + runIds.length + fitIds.length === 0) {
      throw unprocessable(`The saved comparison "${saved.name}" has no approved fits to bundle`);
    }
    for (const r of comparison.rows) fitIdSet.add(r.fitId);
  }

  // Runs: chosen ones, those of chosen samples, those of chosen fits, then the addenda runs they used.
  const runIdSet = new Set(runIds);
  if (sampleIds.length) {
    for (const r of db.select({ id: runs.id }).from(runs).where(and(eq(runs.labId, labId), inArray(runs.sampleId, sampleIds))).all()) runIdSet.add(r.id);
  }
  // Approved fits of the chosen runs and samples come along.
  if (runIdSet.size) {
    for (const f of db
      .select({ id: fits.id })
      .from(fits)
      .where(and(eq(fits.labId, labId), eq(fits.state, "approved"), inArray(fits.runId, [...runIdSet])))
      .all())
      fitIdSet.add(f.id);
  }
  const fitRows = fitIdSet.size ? db.select().from(fits).where(and(eq(fits.labId, labId), inArray(fits.id, [...fitIdSet]))).all() : [];
  for (const f of fitRows) runIdSet.add(f.runId);
  let runRows = runIdSet.size ? db.select().from(runs).where(and(eq(runs.labId, labId), inArray(runs.id, [...runIdSet]))).all() : [];
  const addendaIds = uniq(runRows.map((r) => r.addendaRunId).filter((x): x is string => !!x && !runIdSet.has(x)));
  if (addendaIds.length) {
    runRows = runRows.concat(db.select().from(runs).where(and(eq(runs.labId, labId), inArray(runs.id, addendaIds))).all());
  }
  const sampleIdSet = new Set(sampleIds);
  for (const r of runRows) if (r.sampleId) sampleIdSet.add(r.sampleId);
  const sampleRows: SampleRow[] = sampleIdSet.size
    ? db
        .select({ s: samples, batchCode: batches.code })
        .from(samples)
        .leftJoin(batches, eq(batches.id, samples.batchId))
        .where(and(eq(samples.labId, labId), inArray(samples.id, [...sampleIdSet])))
        .all()
        .map((r) => ({ ...r.s, batchCode: r.batchCode }))
    : [];
  if (sampleRows.length + runRows.length + fitRows.length === 0) {
    throw unprocessable("The selection holds no samples, runs or approved fits");
  }

  const collator = new Intl.Collator("en", { numeric: true });
  const sampleLabel = new Map(sampleRows.map((s) => [s.id, s.label]));
  sampleRows.sort((a, b) => collator.compare(a.label, b.label) || (a.id < b.id ? -1 : 1));
  runRows.sort(
    (a, b) =>
      (a.kind === b.kind ? 0 : a.kind === "sample" ? -1 : 1) ||
      collator.compare(sampleLabel.get(a.sampleId ?? "") ?? "", sampleLabel.get(b.sampleId ?? "") ?? "") ||
      a.createdAt - b.createdAt ||
      (a.id < b.id ? -1 : 1),
  );
  const runOrder = new Map(runRows.map((r, i) => [r.id, i]));
  fitRows.sort((a, b) => runOrder.get(a.runId)! - runOrder.get(b.runId)! || (a.approvedAt ?? 0) - (b.approvedAt ?? 0) || (a.id < b.id ? -1 : 1));
  const parameters = new Map<string, ParamRow[]>();
  if (fitRows.length) {
    for (const p of db
      .select()
      .from(fitParameters)
      .where(inArray(fitParameters.fitId, fitRows.map((f) => f.id)))
      .all()) {
      const list = parameters.get(p.fitId) ?? [];
      list.push(p);
      parameters.set(p.fitId, list);
    }
  }

  return {
    labId,
    userId,
    name: body.name,
    selection: { sampleIds, runIds, fitIds, comparisonId, comparisonName },
    lab: { name: lab.name, organisation: lab.organisation, contactEmail: lab.contactEmail },
    creator: { displayName: creator?.displayName ?? "", email: creator?.email ?? "" },
    samples: sampleRows,
    runs: runRows,
    fits: fitRows,
    parameters,
    comparison,
  };
}

/** Folder and file names inside the bag: lower-case ASCII letters, digits, "-" and "." only. */
export function slug(text: string, max = 48): string {
  const s = text
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/[^a-z0-9.]+/g, "-")
    .replace(/^[-.]+|[-.]+$/g, "")
    .slice(0, max)
    .replace(/[-.]+$/g, "");
  return s || "item";
}

/** A raw file's own name made safe for every file system, extension kept. */
function safeFileName(name: string): string {
  const base = name.split(/[\\/]/).pop() ?? name;
  const s = base.replace(/[^A-Za-z0-9._-]+/g, "_").replace(/^[._]+/, "").slice(-100);
  return s || "raw-file";
}

/** Name of the bag's base folder and of the zip file. */
export function bagNameFor(bundleName: string): string {
  return `thetafold-${slug(bundleName, 60)}`;
}

const num = (x: number | null | undefined) => (x == null || !Number.isFinite(x) ? "" : String(x));
const iso = (ms: number | null | undefined) => (ms == null ? null : new Date(ms).toISOString());

interface TableField {
  name: string;
  type: "string" | "number" | "integer" | "boolean" | "datetime";
  description: string;
  unit?: string;
}

interface TableSpec {
  name: string;
  path: string;
  title: string;
  description: string;
  fields: TableField[];
  primaryKey?: string[];
}

function csvText(header: readonly string[], rows: (string | number | boolean | null | undefined)[][]): Buffer {
  const lines = [header.join(","), ...rows.map((r) => r.map((c) => (typeof c === "number" ? num(c) : csvCell(c))).join(","))];
  return Buffer.from(lines.join("\n") + "\n", "utf8");
}

const f = (name: string, type: TableField["type"], description: string, unit?: string): TableField => ({ name, type, description, ...(unit ? { unit } : {}) });

const SAMPLE_FIELDS: TableField[] = [
  f("sample_id", "string", "Thetafold's id of the sample"),
  f("label", "string", "Sample label given by the lab"),
  f("batch", "string", "Synthesis batch code (empty: none)"),
  f("formula", "string", "Chemical formula of one formula unit"),
  f("molar_mass_g_per_mol", "number", "Molar mass of one formula unit used in the reduction, g/mol", "g/mol"),
  f("atoms_per_formula_unit", "number", "Atoms per formula unit n used in the reduction (Dulong–Petit limit 3nR)"),
  f("mass_mg", "number", "Sample mass as weighed, mg", "mg"),
  f("mass_sigma_mg", "number", "Standard uncertainty of the mass, mg", "mg"),
  f("x_name", "string", "Name of the composition variable"),
  f("x", "number", "Composition variable of a substitution series"),
  f("notes", "string", "Free notes"),
];

const RUN_FIELDS: TableField[] = [
  f("run_id", "string", "Thetafold's id of the run"),
  f("sample_id", "string", "Sample the run belongs to (empty for an addenda run)"),
  f("kind", "string", "sample: a measurement of a sample; addenda: platform and grease alone"),
  f("label", "string", "Run label"),
  f("platform", "string", "Instrument platform or puck"),
  f("raw_file", "string", "Path of the raw file, byte for byte as uploaded, relative to this folder"),
  f("raw_sha256", "string", "SHA-256 of the raw file"),
  f("reduced_file", "string", "Path of the reduced table of this run"),
  f("field_T", "number", "Magnetic field of the run, T", "T"),
  f("addenda_run_id", "string", "Addenda run subtracted from this run (empty: none)"),
  f("mass_mg", "number", "Sample mass used in the reduction, mg", "mg"),
  f("molar_mass_g_per_mol", "number", "Molar mass used in the reduction, g/mol", "g/mol"),
  f("atoms_per_formula_unit", "number", "Atoms per formula unit used in the reduction"),
  f("point_count", "integer", "Reduced points"),
  f("t_min_K", "number", "Lowest temperature, K", "K"),
  f("t_max_K", "number", "Highest temperature, K", "K"),
];

const FIT_FIELDS: TableField[] = [
  f("fit_id", "string", "Thetafold's id of the fit"),
  f("run_id", "string", "Run the fit was made on"),
  f("fit_file", "string", "Path of the fit's JSON description"),
  f("model", "string", "Model in words"),
  f("window_min_K", "number", "Lower end of the fit window, K", "K"),
  f("window_max_K", "number", "Upper end of the fit window, K", "K"),
  f("points_used", "integer", "Points inside the window that were not masked"),
  f("chi_square", "number", "χ² = Σ ((Cp − model)/σ)²"),
  f("reduced_chi_square", "number", "χ² / degrees of freedom"),
  f("dof", "integer", "Degrees of freedom: points used minus free parameters"),
  f("aic", "number", "Akaike information criterion"),
  f("bic", "number", "Bayesian information criterion"),
  f("converged", "boolean", "Whether the fit met its convergence test"),
  f("approved_at", "datetime", "When the lab lead approved the fit (UTC)"),
  f("input_sha256", "string", "SHA-256 of the fit's canonical input text (see README.txt)"),
  f("software_version", "string", "Thetafold version that made the fit"),
];

const PARAMETER_FIELDS: TableField[] = [
  f("fit_id", "string", "Fit the parameter belongs to"),
  f("parameter", "string", "Parameter name (thetaD, thetaE, gamma, beta, …; see README.txt)"),
  f("value", "number", "Fitted (or fixed) value, in the unit of the unit column"),
  f("unit", "string", "Unit of value and of the uncertainties"),
  f("sigma_stat", "number", "Statistical standard error, scaled by √χ²_red"),
  f("sigma_stat_unscaled", "number", "Statistical standard error from the stated σ alone"),
  f("sigma_sys_mass", "number", "Systematic standard uncertainty from the sample mass (refit at m ± σ_m)"),
  f("fixed", "boolean", "true when the parameter was held fixed, not fitted"),
];

const COMPARISON_FIELD_INFO: Record<(typeof COMPARISON_CSV_COLUMNS)[number], [TableField["type"], string]> = {
  group: ["string", "Group the row belongs to (batch code, or x value)"],
  batch: ["string", "Batch code"],
  sample: ["string", "Sample label"],
  x_name: ["string", "Name of the composition variable"],
  x: ["number", "Composition variable"],
  run: ["string", "Run label"],
  fit_id: ["string", "Fit the value comes from"],
  model: ["string", "Model in words"],
  window_min_K: ["number", "Lower end of the fit window, K"],
  window_max_K: ["number", "Upper end of the fit window, K"],
  parameter: ["string", "Parameter compared"],
  value: ["number", "Value of the parameter, in the unit of the unit column"],
  unit: ["string", "Unit of value, the σ columns and the group statistics"],
  sigma_stat: ["number", "Statistical standard error"],
  sigma_sys: ["number", "Systematic standard uncertainty from the sample mass"],
  sigma_total: ["number", "sigma_stat and sigma_sys in quadrature: the weight 1/σ² of the row in its group"],
  derived_from: ["string", "beta when θ_D follows from β of γT + βT³"],
  deviation_sigma: ["number", "|value − group weighted mean| / sigma_total"],
  flagged: ["boolean", "true when deviation_sigma > 3"],
  group_n: ["integer", "Rows in the group"],
  group_weighted_mean: ["number", "Inverse-variance weighted mean of the group"],
  group_weighted_sigma: ["number", "Standard uncertainty of the weighted mean, (Σ 1/σ²)^(-1/2)"],
  group_unweighted_mean: ["number", "Plain mean of the group"],
  group_spread: ["number", "Sample standard deviation of the group (n − 1)"],
};

function reducedFields(addenda: boolean): TableField[] {
  return addenda
    ? [
        f("idx", "integer", "Point index in the run (ascending temperature)"),
        f("temperature_K", "number", "Temperature, K", "K"),
        f("c_J_per_K", "number", "Heat capacity of the addenda (platform and grease), J/K", "J/K"),
        f("c_sigma_J_per_K", "number", "Its standard uncertainty, J/K (empty: none stated)", "J/K"),
        f("field_T", "number", "Magnetic field, T", "T"),
        f("rows_averaged", "integer", "Raw rows averaged into this point (same temperature)"),
        f("source_line", "integer", "Line of the raw file of the first of those rows"),
        f("masked", "boolean", "true when the point was masked by the lab (kept, but left out of fits)"),
      ]
    : [
        f("idx", "integer", "Point index in the run (ascending temperature)"),
        f("temperature_K", "number", "Temperature, K", "K"),
        f("cp_J_per_mol_K", "number", "Molar heat capacity per mole of formula units, addenda subtracted, J/(mol·K)", "J/(mol·K)"),
        f("cp_sigma_J_per_mol_K", "number", "Its standard uncertainty, J/(mol·K) (empty: none stated)", "J/(mol·K)"),
        f("cp_J_per_mol_atoms_K", "number", "Molar heat capacity per mole of atoms, cp_J_per_mol_K / atoms_per_formula_unit, J/(mol·K)", "J/(mol·K)"),
        f("field_T", "number", "Magnetic field, T", "T"),
        f("rows_averaged", "integer", "Raw rows averaged into this point (same temperature)"),
        f("source_line", "integer", "Line of the raw file of the first of those rows"),
        f("masked", "boolean", "true when the point was masked by the lab (kept, but left out of fits)"),
      ];
}

/** datapackage.json (Frictionless Data Package v1, profile tabular-data-package), stable key order. */
function dataPackage(plan: BundlePlan, tables: TableSpec[], created: string | null): Buffer {
  const pkg = {
    profile: "tabular-data-package",
    name: slug(plan.name, 60),
    title: plan.name,
    description:
      `Heat-capacity data of ${plan.lab.name}: ${plan.samples.length} sample(s), ${plan.runs.length} run(s), ` +
      `${plan.fits.length} approved fit(s). Raw instrument files are in raw/, fit descriptions in fits/, methods in README.txt. ` +
      "Research data, not certified property data for engineering design.",
    ...(created ? { created } : {}),
    contributors: [{ title: plan.lab.organisation || plan.lab.name, role: "author" }],
    keywords: ["heat capacity", "calorimetry", "Debye temperature"],
    resources: tables.map((t) => ({
      name: t.name,
      path: t.path,
      profile: "tabular-data-resource",
      title: t.title,
      description: t.description,
      format: "csv",
      mediatype: "text/csv",
      encoding: "utf-8",
      dialect: { delimiter: ",", header: true, lineTerminator: "\n", doubleQuote: true },
      schema: {
        fields: t.fields.map((x) => ({
          name: x.name,
          type: x.type,
          description: x.description,
          ...(x.unit ? { unit: x.unit } : {}),
          ...(x.type === "boolean" ? { trueValues: ["true"], falseValues: ["false"] } : {}),
        })),
        missingValues: [""],
        ...(t.primaryKey ? { primaryKey: t.primaryKey } : {}),
      },
    })),
  };
  return Buffer.from(JSON.stringify(pkg, null, 2) + "\n", "utf8");
}

function asObject(v: unknown): Record<string, unknown> {
  return typeof v === "object" && v !== null && !Array.isArray(v) ? (v as Record<string, unknown>) : {};
}

/** Reads every run's points (kept out of the plan so planning stays cheap). */
function pointsOf(db: Db, runIds: readonly string[]): Map<string, (typeof runPoints.$inferSelect)[]> {
  const out = new Map<string, (typeof runPoints.$inferSelect)[]>();
  for (const id of runIds) out.set(id, db.select().from(runPoints).where(eq(runPoints.runId, id)).orderBy(asc(runPoints.idx)).all());
  return out;
}

/** The whole payload: files and tables, README and datapackage.json; a pure function of the plan's data. */
export function assemblePayload(db: Db, plan: BundlePlan, dataDir: string): { files: PayloadSource[]; contentDate: Date } {
  const files: PayloadSource[] = [];
  const tables: TableSpec[] = [];
  const pad = (i: number, n: number) => String(i + 1).padStart(Math.max(2, String(n).length), "0");
  const sampleById = new Map(plan.samples.map((s) => [s.id, s]));
  const dates: number[] = [];
  // Dates of the data only (an edit that changes nothing exported must not change the payload).
  for (const s of plan.samples) dates.push(s.createdAt);
  for (const r of plan.runs) dates.push(r.createdAt);
  for (const x of plan.fits) dates.push(x.createdAt, x.approvedAt ?? 0);

  const runPaths = new Map<string, { raw: string; reduced: string; stem: string }>();
  plan.runs.forEach((r, i) => {
    const s = r.sampleId ? sampleById.get(r.sampleId) : undefined;
    const what = r.kind === "addenda" ? `addenda ${r.platform || r.label}` : `${s?.label ?? "sample"} ${r.label}`;
    const stem = `${pad(i, plan.runs.length)}-${slug(what)}`;
    runPaths.set(r.id, { raw: `raw/${stem}/${safeFileName(r.fileName)}`, reduced: `reduced/${stem}.csv`, stem });
  });
  const fitPaths = new Map<string, string>();
  plan.fits.forEach((x, i) => {
    const stem = runPaths.get(x.runId)?.stem.replace(/^\d+-/, "") ?? "fit";
    fitPaths.set(x.id, `fits/${pad(i, plan.fits.length)}-${stem}.json`);
  });

  for (const r of plan.runs) {
    files.push({ path: `data/${runPaths.get(r.id)!.raw}`, filePath: storedFilePath(dataDir, r.fileSha256), expectedSha256: r.fileSha256 });
  }

  const points = pointsOf(
    db,
    plan.runs.map((r) => r.id),
  );
  for (const r of plan.runs) {
    const addenda = r.kind === "addenda";
    const fields = reducedFields(addenda);
    const atoms = r.atomsPerFormulaUnit ?? (r.sampleId ? sampleById.get(r.sampleId)?.atomsPerFormulaUnit : undefined) ?? null;
    const rows = (points.get(r.id) ?? []).map((p) =>
      addenda
        ? [p.idx, p.temperatureK, p.cp, p.cpSigma, p.fieldT, p.rowsAveraged, p.sourceLine, p.masked]
        : [p.idx, p.temperatureK, p.cp, p.cpSigma, atoms ? p.cp / atoms : null, p.fieldT, p.rowsAveraged, p.sourceLine, p.masked],
    );
    const rp = runPaths.get(r.id)!;
    files.push({ path: `data/${rp.reduced}`, content: csvText(fields.map((x) => x.name), rows) });
    const s = r.sampleId ? sampleById.get(r.sampleId) : undefined;
    tables.push({
      name: `reduced-${rp.stem}`,
      path: rp.reduced,
      title: addenda ? `Addenda run ${r.label}` : `Reduced run ${s?.label ?? ""} ${r.label}`.trim(),
      description: addenda
        ? "Heat capacity of the platform and grease alone, sorted by temperature, equal temperatures averaged."
        : "Molar heat capacity of the run, sorted by temperature, equal temperatures averaged, addenda subtracted; masked points kept and flagged.",
      fields,
      primaryKey: ["idx"],
    });
  }

  files.push({
    path: "data/tables/samples.csv",
    content: csvText(
      SAMPLE_FIELDS.map((x) => x.name),
      plan.samples.map((s) => [
        s.id,
        s.label,
        s.batchCode,
        s.formula,
        s.molarMassGPerMol,
        s.atomsPerFormulaUnit,
        s.massMg,
        s.massSigmaMg,
        s.compositionName,
        s.compositionX,
        s.notes,
      ]),
    ),
  });
  tables.push({ name: "samples", path: "tables/samples.csv", title: "Samples", description: "The samples in this bundle.", fields: SAMPLE_FIELDS, primaryKey: ["sample_id"] });

  files.push({
    path: "data/tables/runs.csv",
    content: csvText(
      RUN_FIELDS.map((x) => x.name),
      plan.runs.map((r) => [
        r.id,
        r.sampleId,
        r.kind,
        r.label,
        r.platform,
        runPaths.get(r.id)!.raw,
        r.fileSha256,
        runPaths.get(r.id)!.reduced,
        r.fieldT,
        r.addendaRunId,
        r.massMg,
        r.molarMassGPerMol,
        r.atomsPerFormulaUnit,
        r.pointCount,
        r.tMinK,
        r.tMaxK,
      ]),
    ),
  });
  tables.push({ name: "runs", path: "tables/runs.csv", title: "Runs", description: "Calorimeter runs: raw file, reduced table and reduction inputs.", fields: RUN_FIELDS, primaryKey: ["run_id"] });

  if (plan.fits.length > 0) {
    files.push({
      path: "data/tables/fits.csv",
      content: csvText(
        FIT_FIELDS.map((x) => x.name),
        plan.fits.map((x) => [
          x.id,
          x.runId,
          fitPaths.get(x.id)!,
          modelLabel(x.model),
          x.windowMinK,
          x.windowMaxK,
          x.pointsUsed,
          x.chiSquare,
          x.reducedChiSquare,
          x.dof,
          x.aic,
          x.bic,
          x.converged,
          iso(x.approvedAt),
          x.inputSha256,
          x.softwareVersion,
        ]),
      ),
    });
    tables.push({ name: "fits", path: "tables/fits.csv", title: "Approved fits", description: "One line per approved fit.", fields: FIT_FIELDS, primaryKey: ["fit_id"] });
    files.push({
      path: "data/tables/fit-parameters.csv",
      content: csvText(
        PARAMETER_FIELDS.map((x) => x.name),
        plan.fits.flatMap((x) =>
          orderedParams(x, plan.parameters.get(x.id) ?? []).map((p) => [x.id, p.name, p.value, p.unit, p.stderr, p.stderrUnscaled, p.stderrMass, p.fixed]),
        ),
      ),
    });
    tables.push({
      name: "fit-parameters",
      path: "tables/fit-parameters.csv",
      title: "Fitted parameters",
      description: "Every parameter of every approved fit with its statistical and systematic uncertainty.",
      fields: PARAMETER_FIELDS,
      primaryKey: ["fit_id", "parameter"],
    });
  }

  for (const x of plan.fits) {
    const run = plan.runs.find((r) => r.id === x.runId)!;
    files.push({ path: `data/${fitPaths.get(x.id)!}`, content: fitJson(x, plan.parameters.get(x.id) ?? [], run, runPaths.get(run.id)!, sampleById.get(run.sampleId ?? "")) });
  }

  if (plan.comparison) {
    files.push({ path: "data/tables/comparison.csv", content: Buffer.from(comparisonCsv(plan.comparison), "utf8") });
    tables.push({
      name: "comparison",
      path: "tables/comparison.csv",
      title: `Comparison: ${plan.selection.comparisonName ?? ""} (${plan.comparison.parameter} by ${plan.comparison.groupBy})`,
      description:
        "The saved comparison's table: one line per approved fit, with its group's inverse-variance weighted mean, plain mean and spread. " +
        "Text cells that begin with = + - @ carry a leading apostrophe so spreadsheets do not run them as formulas.",
      fields: COMPARISON_CSV_COLUMNS.map((c) => f(c, COMPARISON_FIELD_INFO[c][0], COMPARISON_FIELD_INFO[c][1])),
    });
  }

  const maxDate = Math.max(0, ...dates.filter((d) => Number.isFinite(d)));
  const contentDate = new Date(maxDate > 315_532_800_000 ? maxDate : 315_532_800_000); // not before 1980 (zip dates)
  tables.sort((a, b) => (a.path < b.path ? -1 : a.path > b.path ? 1 : 0));
  files.push({ path: "data/datapackage.json", content: dataPackage(plan, tables, maxDate > 0 ? new Date(maxDate).toISOString() : null) });
  files.push({
    path: "data/README.txt",
    content: Buffer.from(
      bundleReadme({
        name: plan.name,
        labName: plan.lab.name,
        organisation: plan.lab.organisation,
        softwareVersion: SOFTWARE_VERSION,
        sampleCount: plan.samples.length,
        runCount: plan.runs.length,
        fitCount: plan.fits.length,
        comparison: plan.comparison ? { name: plan.selection.comparisonName ?? "", parameter: plan.comparison.parameter, groupBy: plan.comparison.groupBy } : null,
        firstFit: plan.fits.length ? { json: fitPaths.get(plan.fits[0].id)!, reduced: runPaths.get(plan.fits[0].runId)!.reduced } : null,
      }),
      "utf8",
    ),
  });
  return { files, contentDate };
}

function orderedParams(x: FitRow, params: ParamRow[]): ParamRow[] {
  const order = asObject(x.result).parameterOrder;
  if (Array.isArray(order)) {
    const idx = new Map(order.map((n, i) => [String(n), i]));
    return [...params].sort((a, b) => (idx.get(a.name) ?? 1e9) - (idx.get(b.name) ?? 1e9) || (a.name < b.name ? -1 : 1));
  }
  return [...params].sort((a, b) => (a.name < b.name ? -1 : 1));
}

function fitJson(x: FitRow, params: ParamRow[], run: RunRow, paths: { raw: string; reduced: string }, sample: SampleRow | undefined): Buffer {
  const result = asObject(x.result);
  const ordered = orderedParams(x, params);
  const free = Array.isArray(result.freeParameters) ? result.freeParameters.map(String) : ordered.filter((p) => !p.fixed).map((p) => p.name);
  const doc = {
    format: "thetafold-fit v1",
    fitId: x.id,
    state: x.state,
    modelInWords: modelLabel(x.model),
    model: x.model,
    window: { minK: x.windowMinK, maxK: x.windowMaxK },
    run: {
      id: run.id,
      label: run.label,
      reducedTable: paths.reduced,
      rawFile: paths.raw,
      rawSha256: run.fileSha256,
      atomsPerFormulaUnit: run.atomsPerFormulaUnit ?? sample?.atomsPerFormulaUnit ?? null,
      massMg: run.massMg,
      massSigmaMg: sample?.massSigmaMg ?? null,
    },
    sample: sample ? { id: sample.id, label: sample.label, formula: sample.formula, batch: sample.batchCode } : null,
    pointsUsed: x.pointsUsed,
    maskedExcluded: x.maskedExcluded,
    maskedPointIndices: Array.isArray(result.maskedIdx) ? result.maskedIdx : [],
    weighting: typeof result.weighting === "string" ? result.weighting : null,
    parameters: ordered.map((p) => ({
      name: p.name,
      value: p.value,
      unit: p.unit,
      sigmaStat: p.stderr,
      sigmaStatUnscaled: p.stderrUnscaled,
      sigmaSysMass: p.stderrMass,
      fixed: p.fixed,
    })),
    freeParameters: free,
    covariance: x.covariance,
    correlation: x.correlation,
    chiSquare: x.chiSquare,
    reducedChiSquare: x.reducedChiSquare,
    dof: x.dof,
    aic: x.aic,
    bic: x.bic,
    converged: x.converged,
    stopReason: x.stopReason,
    iterations: typeof result.iterations === "number" ? result.iterations : null,
    startValues: asObject(result.startValues),
    warnings: Array.isArray(result.warnings) ? result.warnings : [],
    inputSha256: x.inputSha256,
    inputRule: "thetafold-fit-input v1 (see README.txt, 'Checking which points a fit used')",
    softwareVersion: x.softwareVersion,
    createdAt: iso(x.createdAt),
    approvedAt: iso(x.approvedAt),
    notes: x.notes,
  };
  return Buffer.from(JSON.stringify(doc, null, 2) + "\n", "utf8");
}

/** A progress callback of a build. */
export type BundleProgress = (line: Extract<BundleStreamLine, { type: "progress" }>) => void;

/**
 * Builds the bag of a plan, stores the zip by its SHA-256 and records the bundle.
 * @param deps database and DATA_DIR
 * @param plan from planBundle
 * @param onProgress receives collecting, hashing, writing and storing steps
 * @returns the bundle record (as the lab lists it)
 * @throws Error when a stored raw file no longer matches its SHA-256 (nothing is recorded then)
 */
export async function buildBundle(deps: { db: Db; dataDir: string; publicUrl?: string }, plan: BundlePlan, onProgress: BundleProgress = () => {}): Promise<Bundle> {
  const { db, dataDir } = deps;
  onProgress({ type: "progress", phase: "collecting", done: 0, total: 1, label: "reading samples, runs and fits" });
  const { files, contentDate } = assemblePayload(db, plan, dataDir);
  onProgress({ type: "progress", phase: "collecting", done: 1, total: 1, label: `${files.length} payload files` });
  const tmpDir = tempFolder(dataDir);
  mkdirSync(tmpDir, { recursive: true });
  const tmp = path.join(tmpDir, `bundle-${randomBytes(8).toString("hex")}.zip`);
  const bagName = bagNameFor(plan.name);
  const bagInfo: [string, string][] = [
    ["Source-Organization", plan.lab.organisation || plan.lab.name],
    ["Contact-Name", plan.creator.displayName],
    ["Contact-Email", plan.lab.contactEmail || plan.creator.email],
    [
      "External-Description",
      `${plan.name}: heat-capacity data from ${plan.lab.name} (${plan.samples.length} samples, ${plan.runs.length} runs, ${plan.fits.length} approved fits` +
        `${plan.comparison ? `, comparison of ${plan.comparison.parameter} by ${plan.comparison.groupBy}` : ""}). Methods in data/README.txt.`,
    ],
    ["Bagging-Date", new Date().toISOString().slice(0, 10)],
    ["Bag-Software-Agent", `Thetafold ${SOFTWARE_VERSION}`],
  ];
  let written;
  try {
    written = await writeBagZip(tmp, bagName, files, bagInfo, contentDate, (p) =>
      onProgress({ type: "progress", phase: p.phase, done: p.done, total: p.total, label: p.label }),
    );
  } catch (err) {
    rmSync(tmp, { force: true });
    if (err instanceof Error && /^stored file .* has SHA-256/.test(err.message)) {
      console.error(`[integrity] bundle "${plan.name}" of lab ${plan.labId}: ${err.message}`);
      audit(db, { labId: plan.labId, userId: plan.userId, action: "bundle.integrity_failed", target: plan.name, details: { reason: err.message } });
      throw new HttpError(500, "INTERNAL", "A stored raw file no longer matches its SHA-256, so no bundle was built; the problem was logged for the lab");
    }
    throw err;
  }
  onProgress({ type: "progress", phase: "storing", done: 0, total: 1, label: "storing the zip" });
  const finalPath = storedFilePath(dataDir, written.sha256);
  mkdirSync(path.dirname(finalPath), { recursive: true });
  if (existsSync(finalPath)) rmSync(tmp, { force: true });
  else renameSync(tmp, finalPath);

  const id = randomUUID();
  const now = Date.now();
  const contents = written.payload.map((e) => ({ path: e.path, bytes: e.bytes }));
  db.transaction((tx) => {
    tx.insert(storedFiles).values({ sha256: written.sha256, sizeBytes: written.sizeBytes, createdAt: now }).onConflictDoNothing().run();
    tx.insert(bundles)
      .values({
        id,
        labId: plan.labId,
        name: plan.name,
        fileSha256: written.sha256,
        sizeBytes: written.sizeBytes,
        payloadManifestSha256: written.manifestSha256,
        selection: { ...plan.selection, counts: { samples: plan.samples.length, runs: plan.runs.length, fits: plan.fits.length } },
        contents,
        createdBy: plan.userId,
        createdAt: now,
      })
      .run();
    audit(tx as unknown as Db, {
      labId: plan.labId,
      userId: plan.userId,
      action: "bundle.created",
      target: plan.name,
      details: { bundleId: id, sha256: written.sha256, sizeBytes: written.sizeBytes, files: contents.length },
    });
  });
  onProgress({ type: "progress", phase: "storing", done: 1, total: 1, label: "stored" });
  return getBundle(db, plan.labId, id, "lead");
}

type BundleRow = typeof bundles.$inferSelect & { creatorName: string | null };

function toBundle(r: BundleRow, links: Bundle["links"]): Bundle {
  const sel = asObject(r.selection);
  const counts = asObject(sel.counts);
  const list = (k: string) => (Array.isArray(sel[k]) ? (sel[k] as unknown[]).map(String) : []);
  return {
    id: r.id,
    name: r.name,
    fileSha256: r.fileSha256,
    sizeBytes: r.sizeBytes,
    payloadManifestSha256: r.payloadManifestSha256,
    selection: {
      sampleIds: list("sampleIds"),
      runIds: list("runIds"),
      fitIds: list("fitIds"),
      comparisonId: typeof sel.comparisonId === "string" ? sel.comparisonId : null,
      comparisonName: typeof sel.comparisonName === "string" ? sel.comparisonName : null,
    },
    counts: { samples: Number(counts.samples ?? 0), runs: Number(counts.runs ?? 0), fits: Number(counts.fits ?? 0) },
    contents: r.contents,
    createdBy: r.createdBy && r.creatorName !== null ? { id: r.createdBy, displayName: r.creatorName } : null,
    createdAt: new Date(r.createdAt).toISOString(),
    downloadUrl: `/api/labs/${r.labId}/bundles/${r.id}/download`,
    links,
  };
}

function selectBundles(db: Db) {
  return db
    .select({
      id: bundles.id,
      labId: bundles.labId,
      name: bundles.name,
      fileSha256: bundles.fileSha256,
      sizeBytes: bundles.sizeBytes,
      payloadManifestSha256: bundles.payloadManifestSha256,
      selection: bundles.selection,
      contents: bundles.contents,
      createdBy: bundles.createdBy,
      createdAt: bundles.createdAt,
      creatorName: users.displayName,
    })
    .from(bundles)
    .leftJoin(users, eq(users.id, bundles.createdBy));
}

/**
 * The lab's bundles, newest first, with contents, size, creator and date; share links only for
 * researchers and leads.
 * @param db the database
 * @param labId the lab
 * @param role the caller's role in the lab
 */
export function listBundles(db: Db, labId: string, role: Role): Bundle[] {
  const rows = selectBundles(db).where(eq(bundles.labId, labId)).orderBy(desc(bundles.createdAt), desc(bundles.id)).all();
  const links = role === "guest" ? new Map() : listLinksFor(db, rows.map((r) => r.id));
  return rows.map((r) => toBundle(r, links.get(r.id) ?? []));
}

/**
 * One bundle of the lab.
 * @throws HttpError 404 when it is not this lab's
 */
export function getBundle(db: Db, labId: string, bundleId: string, role: Role): Bundle {
  const row = selectBundles(db).where(and(eq(bundles.labId, labId), eq(bundles.id, bundleId))).get();
  if (!row) throw notFound("No such bundle in this lab");
  const links = role === "guest" ? new Map() : listLinksFor(db, [row.id]);
  return toBundle(row, links.get(row.id) ?? []);
}

/** A stored zip that passed its hash check, ready to stream. */
export interface VerifiedBundleFile {
  filePath: string;
  fileName: string;
  sizeBytes: number;
  sha256: string;
}

async function hashStored(filePath: string): Promise<string | null> {
  if (!existsSync(filePath)) return null;
  const h = createHash("sha256");
  for await (const chunk of createReadStream(filePath)) h.update(chunk as Buffer);
  return h.digest("hex");
}

/**
 * Re-hashes a bundle's stored zip before it is sent. A mismatch (or a missing file) is logged on the
 * server and in the lab's audit log, and refused.
 * @param db the database
 * @param dataDir DATA_DIR
 * @param bundle id, lab and name of the bundle
 * @param via who asked: "app" (a lab member) or "share-link"
 * @returns where the verified file is, its download name, size and hash
 * @throws HttpError 500 INTERNAL when the stored bytes no longer match the recorded SHA-256
 */
export async function verifiedBundleFile(
  db: Db,
  dataDir: string,
  bundle: { id: string; labId: string; name: string; fileSha256: string; sizeBytes: number },
  via: "app" | "share-link",
): Promise<VerifiedBundleFile> {
  const filePath = storedFilePath(dataDir, bundle.fileSha256);
  const actual = await hashStored(filePath);
  if (actual !== bundle.fileSha256) {
    console.error(
      `[integrity] bundle ${bundle.id} (${bundle.name}): stored zip ${actual === null ? "is missing" : `hashes to ${actual}`}, recorded ${bundle.fileSha256}; download refused (${via})`,
    );
    audit(db, {
      labId: bundle.labId,
      userId: null,
      action: "bundle.integrity_failed",
      target: bundle.name,
      details: { bundleId: bundle.id, expected: bundle.fileSha256, actual, via },
    });
    throw new HttpError(500, "INTERNAL", "The stored bundle failed its integrity check and was not sent; the problem was logged for the lab");
  }
  return { filePath, fileName: `${bagNameFor(bundle.name)}.zip`, sizeBytes: bundle.sizeBytes, sha256: bundle.fileSha256 };
}

/**
 * A lab member's download: the bundle row of the lab, then the hash check.
 * @throws HttpError 404 when the bundle is not this lab's; 500 on a hash mismatch
 */
export async function bundleDownload(db: Db, dataDir: string, labId: string, bundleId: string): Promise<VerifiedBundleFile> {
  const row = db.select().from(bundles).where(and(eq(bundles.labId, labId), eq(bundles.id, bundleId))).get();
  if (!row) throw notFound("No such bundle in this lab");
  return verifiedBundleFile(db, dataDir, row, "app");
}

/** What the README of a bundle says about its own contents. */
interface ReadmeFacts {
  name: string;
  labName: string;
  organisation: string;
  softwareVersion: string;
  sampleCount: number;
  runCount: number;
  fitCount: number;
  comparison: { name: string; parameter: string; groupBy: string } | null;
  firstFit: { json: string; reduced: string } | null;
}

/**
 * The plain-text README.txt of a bundle: contents, units, the model equations, the numerical methods
 * and how to re-compute a fit from the files alone. Depends only on its inputs (no dates).
 * @param x facts about the bundle
 * @returns UTF-8 text with LF line ends
 */
export function bundleReadme(x: ReadmeFacts): string {
  const fitExample = x.firstFit
    ? `For example ${x.firstFit.json} describes a fit of ${x.firstFit.reduced}.`
    : "This bundle holds no approved fits; the steps below apply to any bundle that does.";
  return `${x.name}
${"=".repeat(Math.min(78, [...x.name].length))}

Heat-capacity data from ${x.labName}${x.organisation ? ` (${x.organisation})` : ""}, packed by Thetafold ${x.softwareVersion}
as a BagIt 1.0 bag (RFC 8493). This folder is the bag's payload: ${x.sampleCount} sample(s),
${x.runCount} run(s), ${x.fitCount} approved fit(s)${x.comparison ? `, and the comparison "${x.comparison.name}" (${x.comparison.parameter} by ${x.comparison.groupBy})` : ""}.

These are research data, not certified property data for engineering design.

Check the bag first: every file's SHA-256 is in ../manifest-sha256.txt, and ../bag-info.txt gives
Payload-Oxum (total bytes . number of files). Any BagIt tool checks both, e.g. \`thetafold verify-bundle\`.


1. What is where
----------------
datapackage.json        Frictionless Data Package (profile tabular-data-package): every table below
                        with its columns, types and units.
tables/samples.csv      samples: formula, molar mass, atoms per formula unit n, mass and its uncertainty,
                        batch, composition variable x.
tables/runs.csv         runs: raw file, its SHA-256, reduced table, and the reduction inputs used.
tables/fits.csv         one line per approved fit: model, window, chi-square, AIC, BIC.
tables/fit-parameters.csv
                        every parameter of every fit with its statistical and systematic uncertainty.
tables/comparison.csv   (when present) the comparison table with per-group statistics.
raw/NN-.../<file>       the calorimeter's export, byte for byte as uploaded (its SHA-256 is in runs.csv).
reduced/NN-....csv      one reduced table per run; masked points are kept, with masked = true.
fits/NN-....json        one file per approved fit: model definition, window, parameters, covariance and
                        correlation matrices (rows and columns in the order of freeParameters),
                        chi-square, software version and the SHA-256 of the fit's input.

CSV files are UTF-8, comma-separated, with a header line and LF ("\\n") line ends; an empty cell means no
value. Numbers are written with as many digits as it takes to read back the same binary64 value.


2. Units
--------
Everything is SI. Temperature T in K. Heat capacity per mole of formula units, J/(mol K), unless a
column says "per mol atoms" (divided by n, atoms per formula unit). Addenda runs hold the heat capacity
of the platform and grease in J/K. Parameters: thetaD, thetaE, gap in K; gamma in J/(mol K^2);
beta in J/(mol K^4); delta in J/(mol K^6); nuclearA in J K/mol; nD, nE, nS (atoms per formula unit) and
gRatio are dimensionless. R = k_B N_A = 8.31446261815324 J/(mol K) (CODATA 2018, exact).


3. Reduction
------------
The raw file is read with the column map and units in tables/runs.csv (the lab's choices at upload).
Points are sorted by T; points at the same T are averaged (rows_averaged says how many). Total heat
capacity C in J/K becomes molar heat capacity Cp = C M / m with M the molar mass and m the sample mass.
An addenda run, when one is named, is interpolated onto the run's temperatures (monotone cubic) and
subtracted before that; the uncertainties add in quadrature. Masked points stay in the table.


4. Models
---------
A fit's model is a sum of the components listed in its "model.components":

  electronic   C = gamma T                                            (Sommerfeld)
  t3, t5       C = beta T^3,  C = delta T^5                            (low-temperature expansion)
  debye        C = 9 nD R (T/thetaD)^3 Integral_0^(thetaD/T) t^4 e^t/(e^t - 1)^2 dt   (Debye, dimension 3)
               general dimension d: C = 3 nD R (d/x^d) Integral_0^x t^(d+1) e^t/(e^t - 1)^2 dt,
               x = thetaD/T
  einstein     C = 3 nE R x^2 e^x/(e^x - 1)^2,  x = thetaE/T                            (Einstein)
  schottky     C = nS R (gap/T)^2 g e^(gap/T)/(1 + g e^(gap/T))^2,  g = gRatio = g0/g1
               (two-level Schottky anomaly, gap in K)
  nuclear      C = nuclearA / T^2                                  (nuclear hyperfine tail)

Repeated components number their parameters: thetaE, thetaE2, ... When "constrainAtoms" is true the
Debye atoms are not a free parameter: nD = n - (sum of the nE).
The low-temperature expansion is fitted as C/T = gamma + beta T^2 (+ delta T^4); it gives
thetaD = (12 pi^4 n R / (5 beta))^(1/3).
Dulong-Petit limit: 3 n R.

Numerical method of the Debye integral: for 0 <= x <= 4 a Chebyshev series in u = 2 (x/4)^2 - 1
(Clenshaw summation); for x > 4 the exact form Gamma(d+2) zeta(d+1) minus the tail
sum_k k Integral_x^inf t^(d+1) e^(-kt) dt, each tail integral in closed form. Relative error about
1e-15. Any quadrature accurate to 1e-10 (e.g. scipy.integrate.quad) reproduces the fits.


5. Fitting and uncertainties
----------------------------
Weighted nonlinear least squares: the parameters minimise chi^2 = sum ((Cp_i - C(T_i))/sigma_i)^2 over
the points inside the window that are not masked. sigma_i is the point's stated uncertainty; the fit's
"weighting" field says which rule gave sigma to points without one. The minimiser is Levenberg-
Marquardt (ml-levenberg-marquardt) on whitened data, finished with Gauss-Newton steps; the fit stops
when the predicted decrease of chi^2 is below a small fraction of chi^2.
Covariance: C = s^2 (J^T W J)^-1 with W = diag(1/sigma^2), J the Jacobian at the minimum and
s^2 = chi^2/dof; sigmaStat = sqrt(C_ii) ("scaled"), sigmaStatUnscaled from (J^T W J)^-1 alone.
Systematic part: the fit is repeated with the sample mass at m + sigma_m and m - sigma_m;
sigmaSysMass is half the spread of each parameter. Quote statistical and systematic parts apart.
AIC = chi^2 + 2k and BIC = chi^2 + k ln N for k free parameters and N points (with stated sigma;
when no sigma is known, N ln(chi^2/N) + 2(k+1) and N ln(chi^2/N) + (k+1) ln N).
${x.comparison ? `
The comparison table weights each row by 1/sigma_total^2 with sigma_total = sigmaStat and sigmaSysMass in
quadrature; the group's weighted mean is sum(w x)/sum(w) with uncertainty (sum w)^(-1/2) (J. R. Taylor,
An Introduction to Error Analysis, 2nd ed., section 7.2). Rows more than 3 sigma_total from their
group's weighted mean are flagged.
` : ""}

6. Re-computing a fit from these files
--------------------------------------
${fitExample}
  1. Read the fit's JSON: model.components, window.minK and window.maxK, parameters (value, fixed).
  2. Read its reduced table (run.reducedTable, relative to this folder). Keep the rows with
     masked = false and window.minK <= temperature_K <= window.maxK.
  3. Build C(T) as the sum of the components above; hold the fixed parameters at their values.
  4. Minimise chi^2 with sigma = cp_sigma_J_per_mol_K, starting from the stored values (any weighted
     least-squares routine will do, e.g. scipy.optimize.least_squares on (Cp - C(T))/sigma).
     The minimum reproduces the stored values well within their sigmaStat, and chi^2 matches.
  5. sigmaStat follows from the covariance as in section 5.

Checking which points a fit used: the fit's inputSha256 is the SHA-256 of this UTF-8 text, every line
ending in LF ("\\n"):
    thetafold-fit-input v1
    T_K,Cp_J_per_mol_K,sigma_J_per_mol_K
    <T>,<Cp>,<sigma>            one line per point used, in table order
with each number in exponent form with 17 significant digits, as JavaScript's x.toExponential(16)
(e.g. 2.9814999999999998e+2). In Python: m, e = f"{x:.16e}".split("e"); f"{m}e{int(e):+d}".
The sigma field is empty when the fit used equal weights (a run without uncertainties). When only
some points of the window had a sigma, the others were given the median relative sigma of those that
had one; the sigma written is the one the fit used. Points masked at fit time are listed in the fit
JSON (maskedPointIndices) and are not in the text.


7. Safety and use
-----------------
The measurements behind these data used cryogens and, for field-dependent runs, magnets; follow your
own laboratory's rules and its safety officer when repeating them. The data are research results: check
them before any use in design.
`;
}
