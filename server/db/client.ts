import Database from "better-sqlite3";
import { drizzle, type BetterSQLite3Database } from "drizzle-orm/better-sqlite3";
import * as schema from "./schema";

export type Db = BetterSQLite3Database<typeof schema> & { $client: Database.Database };

/**
 * Opens the SQLite database with the pragmas Thetafold relies on: WAL journal (readers never block the
 * writer), a busy timeout so concurrent writers wait instead of failing with SQLITE_BUSY, and foreign keys.
 * @param file path of the database file, or ":memory:" for tests
 */
export function openDb(file: string): Db {
  const sqlite = new Database(file);
  if (file !== ":memory:") sqlite.pragma("journal_mode = WAL");
  sqlite.pragma("busy_timeout = 5000");
  sqlite.pragma("foreign_keys = ON");
  sqlite.pragma("synchronous = NORMAL");
  return drizzle(sqlite, { schema }) as Db;
}
