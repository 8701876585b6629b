import path from "node:path";
import { readEnv } from "../env";
import { restoreBackup } from "../services/backup";

// npm run restore -- BACKUP_DIR [--force]: stop the server first; restores into DATA_DIR and checks it.
const env = readEnv();
const args = process.argv.slice(2);
const dir = args.find((a) => !a.startsWith("--"));
if (!dir) {
  console.error("Usage: npm run restore -- BACKUP_DIR [--force]");
  process.exit(2);
}
try {
  const manifest = restoreBackup(path.resolve(dir), path.resolve(env.DATA_DIR), args.includes("--force"));
  console.log(`Restored ${path.resolve(dir)} into ${path.resolve(env.DATA_DIR)} (backup of ${manifest.createdAt}); row counts and file hashes check.`);
} catch (err) {
  console.error(`Restore failed: ${(err as Error).message}`);
  process.exit(1);
}
