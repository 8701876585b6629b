import { Router } from "express";
import { SetupBody, type SetupStatus } from "@shared/schemas/auth";
import type { AppContext } from "../context";
import { auditAccountEvent } from "../services/audit";
import { setupFirstAccount } from "../services/auth";
import { countUsers, getMe } from "../services/users";
import { authRateLimiter, startSession } from "./auth";

export function setupRouter(ctx: AppContext): Router {
  const router = Router();

  router.get("/setup", (_req, res) => {
    const status: SetupStatus = { needsSetup: countUsers(ctx.db) === 0, fakeMail: ctx.mailer.fake };
    res.json(status);
  });

  router.post("/setup", authRateLimiter(ctx), async (req, res) => {
    const body = SetupBody.parse(req.body);
    const { user } = await setupFirstAccount(ctx.db, body);
    await startSession(ctx, req, res, user.id);
    auditAccountEvent(ctx.db, user.id, "auth.sign_in");
    res.status(201).json(getMe(ctx.db, user.id));
  });

  return router;
}
