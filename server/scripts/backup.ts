import path from "node:path";
import { readEnv } from "../env";
import { createBackup } from "../services/backup";

// npm run backup [-- OUT_DIR]: an online backup of DATA_DIR (the server may keep running).
const env = readEnv();
const stamp = new Date().toISOString().replace(/[:.]/g, "-");
const outDir = path.resolve(process.argv[2] ?? path.join("backups", `thetafold-${stamp}`));
try {
  const manifest = await createBackup(path.resolve(env.DATA_DIR), outDir);
  const rows = Object.values(manifest.tables).reduce((a, b) => a + b, 0);
  console.log(`Backup written to ${outDir}: ${rows} rows in ${Object.keys(manifest.tables).length} tables, ${manifest.files.length} stored files.`);
} catch (err) {
  console.error(`Backup failed: ${(err as Error).message}`);
  process.exit(1);
}
