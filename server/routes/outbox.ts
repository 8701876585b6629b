import { Router } from "express";
import type { AppContext } from "../context";
import { HttpError } from "../http-error";
import { listOutbox } from "../mail/outbox";
import { requireSiteAdmin } from "../middleware/session";

export function outboxRouter(ctx: AppContext): Router {
  const router = Router();
  router.get("/outbox", requireSiteAdmin, (_req, res) => {
    if (!ctx.mailer.fake) throw new HttpError(404, "NOT_FOUND", "There is no outbox: mail goes to a real SMTP server");
    res.json(listOutbox(ctx.db));
  });
  return router;
}
