import { createHash } from "node:crypto";
import { readFileSync } from "node:fs";
import { Router, type RequestHandler } from "express";
import multer from "multer";
import {
  AddendaRunListQuery,
  AddendaRunUploadFields,
  MaskBody,
  RunParams,
  SampleRunUploadFields,
} from "@shared/schemas/runs";
import { SampleParams } from "@shared/schemas/samples";
import type { AppContext } from "../context";
import { HttpError } from "../http-error";
import { labGuards } from "../middleware/lab-access";
import {
  commitAddendaRun,
  commitSampleRun,
  getRunDetail,
  listAddendaRuns,
  listSampleRuns,
  maskPoints,
  previewAddendaRun,
  previewSampleRun,
  rawFileOf,
  reducedCsv,
  type UploadInput,
} from "../services/runs";
import { getSampleRow } from "../services/samples";

/** Largest run upload, bytes (20 MiB): a 5,000-point export is well under 1 MB. */
export const MAX_UPLOAD_BYTES = 20 * 1024 * 1024;

const multipart = multer({
  storage: multer.memoryStorage(),
  // One file, a handful of short text fields (mapping JSON, label, ids, notes).
  limits: { fileSize: MAX_UPLOAD_BYTES, files: 1, fields: 8, fieldSize: 64 * 1024, parts: 10 },
  defParamCharset: "utf8",
}).single("file");

/**
 * multer with our refusals: over the size limit → 413 (error-handler), a second file or a wrong field
 * name → 400, a body that ends before the form does (cut off mid-stream) → 400. Nothing reaches the
 * services until the whole file is in memory.
 */
const receiveFile: RequestHandler = (req, res, next) => {
  multipart(req, res, (err?: unknown) => {
    if (!err) return next();
    if (err instanceof multer.MulterError) {
      if (err.code === "LIMIT_FILE_SIZE") return next(err);
      if (err.code === "LIMIT_FILE_COUNT" || err.code === "LIMIT_UNEXPECTED_FILE") {
        return next(new HttpError(400, "VALIDATION_FAILED", "Send exactly one file, in the form field 'file'", [{ path: "file", message: err.message }]));
      }
      return next(err);
    }
    const message = err instanceof Error ? err.message : String(err);
    next(
      new HttpError(400, "VALIDATION_FAILED", `The upload was cut off or is not a complete multipart form (${message}); nothing was stored`, [
        { path: "file", message },
      ]),
    );
  });
};

function uploadedFile(req: Parameters<RequestHandler>[0]): UploadInput {
  const file = req.file;
  if (!file) {
    throw new HttpError(400, "VALIDATION_FAILED", "file: attach the calorimeter export as the multipart field 'file'", [
      { path: "file", message: "required" },
    ]);
  }
  // Keep the name as uploaded, minus any folder part and control characters (it goes into headers).
  const base = file.originalname.split(/[\\/]/).pop() ?? "";
  // eslint-disable-next-line no-control-regex
  const fileName = base.replace(/[\u0000-\u001f\u007f]/g, "").trim().slice(0, 255) || "upload.txt";
  return { bytes: new Uint8Array(file.buffer.buffer, file.buffer.byteOffset, file.buffer.byteLength), fileName };
}

function downloadName(label: string, suffix: string): string {
  const stem =
    label
      .replace(/\.(csv|txt|dat|tsv)$/i, "")
      .replace(/[^\p{L}\p{N}._ -]+/gu, "_")
      .trim()
      .slice(0, 120) || "run";
  return `${stem}${suffix}`;
}

/**
 * Sample runs, addenda runs, points and downloads:
 * POST /api/labs/:labId/samples/:sampleId/runs/preview · POST …/runs · GET …/runs (list)
 * GET /api/labs/:labId/runs/:runId · …/raw · …/reduced.csv · PATCH …/mask
 * GET /api/labs/:labId/addenda-runs · POST …/addenda-runs/preview · POST …/addenda-runs
 */
export function runsRouter(ctx: AppContext): Router {
  const router = Router();
  const guard = labGuards(ctx.db);

  router.get("/labs/:labId/samples/:sampleId/runs", guard.read, (req, res) => {
    const params = SampleParams.parse(req.params);
    getSampleRow(ctx.db, params.labId, params.sampleId);
    res.json(listSampleRuns(ctx.db, params.labId, params.sampleId));
  });

  router.post("/labs/:labId/samples/:sampleId/runs/preview", guard.write, receiveFile, (req, res) => {
    const params = SampleParams.parse(req.params);
    const fields = SampleRunUploadFields.parse({ ...req.body });
    const file = uploadedFile(req);
    res.json(previewSampleRun(ctx.db, params.labId, params.sampleId, file, fields));
  });

  router.post("/labs/:labId/samples/:sampleId/runs", guard.write, receiveFile, (req, res) => {
    const params = SampleParams.parse(req.params);
    const fields = SampleRunUploadFields.parse({ ...req.body });
    const file = uploadedFile(req);
    res.status(201).json(commitSampleRun(ctx.db, ctx.dataDir, params.labId, res.locals.user!.id, params.sampleId, file, fields));
  });

  router.get("/labs/:labId/addenda-runs", guard.read, (req, res) => {
    const query = AddendaRunListQuery.parse(req.query);
    res.json(listAddendaRuns(ctx.db, res.locals.labId!, query.platform));
  });

  router.post("/labs/:labId/addenda-runs/preview", guard.write, receiveFile, (req, res) => {
    const fields = AddendaRunUploadFields.parse({ ...req.body });
    const file = uploadedFile(req);
    res.json(previewAddendaRun(ctx.db, res.locals.labId!, file, fields));
  });

  router.post("/labs/:labId/addenda-runs", guard.write, receiveFile, (req, res) => {
    const fields = AddendaRunUploadFields.parse({ ...req.body });
    const file = uploadedFile(req);
    res.status(201).json(commitAddendaRun(ctx.db, ctx.dataDir, res.locals.labId!, res.locals.user!.id, file, fields));
  });

  router.get("/labs/:labId/runs/:runId", guard.read, (req, res) => {
    const params = RunParams.parse(req.params);
    res.json(getRunDetail(ctx.db, params.labId, params.runId));
  });

  router.get("/labs/:labId/runs/:runId/raw", guard.read, (req, res) => {
    const params = RunParams.parse(req.params);
    const raw = rawFileOf(ctx.db, ctx.dataDir, params.labId, params.runId);
    const bytes = readFileSync(raw.filePath);
    // RFC 9530 representation digest, so a client can check the bytes without trusting the name.
    res.setHeader("Repr-Digest", `sha-256=:${createHash("sha256").update(bytes).digest("base64")}:`);
    res.setHeader("Cache-Control", "private, no-store");
    res.attachment(raw.fileName);
    res.type("application/octet-stream");
    res.send(bytes);
  });

  router.get("/labs/:labId/runs/:runId/reduced.csv", guard.read, (req, res) => {
    const params = RunParams.parse(req.params);
    const detail = getRunDetail(ctx.db, params.labId, params.runId);
    res.setHeader("Cache-Control", "private, no-store");
    res.attachment(downloadName(detail.label, "-reduced.csv"));
    res.type("text/csv; charset=utf-8");
    res.send(reducedCsv(detail));
  });

  router.patch("/labs/:labId/runs/:runId/mask", guard.write, (req, res) => {
    const params = RunParams.parse(req.params);
    const body = MaskBody.parse(req.body ?? {});
    res.json(maskPoints(ctx.db, params.labId, res.locals.user!.id, params.runId, body.indices, body.masked));
  });

  return router;
}
