import { Router } from "express";
import type { AppContext } from "../context";
import { requireUser } from "../middleware/session";
import { getMe } from "../services/users";

export function meRouter(ctx: AppContext): Router {
  const router = Router();
  router.get("/me", requireUser, (_req, res) => {
    res.json(getMe(ctx.db, res.locals.user!.id));
  });
  return router;
}
