import type { Request, Response } from "express";
import type { CachedBody } from "./services/result-cache";

/**
 * Sends a cached body with its entity tag, gzip-compressed when the client accepts it (compressed
 * once per body, not per request); 304 when the client already holds this version.
 */
export function sendCached(req: Request, res: Response, cached: CachedBody, type: string): void {
  const gzip = req.acceptsEncodings("gzip", "identity") === "gzip";
  const chosen = gzip ? cached.gzipped() : cached;
  res.setHeader("ETag", chosen.etag);
  res.setHeader("Vary", "Accept-Encoding");
  // The browser keeps the copy but asks again each time (the answer is a 304 while nothing changed).
  res.setHeader("Cache-Control", "private, no-cache");
  if (req.fresh) {
    res.status(304).end();
    return;
  }
  if (gzip) res.setHeader("Content-Encoding", "gzip");
  res.type(type).send(chosen.body);
}
