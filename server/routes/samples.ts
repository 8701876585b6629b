import { Router } from "express";
import { CreateSampleBody, SampleListQuery, SampleParams, UpdateSampleBody } from "@shared/schemas/samples";
import type { AppContext } from "../context";
import { labGuards } from "../middleware/lab-access";
import { createSample, deleteSample, getSampleDetail, listSamples, updateSample } from "../services/samples";

/** GET/POST /api/labs/:labId/samples, GET/PATCH/DELETE /api/labs/:labId/samples/:sampleId (DELETE: lead) */
export function samplesRouter(ctx: AppContext): Router {
  const router = Router();
  const guard = labGuards(ctx.db);

  router.get("/labs/:labId/samples", guard.read, (req, res) => {
    const query = SampleListQuery.parse(req.query);
    res.json(listSamples(ctx.db, res.locals.labId!, query));
  });

  router.post("/labs/:labId/samples", guard.write, (req, res) => {
    const body = CreateSampleBody.parse(req.body ?? {});
    res.status(201).json(createSample(ctx.db, res.locals.labId!, res.locals.user!.id, body));
  });

  router.get("/labs/:labId/samples/:sampleId", guard.read, (req, res) => {
    const params = SampleParams.parse(req.params);
    res.json(getSampleDetail(ctx.db, params.labId, params.sampleId));
  });

  router.patch("/labs/:labId/samples/:sampleId", guard.write, (req, res) => {
    const params = SampleParams.parse(req.params);
    const body = UpdateSampleBody.parse(req.body ?? {});
    res.json(updateSample(ctx.db, params.labId, res.locals.user!.id, params.sampleId, body));
  });

  router.delete("/labs/:labId/samples/:sampleId", guard.lead, (req, res) => {
    const params = SampleParams.parse(req.params);
    deleteSample(ctx.db, ctx.dataDir, params.labId, res.locals.user!.id, params.sampleId);
    res.status(204).end();
  });

  return router;
}
