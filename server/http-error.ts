import type { ApiErrorCode, ApiErrorDetail } from "@shared/schemas/api-error";

/** An error with an HTTP status and a stable code; error-handler.ts turns it into the error body. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: ApiErrorCode,
    message: string,
    readonly details?: ApiErrorDetail[],
  ) {
    super(message);
    this.name = "HttpError";
  }
}

export const notFound = (what = "Not found") => new HttpError(404, "NOT_FOUND", what);
export const forbidden = (what = "Your role in this lab does not allow this") => new HttpError(403, "FORBIDDEN", what);
export const conflict = (what: string, details?: ApiErrorDetail[]) => new HttpError(409, "CONFLICT", what, details);
export const unprocessable = (what: string, details?: ApiErrorDetail[]) =>
  new HttpError(422, "UNPROCESSABLE", what, details);
export const badRequest = (what: string, details?: ApiErrorDetail[]) =>
  new HttpError(400, "VALIDATION_FAILED", what, details);
