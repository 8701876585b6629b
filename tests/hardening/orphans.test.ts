import { existsSync, mkdirSync, writeFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { storedFiles } from "../../server/db/schema";
import { putStoredFile, storedFilePath, tempFolder } from "../../server/services/files";
import { sweepOrphanFiles } from "../../server/services/orphans";
import { makeTestApp } from "../helpers/app";

describe("start-up sweep of the file store (server/services/orphans.ts)", () => {
  it("removes half-written and unreferenced files, keeps referenced ones, reports rows whose file is gone, and logs each", () => {
    const t = makeTestApp();
    const kept = putStoredFile(t.dataDir, Buffer.from("kept: a row names me\n"));
    t.db.insert(storedFiles).values({ sha256: kept.sha256, sizeBytes: 21, createdAt: Date.now() }).run();
    const orphan = putStoredFile(t.dataDir, Buffer.from("orphan: written, then the process died before the commit\n"));
    mkdirSync(tempFolder(t.dataDir), { recursive: true });
    writeFileSync(path.join(tempFolder(t.dataDir), "half-written.part"), "half");
    const gone = "ab".repeat(32);
    t.db.insert(storedFiles).values({ sha256: gone, sizeBytes: 5, createdAt: Date.now() }).run();
    // A file the store did not name is not ours to delete.
    const stranger = path.join(t.dataDir, "files", "notes.txt");
    writeFileSync(stranger, "left by a person");

    const lines: string[] = [];
    const report = sweepOrphanFiles(t.db, t.dataDir, (l) => lines.push(l));

    expect(report.tempFilesRemoved).toBe(1);
    expect(report.orphansRemoved).toEqual([orphan.sha256]);
    expect(report.missingFiles).toEqual([gone]);
    expect(existsSync(orphan.filePath)).toBe(false);
    expect(existsSync(kept.filePath)).toBe(true);
    expect(existsSync(storedFilePath(t.dataDir, kept.sha256))).toBe(true);
    expect(existsSync(stranger)).toBe(true);
    expect(lines.some((l) => l.includes(orphan.sha256))).toBe(true);
    expect(lines.some((l) => l.includes("half-written"))).toBe(true);
    expect(lines.some((l) => l.includes(gone) && l.includes("ERROR"))).toBe(true);
  });

  it("does nothing and logs nothing on a clean store", () => {
    const t = makeTestApp();
    const lines: string[] = [];
    expect(sweepOrphanFiles(t.db, t.dataDir, (l) => lines.push(l))).toEqual({ tempFilesRemoved: 0, orphansRemoved: [], missingFiles: [] });
    expect(lines).toEqual([]);
  });
});
