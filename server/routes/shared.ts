import { Router } from "express";
import { rateLimit } from "express-rate-limit";
import { SharedTokenParams } from "@shared/schemas/bundles";
import type { AppContext } from "../context";
import { HttpError } from "../http-error";
import { claimSharedDownload } from "../services/share-links";
import { sendZip } from "./bundles";

/** Failed share-link requests per minute per client address when AppDeps does not say. */
export const DEFAULT_SHARED_FAILURES_PER_MINUTE = 10;

/**
 * GET /api/shared/:token: a bundle through its share link, no session needed. Only failed attempts
 * (unknown, expired, revoked, used up) count against the per-address limit, so guessing tokens is slow
 * while a collaborator's downloads are never blocked. The limit is the app's authRateLimitPerMinute.
 */
export function sharedRouter(ctx: AppContext): Router {
  const router = Router();
  const limiter = rateLimit({
    windowMs: 60_000,
    limit: ctx.authRateLimitPerMinute ?? DEFAULT_SHARED_FAILURES_PER_MINUTE,
    standardHeaders: "draft-8",
    legacyHeaders: false,
    skipSuccessfulRequests: true,
    handler: (_req, _res, next) => {
      next(new HttpError(429, "RATE_LIMITED", "Too many share-link attempts from this address; wait a minute and try again"));
    },
  });

  router.get("/shared/:token", limiter, async (req, res) => {
    const { token } = SharedTokenParams.parse(req.params);
    res.setHeader("Referrer-Policy", "no-referrer");
    await sendZip(res, await claimSharedDownload(ctx.db, ctx.dataDir, token));
  });

  return router;
}
