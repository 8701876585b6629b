import { Router } from "express";
import type { AppContext } from "../context";
import { labGuards } from "../middleware/lab-access";
import { listAudit } from "../services/audit";

export function auditRouter(ctx: AppContext): Router {
  const router = Router();
  const guard = labGuards(ctx.db);
  router.get("/labs/:labId/audit", guard.lead, (_req, res) => {
    res.json(listAudit(ctx.db, res.locals.labId!));
  });
  return router;
}
