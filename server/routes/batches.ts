import { Router } from "express";
import { CreateBatchBody } from "@shared/schemas/samples";
import type { AppContext } from "../context";
import { labGuards } from "../middleware/lab-access";
import { createBatch, listBatches } from "../services/batches";

/** GET/POST /api/labs/:labId/batches */
export function batchesRouter(ctx: AppContext): Router {
  const router = Router();
  const guard = labGuards(ctx.db);

  router.get("/labs/:labId/batches", guard.read, (_req, res) => {
    res.json(listBatches(ctx.db, res.locals.labId!));
  });

  router.post("/labs/:labId/batches", guard.write, (req, res) => {
    const body = CreateBatchBody.parse(req.body ?? {});
    res.status(201).json(createBatch(ctx.db, res.locals.labId!, res.locals.user!.id, body));
  });

  return router;
}
