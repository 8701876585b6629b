import { createHash, randomBytes } from "node:crypto";
import { existsSync, mkdirSync, readdirSync, renameSync, rmSync, statSync, unlinkSync, writeFileSync } from "node:fs";
import path from "node:path";
import { eq, inArray } from "drizzle-orm";
import type { Db } from "../db/client";
import { bundles, runs, storedFiles } from "../db/schema";

/*
 * The content-addressed file store: every raw upload (and later every bundle) lives once under
 * `${dataDir}/files/<first two hex digits>/<sha256>`, byte for byte as received. The two-digit fan-out
 * keeps any one folder small. New files are written to `${dataDir}/files/.tmp/` first and renamed into
 * place (rename is atomic on one file system), so a crash never leaves a half-written file under its
 * final name. Everything here is synchronous on purpose: a commit (write, transaction, clean-up) then
 * runs without interleaving with another request in this process.
 */

/** Lower-case hex SHA-256 of a buffer. */
export function sha256Hex(bytes: Uint8Array): string {
  return createHash("sha256").update(bytes).digest("hex");
}

/**
 * Where a stored file lives.
 * @param dataDir the app's DATA_DIR
 * @param sha256 64 lower-case hex digits
 * @throws Error when sha256 is not 64 hex digits (never builds a path from anything else)
 */
export function storedFilePath(dataDir: string, sha256: string): string {
  if (!/^[0-9a-f]{64}$/.test(sha256)) throw new Error(`not a SHA-256: ${sha256.slice(0, 80)}`);
  return path.join(dataDir, "files", sha256.slice(0, 2), sha256);
}

/** The folder of half-written files. */
export function tempFolder(dataDir: string): string {
  return path.join(dataDir, "files", ".tmp");
}

/**
 * Writes bytes under their hash unless a file of that hash is already there.
 * @param dataDir the app's DATA_DIR
 * @param bytes the raw upload
 * @returns the hash, the final path and whether this call created the file (only then may a failed
 *   commit remove it)
 */
export function putStoredFile(dataDir: string, bytes: Uint8Array): { sha256: string; filePath: string; created: boolean } {
  const sha256 = sha256Hex(bytes);
  const filePath = storedFilePath(dataDir, sha256);
  if (existsSync(filePath) && statSync(filePath).size === bytes.byteLength) return { sha256, filePath, created: false };
  const tmpDir = tempFolder(dataDir);
  mkdirSync(tmpDir, { recursive: true });
  mkdirSync(path.dirname(filePath), { recursive: true });
  const tmp = path.join(tmpDir, `${sha256}.${randomBytes(6).toString("hex")}`);
  try {
    writeFileSync(tmp, bytes, { flush: true });
    renameSync(tmp, filePath);
  } catch (err) {
    rmSync(tmp, { force: true });
    throw err;
  }
  return { sha256, filePath, created: true };
}

/** True when a stored_files row, a run or a bundle still names this hash. */
export function isFileReferenced(db: Db, sha256: string): boolean {
  if (db.select({ s: storedFiles.sha256 }).from(storedFiles).where(eq(storedFiles.sha256, sha256)).get()) return true;
  if (db.select({ id: runs.id }).from(runs).where(eq(runs.fileSha256, sha256)).limit(1).get()) return true;
  return !!db.select({ id: bundles.id }).from(bundles).where(eq(bundles.fileSha256, sha256)).limit(1).get();
}

/**
 * Removes a stored file that nothing references any more (after a failed commit or a delete).
 * @returns true when a file was removed
 */
export function removeIfUnreferenced(db: Db, dataDir: string, sha256: string): boolean {
  if (isFileReferenced(db, sha256)) return false;
  const filePath = storedFilePath(dataDir, sha256);
  if (!existsSync(filePath)) return false;
  unlinkSync(filePath);
  return true;
}

/**
 * Drops the stored_files rows among `shas` that no run or bundle references, inside the caller's
 * transaction; the caller unlinks the returned files after the transaction commits.
 * @returns the hashes whose rows were dropped
 */
export function dropUnreferencedFileRows(tx: Pick<Db, "select" | "delete">, shas: readonly string[]): string[] {
  const unique = [...new Set(shas)];
  if (unique.length === 0) return [];
  const usedByRuns = new Set(
    tx.select({ s: runs.fileSha256 }).from(runs).where(inArray(runs.fileSha256, unique)).all().map((r) => r.s),
  );
  const usedByBundles = new Set(
    tx.select({ s: bundles.fileSha256 }).from(bundles).where(inArray(bundles.fileSha256, unique)).all().map((r) => r.s),
  );
  const free = unique.filter((s) => !usedByRuns.has(s) && !usedByBundles.has(s));
  if (free.length > 0) tx.delete(storedFiles).where(inArray(storedFiles.sha256, free)).run();
  return free;
}

/** Unlinks files by hash, ignoring ones already gone. */
export function unlinkStoredFiles(dataDir: string, shas: readonly string[]): void {
  for (const sha of shas) rmSync(storedFilePath(dataDir, sha), { force: true });
}

/**
 * Removes half-written files left by a crash (call at start-up, before serving).
 * @returns how many were removed
 */
export function sweepTempFiles(dataDir: string): number {
  const dir = tempFolder(dataDir);
  if (!existsSync(dir)) return 0;
  const names = readdirSync(dir);
  for (const n of names) rmSync(path.join(dir, n), { force: true });
  return names.length;
}
