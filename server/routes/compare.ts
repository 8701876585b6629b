import { Router } from "express";
import { CompareQuery } from "@shared/schemas/compare";
import type { AppContext } from "../context";
import { labGuards } from "../middleware/lab-access";
import { compareCurves, compareFits, comparisonCsv } from "../services/compare";
import { sendCached } from "../send-cached";
import { createResultCache } from "../services/result-cache";

/** The cache key of a comparison: lab, route and the query with its id lists in a canonical order. */
function cacheKey(route: string, labId: string, query: CompareQuery): string {
  const ids = (list: readonly string[]) => [...new Set(list)].sort().join(",");
  return [route, labId, query.parameter, query.groupBy, ids(query.batchIds), ids(query.sampleIds)].join("\u0000");
}

/**
 * Comparison of the lab's approved fits: table, CSV and plotting curves. Guests read all of it.
 * Answers are computed once per database state (services/result-cache): any write recomputes them.
 */
export function compareRouter(ctx: AppContext): Router {
  const router = Router();
  const guard = labGuards(ctx.db);
  const cache = createResultCache(ctx.db);

  router.get("/labs/:labId/compare", guard.read, (req, res) => {
    const query = CompareQuery.parse(req.query);
    const labId = res.locals.labId!;
    const cached = cache.get(cacheKey("table", labId, query), () => JSON.stringify(compareFits(ctx.db, labId, query)));
    sendCached(req, res, cached, "application/json; charset=utf-8");
  });

  router.get("/labs/:labId/compare.csv", guard.read, (req, res) => {
    const query = CompareQuery.parse(req.query);
    const labId = res.locals.labId!;
    const cached = cache.get(cacheKey("csv", labId, query), () => comparisonCsv(compareFits(ctx.db, labId, query)));
    res.setHeader("Content-Disposition", `attachment; filename="comparison-${query.parameter}-by-${query.groupBy}.csv"`);
    sendCached(req, res, cached, "text/csv; charset=utf-8");
  });

  router.get("/labs/:labId/compare/curves", guard.read, (req, res) => {
    const query = CompareQuery.parse(req.query);
    const labId = res.locals.labId!;
    const cached = cache.get(cacheKey("curves", labId, query), () => JSON.stringify(compareCurves(ctx.db, labId, query)));
    sendCached(req, res, cached, "application/json; charset=utf-8");
  });

  return router;
}
