import { and, eq, sql } from "drizzle-orm";
import type { RequestHandler } from "express";
import type { Role } from "@shared/schemas/auth";
import type { Db } from "../db/client";
import { memberships } from "../db/schema";
import { HttpError } from "../http-error";

const rank: Record<Role, number> = { guest: 0, researcher: 1, lead: 2 };

/**
 * The one gate for everything under /api/labs/:labId. Takes the lab from the URL, checks the session and
 * the caller's membership, and refuses a role below `minimum`. A non-member gets 404, as if the lab did not
 * exist, so ids of other labs leak nothing. Sets res.locals.labId and res.locals.role.
 */
export function requireLab(db: Db, minimum: Role): RequestHandler {
  // Prepared once per guard: this query runs on every lab request.
  const membership = db
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.labId, sql.placeholder("labId")), eq(memberships.userId, sql.placeholder("userId"))))
    .prepare();
  return (req, res, next) => {
    const user = res.locals.user;
    if (!user) throw new HttpError(401, "UNAUTHENTICATED", "Sign in first");
    const labId = String(req.params.labId ?? "");
    const row = membership.get({ labId, userId: user.id });
    if (!row) throw new HttpError(404, "NOT_FOUND", "No such lab");
    if (rank[row.role] < rank[minimum]) {
      throw new HttpError(403, "FORBIDDEN", `This needs the ${minimum} role in this lab; yours is ${row.role}`);
    }
    res.locals.labId = labId;
    res.locals.role = row.role;
    next();
  };
}

/** Shorthands used by the route files. */
export const labGuards = (db: Db) => ({
  read: requireLab(db, "guest"),
  write: requireLab(db, "researcher"),
  lead: requireLab(db, "lead"),
});
