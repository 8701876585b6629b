import type { RequestHandler } from "express";
import { HttpError } from "../http-error";

const SAFE = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * Refuses state-changing requests whose Origin header names another origin (CSRF defence on top of
 * SameSite=Lax cookies). Requests without an Origin header (curl, the CLI, same-origin GETs) pass.
 * @param allowed origins that may send writes, e.g. ["http://localhost:3000"]
 */
export function originCheck(allowed: string[]): RequestHandler {
  const set = new Set(allowed.map((o) => new URL(o).origin));
  return (req, _res, next) => {
    if (SAFE.has(req.method)) return next();
    const origin = req.headers.origin;
    if (origin === undefined) return next();
    if (!set.has(origin)) throw new HttpError(403, "FORBIDDEN", "Request refused: it came from another site");
    next();
  };
}
