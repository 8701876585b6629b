import type { RequestHandler } from "express";
import type { Session, User } from "lucia";
import type { Role } from "@shared/schemas/auth";
import type { AppLucia } from "../auth/lucia";
import { HttpError } from "../http-error";

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Locals {
      user: User | null;
      session: Session | null;
      /** Set by requireLab: the caller's role in the lab named by :labId. */
      role?: Role;
      labId?: string;
    }
  }
}

/** Reads the session cookie on every request; renews it when lucia says it is fresh, clears it when invalid. */
export function sessionMiddleware(lucia: AppLucia): RequestHandler {
  return async (req, res, next) => {
    const sessionId = lucia.readSessionCookie(req.headers.cookie ?? "");
    res.locals.user = null;
    res.locals.session = null;
    if (!sessionId) return next();
    const { session, user } = await lucia.validateSession(sessionId);
    if (session?.fresh) res.append("Set-Cookie", lucia.createSessionCookie(session.id).serialize());
    if (!session) res.append("Set-Cookie", lucia.createBlankSessionCookie().serialize());
    res.locals.user = user;
    res.locals.session = session;
    next();
  };
}

/** 401 unless signed in. */
export const requireUser: RequestHandler = (_req, res, next) => {
  if (!res.locals.user) throw new HttpError(401, "UNAUTHENTICATED", "Sign in first");
  next();
};

/** 401 unless signed in, 403 unless site administrator. */
export const requireSiteAdmin: RequestHandler = (_req, res, next) => {
  if (!res.locals.user) throw new HttpError(401, "UNAUTHENTICATED", "Sign in first");
  if (!res.locals.user.isSiteAdmin) throw new HttpError(403, "FORBIDDEN", "Only a site administrator may do this");
  next();
};
