import { Router } from "express";
import { CompareQuery } from "@shared/schemas/compare";
import type { AppContext } from "../context";
import { labGuards } from "../middleware/lab-access";
import { compareCurves, compareFits, comparisonCsv } from "../services/compare";

/** Comparison of the lab's approved fits: table, CSV and plotting curves. Guests read all of it. */
export function compareRouter(ctx: AppContext): Router {
  const router = Router();
  const guard = labGuards(ctx.db);

  router.get("/labs/:labId/compare", guard.read, (req, res) => {
    const query = CompareQuery.parse(req.query);
    res.json(compareFits(ctx.db, res.locals.labId!, query));
  });

  router.get("/labs/:labId/compare.csv", guard.read, (req, res) => {
    const query = CompareQuery.parse(req.query);
    const text = comparisonCsv(compareFits(ctx.db, res.locals.labId!, query));
    res.type("text/csv; charset=utf-8");
    res.setHeader("Content-Disposition", `attachment; filename="comparison-${query.parameter}-by-${query.groupBy}.csv"`);
    res.send(text);
  });

  router.get("/labs/:labId/compare/curves", guard.read, (req, res) => {
    const query = CompareQuery.parse(req.query);
    res.json(compareCurves(ctx.db, res.locals.labId!, query));
  });

  return router;
}
