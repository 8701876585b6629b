import type { z } from "zod";
import { ApiErrorSchema, type ApiErrorCode, type ApiErrorDetail } from "@shared/schemas/api-error";

/** Codes the server sends, plus two the client makes up when no proper error body arrives. */
export type ClientErrorCode = ApiErrorCode | "NETWORK" | "BAD_RESPONSE";

/** A failed API call: the server's status, code, message and per-field details. */
export class ApiError extends Error {
  readonly status: number;
  readonly code: ClientErrorCode;
  readonly details: ApiErrorDetail[];

  constructor(status: number, code: ClientErrorCode, message: string, details: ApiErrorDetail[] = []) {
    super(message);
    this.name = "ApiError";
    this.status = status;
    this.code = code;
    this.details = details;
  }
}

/** True when `error` is an ApiError with the given HTTP status. */
export function isApiError(error: unknown, status?: number): error is ApiError {
  return error instanceof ApiError && (status === undefined || error.status === status);
}

type Method = "GET" | "POST" | "PATCH" | "PUT" | "DELETE";

interface RequestOptions<T> {
  body?: unknown;
  /** Parses the success body; contract drift then fails loudly instead of rendering garbage. */
  schema?: z.ZodType<T>;
  signal?: AbortSignal;
}

async function readJson(response: Response): Promise<unknown> {
  const text = await response.text();
  if (text === "") return undefined;
  try {
    return JSON.parse(text);
  } catch {
    return undefined;
  }
}

/**
 * Calls the JSON API on the same origin. Resolves with the parsed body (undefined for 204),
 * rejects with ApiError for every failure: network, non-2xx, or a body that does not match `schema`.
 */
export async function apiRequest<T = undefined>(method: Method, path: string, options: RequestOptions<T> = {}): Promise<T> {
  const headers: Record<string, string> = { Accept: "application/json" };
  if (options.body !== undefined) headers["Content-Type"] = "application/json";
  let response: Response;
  try {
    response = await fetch(path, {
      method,
      headers,
      credentials: "same-origin",
      body: options.body === undefined ? undefined : JSON.stringify(options.body),
      signal: options.signal,
    });
  } catch (cause) {
    if (cause instanceof DOMException && cause.name === "AbortError") throw cause;
    throw new ApiError(0, "NETWORK", "Could not reach the Thetafold server. Check your connection and try again.");
  }

  const payload = await readJson(response);
  if (!response.ok) {
    const parsed = ApiErrorSchema.safeParse(payload);
    if (parsed.success) {
      const { code, message, details } = parsed.data.error;
      throw new ApiError(response.status, code, message, details ?? []);
    }
    throw new ApiError(response.status, "BAD_RESPONSE", `The server answered ${response.status} ${response.statusText}`.trim());
  }
  if (!options.schema) return payload as T;
  const parsed = options.schema.safeParse(payload);
  if (!parsed.success) {
    const first = parsed.error.issues[0];
    const where = first && first.path.length > 0 ? ` at ${first.path.join(".")}` : "";
    throw new ApiError(response.status, "BAD_RESPONSE", `Unexpected answer from ${path}${where}: ${first?.message ?? "invalid"}`);
  }
  return parsed.data;
}

export const api = {
  get: <T>(path: string, schema: z.ZodType<T>, signal?: AbortSignal) => apiRequest<T>("GET", path, { schema, signal }),
  post: <T = undefined>(path: string, body?: unknown, schema?: z.ZodType<T>) => apiRequest<T>("POST", path, { body, schema }),
  patch: <T = undefined>(path: string, body: unknown, schema?: z.ZodType<T>) => apiRequest<T>("PATCH", path, { body, schema }),
  delete: (path: string) => apiRequest<undefined>("DELETE", path),
};
