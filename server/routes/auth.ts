import type { Request, Response } from "express";
import { Router } from "express";
import { rateLimit } from "express-rate-limit";
import { ChangePasswordBody, RequestResetBody, ResetPasswordBody, SignInBody } from "@shared/schemas/auth";
import type { AppContext } from "../context";
import { HttpError } from "../http-error";
import { requireUser } from "../middleware/session";
import { auditAccountEvent } from "../services/audit";
import { authenticate, changePassword } from "../services/auth";
import { requestPasswordReset, resetPassword } from "../services/password-resets";
import { getMe } from "../services/users";

/** Attempts per minute per client address on sign-in, reset and setup when AppDeps does not say. */
export const DEFAULT_AUTH_RATE_LIMIT_PER_MINUTE = 10;

/**
 * A per-address limiter for one sensitive route (each route gets its own counter). Over the limit, the
 * request goes to the error handler as 429 RATE_LIMITED, in the usual error body.
 * @param ctx app context (authRateLimitPerMinute)
 * @param options skipSuccessfulRequests: count only failures (sign-in, so a lab behind one address is not locked out)
 */
export function authRateLimiter(ctx: AppContext, options: { skipSuccessfulRequests?: boolean } = {}) {
  return rateLimit({
    windowMs: 60_000,
    limit: ctx.authRateLimitPerMinute ?? DEFAULT_AUTH_RATE_LIMIT_PER_MINUTE,
    standardHeaders: "draft-8",
    legacyHeaders: false,
    skipSuccessfulRequests: options.skipSuccessfulRequests ?? false,
    handler: (_req, _res, next) => {
      next(new HttpError(429, "RATE_LIMITED", "Too many attempts from this address; wait a minute and try again"));
    },
  });
}

/** Replaces any session cookie already queued on the response (e.g. a renewal from the session middleware). */
function putSessionCookie(ctx: AppContext, res: Response, cookie: string): void {
  const queued = res.getHeader("Set-Cookie");
  const list = (Array.isArray(queued) ? queued : queued === undefined ? [] : [String(queued)]).filter(
    (c) => !c.startsWith(`${ctx.lucia.sessionCookieName}=`),
  );
  res.setHeader("Set-Cookie", [...list, cookie]);
}

/**
 * Signs the user in on this response: invalidates whatever session id the request carried (rotation), makes
 * a new session and sets its cookie.
 */
export async function startSession(ctx: AppContext, req: Request, res: Response, userId: string): Promise<void> {
  const carried = ctx.lucia.readSessionCookie(req.headers.cookie ?? "");
  if (carried) await ctx.lucia.invalidateSession(carried);
  const session = await ctx.lucia.createSession(userId, {});
  putSessionCookie(ctx, res, ctx.lucia.createSessionCookie(session.id).serialize());
}

/** Ends the session the request carried, if any, and blanks the cookie. */
async function endSession(ctx: AppContext, req: Request, res: Response): Promise<void> {
  const carried = ctx.lucia.readSessionCookie(req.headers.cookie ?? "");
  if (carried) await ctx.lucia.invalidateSession(carried);
  putSessionCookie(ctx, res, ctx.lucia.createBlankSessionCookie().serialize());
}

export function authRouter(ctx: AppContext): Router {
  const router = Router();

  router.post("/auth/sign-in", authRateLimiter(ctx, { skipSuccessfulRequests: true }), async (req, res) => {
    const body = SignInBody.parse(req.body);
    const user = await authenticate(ctx.db, body.email, body.password);
    await startSession(ctx, req, res, user.id);
    auditAccountEvent(ctx.db, user.id, "auth.sign_in");
    res.json(getMe(ctx.db, user.id));
  });

  router.post("/auth/sign-out", async (req, res) => {
    const user = res.locals.user;
    await endSession(ctx, req, res);
    if (user) auditAccountEvent(ctx.db, user.id, "auth.sign_out");
    res.status(204).end();
  });

  router.post("/auth/password", requireUser, async (req, res) => {
    const body = ChangePasswordBody.parse(req.body);
    const userId = res.locals.user!.id;
    await changePassword(ctx.db, userId, body.currentPassword, body.newPassword);
    await ctx.lucia.invalidateUserSessions(userId);
    await startSession(ctx, req, res, userId);
    res.status(204).end();
  });

  router.post("/auth/reset-request", authRateLimiter(ctx), (req, res) => {
    const body = RequestResetBody.parse(req.body);
    // Not awaited: answering only after the mail went out would tell, by timing, that the account exists.
    void requestPasswordReset(ctx.db, ctx.mailer, { email: body.email, publicUrl: ctx.publicUrl });
    res.status(202).end();
  });

  router.post("/auth/reset", authRateLimiter(ctx), async (req, res) => {
    const body = ResetPasswordBody.parse(req.body);
    const { userId } = await resetPassword(ctx.db, body.token, body.newPassword);
    await ctx.lucia.invalidateUserSessions(userId);
    await endSession(ctx, req, res);
    res.status(204).end();
  });

  return router;
}
