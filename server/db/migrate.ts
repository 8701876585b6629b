import { fileURLToPath } from "node:url";
import { migrate } from "drizzle-orm/better-sqlite3/migrator";
import type { Db } from "./client";

/** The committed drizzle-kit migrations, resolved from this file so the cwd does not matter. */
export const migrationsFolder = fileURLToPath(new URL("../../drizzle", import.meta.url));

/** Applies every migration not yet applied (synchronous, incremental). */
export function runMigrations(db: Db): void {
  migrate(db, { migrationsFolder });
}
