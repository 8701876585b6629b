import { Router } from "express";
import {
  CreateFitBody,
  FitChoiceQuery,
  FitParams,
  PreviewFitBody,
  RankBody,
  RunParams,
  ThermoQuery,
  type RankStreamLine,
} from "@shared/schemas/fits";
import type { AppContext } from "../context";
import { HttpError } from "../http-error";
import { labGuards } from "../middleware/lab-access";
import {
  approveFit,
  createFit,
  getFit,
  listRunFits,
  previewFit,
  rankRunModels,
  runThermoTable,
  runThetaDCurve,
  thermoTableCsv,
} from "../services/fits";

/**
 * The fit workspace API. Researchers and leads fit, preview and rank (all compute on the server);
 * guests read; only leads approve. Non-members get 404 from the lab gate.
 */
export function fitsRouter(ctx: AppContext): Router {
  const router = Router();
  const guard = labGuards(ctx.db);

  router.post("/labs/:labId/runs/:runId/fits/preview", guard.write, (req, res) => {
    const params = RunParams.parse(req.params);
    const body = PreviewFitBody.parse(req.body);
    res.json(previewFit(ctx.db, params, body));
  });

  router.post("/labs/:labId/runs/:runId/fits", guard.write, (req, res) => {
    const params = RunParams.parse(req.params);
    const body = CreateFitBody.parse(req.body);
    res.status(201).json(createFit(ctx.db, params, body, res.locals.user!.id));
  });

  router.get("/labs/:labId/runs/:runId/fits", guard.read, (req, res) => {
    const params = RunParams.parse(req.params);
    res.json(listRunFits(ctx.db, params));
  });

  router.post("/labs/:labId/runs/:runId/rank", guard.write, async (req, res) => {
    const params = RunParams.parse(req.params);
    const body = RankBody.parse(req.body);
    // A client that asks for NDJSON gets one progress line per candidate as it finishes, then the result.
    if (!(req.get("accept") ?? "").includes("application/x-ndjson")) {
      res.json(await rankRunModels(ctx.db, params, body));
      return;
    }
    let started = false;
    const write = (line: RankStreamLine) => {
      if (!started) {
        res.status(200).type("application/x-ndjson");
        res.setHeader("Cache-Control", "no-store");
        started = true;
      }
      res.write(`${JSON.stringify(line)}\n`);
    };
    try {
      const result = await rankRunModels(ctx.db, params, body, (done, total, label) =>
        write({ type: "progress", done, total, label }),
      );
      write({ type: "result", result });
      res.end();
    } catch (err) {
      if (!started) throw err;
      const e = err instanceof HttpError ? err : new HttpError(500, "INTERNAL", "Something went wrong on the server; the error was logged");
      if (!(err instanceof HttpError)) console.error(`[error] rank ${req.originalUrl}`, err);
      write({ type: "error", error: { code: e.code, message: e.message } });
      res.end();
    }
  });

  router.get("/labs/:labId/runs/:runId/theta-d", guard.read, (req, res) => {
    const params = RunParams.parse(req.params);
    const query = FitChoiceQuery.parse(req.query);
    res.json(runThetaDCurve(ctx.db, params, query.fitId));
  });

  router.get("/labs/:labId/runs/:runId/thermo", guard.read, (req, res) => {
    const params = RunParams.parse(req.params);
    const query = ThermoQuery.parse(req.query);
    res.json(runThermoTable(ctx.db, params, query.fitId, query.at));
  });

  router.get("/labs/:labId/runs/:runId/thermo.csv", guard.read, (req, res) => {
    const params = RunParams.parse(req.params);
    const query = ThermoQuery.parse(req.query);
    const { fileName, text } = thermoTableCsv(ctx.db, params, query.fitId, query.at);
    res.type("text/csv; charset=utf-8");
    res.setHeader("Content-Disposition", `attachment; filename="${fileName}"`);
    res.send(text);
  });

  router.get("/labs/:labId/fits/:fitId", guard.read, (req, res) => {
    const params = FitParams.parse(req.params);
    res.json(getFit(ctx.db, params));
  });

  router.post("/labs/:labId/fits/:fitId/approve", guard.lead, (req, res) => {
    const params = FitParams.parse(req.params);
    res.json(approveFit(ctx.db, params, res.locals.user!.id));
  });

  return router;
}
