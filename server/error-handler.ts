import type { ErrorRequestHandler } from "express";
import multer from "multer";
import { ZodError } from "zod";
import type { ApiErrorBody, ApiErrorCode, ApiErrorDetail } from "@shared/schemas/api-error";
import { HttpError } from "./http-error";

function send(res: Parameters<ErrorRequestHandler>[2], status: number, code: ApiErrorCode, message: string, details?: ApiErrorDetail[]) {
  const body: ApiErrorBody = { error: { code, message, ...(details ? { details } : {}) } };
  res.status(status).json(body);
}

/** The only place that writes error bodies (STYLE.md section 4). Never sends a stack trace. */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  if (res.headersSent) {
    res.end();
    return;
  }
  if (err instanceof ZodError) {
    const details = err.issues.map((i) => ({ path: i.path.join("."), message: i.message }));
    const first = details[0];
    send(res, 400, "VALIDATION_FAILED", first ? `${first.path || "body"}: ${first.message}` : "Invalid request", details);
    return;
  }
  if (err instanceof HttpError) {
    send(res, err.status, err.code, err.message, err.details);
    return;
  }
  if (err instanceof multer.MulterError) {
    if (err.code === "LIMIT_FILE_SIZE") send(res, 413, "PAYLOAD_TOO_LARGE", "The file is over the upload limit");
    else send(res, 400, "VALIDATION_FAILED", `Upload refused: ${err.message}`, err.field ? [{ path: err.field, message: err.message }] : undefined);
    return;
  }
  // body-parser errors carry a status and a type.
  const e = err as { status?: number; type?: string; message?: string };
  if (e.type === "entity.too.large") {
    send(res, 413, "PAYLOAD_TOO_LARGE", "The request body is over its limit");
    return;
  }
  if (e.type === "entity.parse.failed") {
    send(res, 400, "VALIDATION_FAILED", "The body is not valid JSON", [{ path: "body", message: e.message ?? "invalid JSON" }]);
    return;
  }
  if (e.type === "request.aborted") {
    send(res, 400, "VALIDATION_FAILED", "The upload was cut off before it ended");
    return;
  }
  if (typeof e.status === "number" && e.status >= 400 && e.status < 500) {
    send(res, e.status, e.status === 413 ? "PAYLOAD_TOO_LARGE" : "VALIDATION_FAILED", "The request could not be read");
    return;
  }
  console.error(`[error] ${req.method} ${req.originalUrl}`, err);
  send(res, 500, "INTERNAL", "Something went wrong on the server; the error was logged");
};
