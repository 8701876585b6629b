import { existsSync, readdirSync, rmSync, statSync } from "node:fs";
import path from "node:path";
import type { Db } from "../db/client";
import { storedFiles } from "../db/schema";
import { isFileReferenced, storedFilePath, sweepTempFiles } from "./files";

/*
 * The start-up sweep of the file store. A commit writes its file first and its rows after, in one
 * transaction; a delete drops the rows first and unlinks after. So a process killed in between leaves at
 * most a file that no row names (never a row whose file is missing), plus half-written files in .tmp/.
 * Both are removed here, before the server takes requests, and each removal is logged.
 */

/** What one sweep found and did. */
export interface OrphanSweepReport {
  /** Half-written files removed from files/.tmp/. */
  tempFilesRemoved: number;
  /** SHA-256 of stored files removed because no stored_files row, run or bundle names them. */
  orphansRemoved: string[];
  /** SHA-256 of stored_files rows whose file is missing or has the wrong size (reported, not changed). */
  missingFiles: string[];
}

const SHA256 = /^[0-9a-f]{64}$/;
const FAN_OUT = /^[0-9a-f]{2}$/;

/**
 * Removes half-written and unreferenced files from DATA_DIR/files and checks that every stored_files
 * row still has its file. Call it after migrations and before listening (nothing else may write then).
 * @param db the database
 * @param dataDir the app's DATA_DIR (files live in dataDir/files/<2 hex>/<sha256>)
 * @param log where each finding goes (one line each)
 * @returns counts and hashes of what was removed or found missing
 */
export function sweepOrphanFiles(db: Db, dataDir: string, log: (line: string) => void = console.log): OrphanSweepReport {
  const report: OrphanSweepReport = { tempFilesRemoved: sweepTempFiles(dataDir), orphansRemoved: [], missingFiles: [] };
  if (report.tempFilesRemoved > 0) log(`[files] removed ${report.tempFilesRemoved} half-written file(s) left in files/.tmp by an interrupted upload`);

  const root = path.join(dataDir, "files");
  const onDisk = new Set<string>();
  if (existsSync(root)) {
    for (const folder of readdirSync(root)) {
      if (!FAN_OUT.test(folder)) continue;
      const dir = path.join(root, folder);
      if (!statSync(dir).isDirectory()) continue;
      for (const name of readdirSync(dir)) {
        // Only names the store itself makes are touched; anything else is left for a person to look at.
        if (!SHA256.test(name) || name.slice(0, 2) !== folder) continue;
        if (isFileReferenced(db, name)) {
          onDisk.add(name);
          continue;
        }
        rmSync(path.join(dir, name), { force: true });
        report.orphansRemoved.push(name);
        log(`[files] removed orphan file ${folder}/${name}: no stored_files row, run or bundle names it (an interrupted commit or delete)`);
      }
    }
  }

  for (const row of db.select().from(storedFiles).all()) {
    const filePath = storedFilePath(dataDir, row.sha256);
    const present = onDisk.has(row.sha256) && existsSync(filePath) && statSync(filePath).size === row.sizeBytes;
    if (!present) {
      report.missingFiles.push(row.sha256);
      log(`[files] ERROR: stored file ${row.sha256} is missing or has the wrong size; restore it from a backup`);
    }
  }
  return report;
}
