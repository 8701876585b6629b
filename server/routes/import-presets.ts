import { Router } from "express";
import { CreateImportPresetBody } from "@shared/schemas/ingest";
import { ImportPresetParams } from "@shared/schemas/import-presets";
import type { AppContext } from "../context";
import { labGuards } from "../middleware/lab-access";
import { createImportPreset, deleteImportPreset, listImportPresets } from "../services/import-presets";

/** GET/POST /api/labs/:labId/import-presets, DELETE /api/labs/:labId/import-presets/:presetId */
export function importPresetsRouter(ctx: AppContext): Router {
  const router = Router();
  const guard = labGuards(ctx.db);

  router.get("/labs/:labId/import-presets", guard.read, (_req, res) => {
    res.json(listImportPresets(ctx.db, res.locals.labId!));
  });

  router.post("/labs/:labId/import-presets", guard.write, (req, res) => {
    const body = CreateImportPresetBody.parse(req.body ?? {});
    res.status(201).json(createImportPreset(ctx.db, res.locals.labId!, res.locals.user!.id, body));
  });

  router.delete("/labs/:labId/import-presets/:presetId", guard.write, (req, res) => {
    const params = ImportPresetParams.parse(req.params);
    deleteImportPreset(ctx.db, params.labId, res.locals.user!.id, params.presetId);
    res.status(204).end();
  });

  return router;
}
