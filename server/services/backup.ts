import { createHash } from "node:crypto";
import { copyFileSync, existsSync, mkdirSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from "node:fs";
import path from "node:path";
import Database from "better-sqlite3";

/** What a backup folder holds beside the database copy: enough to check a restore. */
export interface BackupManifest {
  format: "thetafold-backup-1";
  createdAt: string;
  /** Row count of every user table at the moment of the backup. */
  tables: Record<string, number>;
  /** Every stored file, relative to the data folder, with its SHA-256. */
  files: { path: string; sha256: string; bytes: number }[];
}

const DB_NAME = "thetafold.db";

function sha256File(file: string): string {
  return createHash("sha256").update(readFileSync(file)).digest("hex");
}

function listFiles(dir: string, base = dir): string[] {
  if (!existsSync(dir)) return [];
  const out: string[] = [];
  for (const name of readdirSync(dir).sort()) {
    const full = path.join(dir, name);
    if (statSync(full).isDirectory()) out.push(...listFiles(full, base));
    else out.push(path.relative(base, full));
  }
  return out;
}

/**
 * Row counts of every table except SQLite's own, read from an open database.
 * @param sqlite an open better-sqlite3 handle
 */
export function tableCounts(sqlite: Database.Database): Record<string, number> {
  const names = sqlite
    .prepare("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name")
    .all() as { name: string }[];
  const counts: Record<string, number> = {};
  for (const { name } of names) {
    counts[name] = (sqlite.prepare(`SELECT COUNT(*) AS n FROM "${name.replaceAll('"', '""')}"`).get() as { n: number }).n;
  }
  return counts;
}

/**
 * Makes an online backup of a running Thetafold: SQLite's backup API copies a consistent snapshot while
 * the server keeps writing, then every stored file is copied and hashed. Files are content-addressed and
 * never change, so copying them after the snapshot is safe; a file written after the snapshot is copied
 * too but no row of the snapshot points to it.
 * @param dataDir the DATA_DIR holding thetafold.db and files/
 * @param outDir a new or empty folder for the backup
 * @returns the manifest written to outDir/manifest.json
 * @throws Error when outDir is not empty or the database is missing
 */
export async function createBackup(dataDir: string, outDir: string): Promise<BackupManifest> {
  const dbFile = path.join(dataDir, DB_NAME);
  if (!existsSync(dbFile)) throw new Error(`No database at ${dbFile}`);
  if (existsSync(outDir) && readdirSync(outDir).length > 0) throw new Error(`${outDir} is not empty`);
  mkdirSync(outDir, { recursive: true });
  const source = new Database(dbFile, { fileMustExist: true });
  try {
    source.pragma("busy_timeout = 5000");
    await source.backup(path.join(outDir, DB_NAME));
  } finally {
    source.close();
  }
  const snapshot = new Database(path.join(outDir, DB_NAME), { readonly: true });
  let tables: Record<string, number>;
  try {
    tables = tableCounts(snapshot);
  } finally {
    snapshot.close();
  }
  const files: BackupManifest["files"] = [];
  for (const rel of listFiles(path.join(dataDir, "files"))) {
    const from = path.join(dataDir, "files", rel);
    const to = path.join(outDir, "files", rel);
    mkdirSync(path.dirname(to), { recursive: true });
    copyFileSync(from, to);
    files.push({ path: path.posix.join("files", ...rel.split(path.sep)), sha256: sha256File(to), bytes: statSync(to).size });
  }
  const manifest: BackupManifest = { format: "thetafold-backup-1", createdAt: new Date().toISOString(), tables, files };
  writeFileSync(path.join(outDir, "manifest.json"), JSON.stringify(manifest, null, 2) + "\n");
  return manifest;
}

/**
 * Restores a backup made by createBackup into a data folder, checking every file hash and every table's
 * row count against the manifest. Stop the server first: restoring under a running server is refused
 * only in the sense that the existing database is kept unless `force` is set.
 * @param backupDir folder written by createBackup
 * @param dataDir target DATA_DIR
 * @param force replace an existing database
 * @throws Error on a missing/garbled manifest, a hash mismatch, a count mismatch, or an existing database without force
 */
export function restoreBackup(backupDir: string, dataDir: string, force = false): BackupManifest {
  const manifest = JSON.parse(readFileSync(path.join(backupDir, "manifest.json"), "utf8")) as BackupManifest;
  if (manifest.format !== "thetafold-backup-1") throw new Error("Not a Thetafold backup (manifest format)");
  for (const f of manifest.files) {
    const got = sha256File(path.join(backupDir, f.path));
    if (got !== f.sha256) throw new Error(`Backup file ${f.path} is damaged (SHA-256 ${got}, expected ${f.sha256})`);
  }
  const target = path.join(dataDir, DB_NAME);
  if (existsSync(target) && !force) throw new Error(`${target} exists; pass --force to replace it`);
  mkdirSync(path.join(dataDir, "files"), { recursive: true });
  for (const suffix of ["", "-wal", "-shm"]) rmSync(target + suffix, { force: true });
  copyFileSync(path.join(backupDir, DB_NAME), target);
  for (const f of manifest.files) {
    const to = path.join(dataDir, ...f.path.split("/"));
    mkdirSync(path.dirname(to), { recursive: true });
    copyFileSync(path.join(backupDir, f.path), to);
  }
  const restored = new Database(target, { readonly: true });
  try {
    const counts = tableCounts(restored);
    for (const [name, n] of Object.entries(manifest.tables)) {
      if (counts[name] !== n) throw new Error(`Restored table ${name} has ${counts[name]} rows, the backup ${n}`);
    }
  } finally {
    restored.close();
  }
  return manifest;
}
