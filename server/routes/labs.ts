import { Router } from "express";
import { MemberParams, UpdateMemberBody } from "@shared/schemas/labs";
import type { AppContext } from "../context";
import { labGuards } from "../middleware/lab-access";
import { listMembers, removeMember, updateMemberRole } from "../services/labs";

export function labsRouter(ctx: AppContext): Router {
  const router = Router();
  const guard = labGuards(ctx.db);

  router.get("/labs/:labId/members", guard.read, (_req, res) => {
    res.json(listMembers(ctx.db, res.locals.labId!));
  });

  router.patch("/labs/:labId/members/:userId", guard.lead, (req, res) => {
    const params = MemberParams.parse(req.params);
    const body = UpdateMemberBody.parse(req.body);
    res.json(updateMemberRole(ctx.db, params.labId, res.locals.user!.id, params.userId, body.role));
  });

  router.delete("/labs/:labId/members/:userId", guard.lead, (req, res) => {
    const params = MemberParams.parse(req.params);
    removeMember(ctx.db, params.labId, res.locals.user!.id, params.userId);
    res.status(204).end();
  });

  return router;
}
