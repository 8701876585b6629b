import { createHash } from "node:crypto";
import { gzipSync } from "node:zlib";
import { LRUCache } from "lru-cache";
import type { Db } from "../db/client";

/** A computed response body, ready to send, and its entity tag. */
export interface CachedBody {
  body: Buffer;
  /** Strong entity tag: the body's SHA-256, quoted (RFC 9110 §8.8.3). */
  etag: string;
  /** The body gzip-compressed, made on first use and kept with it; its own entity tag ends in "-gzip". */
  gzipped(): { body: Buffer; etag: string };
}

/** Counts since the cache was made (the tests read them). */
export interface ResultCacheStats {
  hits: number;
  misses: number;
}

export interface ResultCache {
  /**
   * The body stored under `key` if the database has not changed since it was computed; else `compute`
   * runs now and its result is stored. A throw from `compute` passes through and nothing is stored.
   * @param key everything the body depends on besides the database (lab, route, normalised query)
   * @param compute the body's text
   */
  get(key: string, compute: () => string): CachedBody;
  stats(): ResultCacheStats;
}

/** Default cap on the cached bodies, in bytes (a 2,000-row comparison is about 1.4 MB of JSON). */
export const RESULT_CACHE_MAX_BYTES = 64 * 1024 * 1024;

/**
 * Read results kept until the database changes. Validity is one token read from SQLite on each get:
 * `total_changes()` counts every row this connection (the server's) has inserted, updated or deleted,
 * and `PRAGMA data_version` moves when any other connection commits (the CLI, a restore). When the
 * token moves, every entry is stale: coarse (a write anywhere recomputes the next read everywhere) but
 * it cannot miss a write path. Computation is synchronous (better-sqlite3), so no write can land
 * between reading the token and storing the body.
 * @param db the database the bodies are computed from
 * @param maxBytes cap on the stored bodies; least recently used ones go first, and a body larger than
 *   a quarter of the cap is sent but not kept
 */
export function createResultCache(db: Db, maxBytes = RESULT_CACHE_MAX_BYTES): ResultCache {
  const totalChanges = db.$client.prepare("SELECT total_changes()").pluck();
  const dataVersion = db.$client.prepare("PRAGMA data_version").pluck();
  const token = (): string => `${String(dataVersion.get())}:${String(totalChanges.get())}`;
  const entries = new LRUCache<string, CachedBody & { token: string }>({
    maxSize: maxBytes,
    maxEntrySize: Math.floor(maxBytes / 4),
    // The gzip copy is a small fraction of the body; the cap counts the body alone.
    sizeCalculation: (v) => Math.max(1, v.body.byteLength),
  });
  let hits = 0;
  let misses = 0;
  return {
    get(key, compute) {
      const now = token();
      const hit = entries.get(key);
      if (hit && hit.token === now) {
        hits++;
        return hit;
      }
      misses++;
      const body = Buffer.from(compute(), "utf8");
      const hash = createHash("sha256").update(body).digest("base64url");
      let gz: { body: Buffer; etag: string } | undefined;
      const entry = {
        body,
        etag: `"${hash}"`,
        token: now,
        // Level 3: half the time of the default level 6 for about 9 % more bytes (measured on a 1.4 MB comparison).
        gzipped: () => (gz ??= { body: gzipSync(body, { level: 3 }), etag: `"${hash}-gzip"` }),
      };
      entries.set(key, entry);
      return entry;
    },
    stats: () => ({ hits, misses }),
  };
}
