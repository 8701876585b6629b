import { spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import { mkdirSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { openDb } from "../../server/db/client";
import { runMigrations } from "../../server/db/migrate";
import { labs, storedFiles, users } from "../../server/db/schema";
import { createBackup, restoreBackup, tableCounts } from "../../server/services/backup";

function sha(buf: Buffer | string) {
  return createHash("sha256").update(buf).digest("hex");
}

/** A data folder with a migrated file database, a few rows and two stored files. */
function makeDataDir() {
  const dataDir = mkdtempSync(path.join(tmpdir(), "thetafold-backup-src-"));
  const db = openDb(path.join(dataDir, "thetafold.db"));
  runMigrations(db);
  for (let i = 0; i < 5; i++) {
    db.insert(users).values({ id: `u${i}`, email: `u${i}@example.org`, displayName: `U ${i}`, passwordHash: "x", createdAt: i }).run();
  }
  db.insert(labs).values({ id: "lab1", name: "Backup lab", createdAt: 0 }).run();
  for (const content of ["T,Cp\n2,0.001\n", "T;Cp\n3;0,002\n"]) {
    const hash = sha(content);
    mkdirSync(path.join(dataDir, "files", hash.slice(0, 2)), { recursive: true });
    writeFileSync(path.join(dataDir, "files", hash.slice(0, 2), hash), content);
    db.insert(storedFiles).values({ sha256: hash, sizeBytes: content.length, createdAt: 0 }).run();
  }
  return { dataDir, db };
}

describe("backup and restore", () => {
  it("round-trips: restored row counts and file hashes equal the source's, taken while the database is open in WAL mode", async () => {
    const { dataDir, db } = makeDataDir();
    const before = tableCounts(db.$client);
    const out = path.join(mkdtempSync(path.join(tmpdir(), "thetafold-backup-out-")), "b1");
    const manifest = await createBackup(dataDir, out);
    // A write after the snapshot is not in the backup.
    db.insert(users).values({ id: "late", email: "late@example.org", displayName: "Late", passwordHash: "x", createdAt: 9 }).run();
    db.$client.close();
    expect(manifest.tables).toEqual(before);
    expect(manifest.files).toHaveLength(2);

    const target = mkdtempSync(path.join(tmpdir(), "thetafold-backup-dst-"));
    restoreBackup(out, target);
    const restored = openDb(path.join(target, "thetafold.db"));
    expect(tableCounts(restored.$client)).toEqual(before);
    expect(restored.$client.pragma("integrity_check", { simple: true })).toBe("ok");
    restored.$client.close();
    for (const f of manifest.files) {
      const original = readFileSync(path.join(dataDir, f.path));
      expect(sha(readFileSync(path.join(target, f.path)))).toBe(sha(original));
    }
  });

  it("refuses a backup whose stored file was altered, and an existing database without force", async () => {
    const { dataDir, db } = makeDataDir();
    db.$client.close();
    const out = path.join(mkdtempSync(path.join(tmpdir(), "thetafold-backup-out-")), "b2");
    const manifest = await createBackup(dataDir, out);
    expect(() => restoreBackup(out, dataDir)).toThrow(/exists/);
    writeFileSync(path.join(out, manifest.files[0].path), "tampered");
    const target = mkdtempSync(path.join(tmpdir(), "thetafold-backup-dst-"));
    expect(() => restoreBackup(out, target)).toThrow(/damaged/);
  });

  it("works through npm run backup / npm run restore (the scripts the README names)", () => {
    const { dataDir, db } = makeDataDir();
    db.$client.close();
    const out = path.join(mkdtempSync(path.join(tmpdir(), "thetafold-backup-out-")), "b3");
    const env = { ...process.env, DATA_DIR: dataDir };
    const b = spawnSync(process.execPath, ["--import", "tsx", "server/scripts/backup.ts", out], { env, encoding: "utf8" });
    expect(b.status, b.stderr).toBe(0);
    const target = mkdtempSync(path.join(tmpdir(), "thetafold-backup-dst-"));
    const r = spawnSync(process.execPath, ["--import", "tsx", "server/scripts/restore.ts", out], {
      env: { ...process.env, DATA_DIR: target },
      encoding: "utf8",
    });
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/row counts and file hashes check/);
  });
});
