import { z } from "zod";

export const ApiErrorCodeSchema = z.enum([
  "VALIDATION_FAILED",
  "UNAUTHENTICATED",
  "FORBIDDEN",
  "NOT_FOUND",
  "CONFLICT",
  "GONE",
  "PAYLOAD_TOO_LARGE",
  "UNPROCESSABLE",
  "RATE_LIMITED",
  "INTERNAL",
]);
export type ApiErrorCode = z.infer<typeof ApiErrorCodeSchema>;

/** One problem in a request: a dotted path ("points.3.y"), or line/column of an uploaded file. */
export const ApiErrorDetailSchema = z.object({
  path: z.string().optional(),
  line: z.number().int().optional(),
  column: z.string().optional(),
  message: z.string(),
});
export type ApiErrorDetail = z.infer<typeof ApiErrorDetailSchema>;

/** The body of every non-2xx response. */
export const ApiErrorSchema = z.object({
  error: z.object({
    code: ApiErrorCodeSchema,
    message: z.string(),
    details: z.array(ApiErrorDetailSchema).optional(),
  }),
});
export type ApiErrorBody = z.infer<typeof ApiErrorSchema>;
