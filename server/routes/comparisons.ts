import { Router } from "express";
import { ComparisonParams, CreateComparisonBody } from "@shared/schemas/compare";
import type { AppContext } from "../context";
import { labGuards } from "../middleware/lab-access";
import { createComparison, deleteComparison, getComparison, listComparisons } from "../services/comparisons";

/** Saved comparisons (lab data): guests read, researchers and leads save and delete. */
export function comparisonsRouter(ctx: AppContext): Router {
  const router = Router();
  const guard = labGuards(ctx.db);

  router.get("/labs/:labId/comparisons", guard.read, (_req, res) => {
    res.json(listComparisons(ctx.db, res.locals.labId!));
  });

  router.post("/labs/:labId/comparisons", guard.write, (req, res) => {
    const body = CreateComparisonBody.parse(req.body);
    res.status(201).json(createComparison(ctx.db, res.locals.labId!, res.locals.user!.id, body));
  });

  router.get("/labs/:labId/comparisons/:comparisonId", guard.read, (req, res) => {
    const params = ComparisonParams.parse(req.params);
    res.json(getComparison(ctx.db, params.labId, params.comparisonId));
  });

  router.delete("/labs/:labId/comparisons/:comparisonId", guard.write, (req, res) => {
    const params = ComparisonParams.parse(req.params);
    deleteComparison(ctx.db, params.labId, params.comparisonId);
    res.status(204).end();
  });

  return router;
}
