import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { z } from "zod";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import { ImportPresetListSchema } from "@shared/schemas/import-presets";
import { ImportPresetSchema, type CreateImportPresetBody, type ImportMapping } from "@shared/schemas/ingest";
import { RunCommitResultSchema, RunUploadPreviewSchema } from "@shared/schemas/runs";
import { api, ApiError } from "@/lib/api-client";

/** Keys of a lab's import presets. */
export const presetKeys = {
  all: ["import-presets"] as const,
  list: (labId: string) => [...presetKeys.all, labId] as const,
};

const base = (labId: string) => `/api/labs/${encodeURIComponent(labId)}`;

export function importPresetsQueryOptions(labId: string) {
  return queryOptions({
    queryKey: presetKeys.list(labId),
    queryFn: ({ signal }) => api.get(`${base(labId)}/import-presets`, ImportPresetListSchema, signal),
  });
}

export function useImportPresets(labId: string) {
  return useQuery(importPresetsQueryOptions(labId));
}

export function useCreateImportPreset(labId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateImportPresetBody) => api.post(`${base(labId)}/import-presets`, body, ImportPresetSchema),
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: presetKeys.list(labId) });
    },
  });
}

export function useDeleteImportPreset(labId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (presetId: string) => api.delete(`${base(labId)}/import-presets/${encodeURIComponent(presetId)}`),
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: presetKeys.list(labId) });
    },
  });
}

/** Upload progress: bytes sent so far of the whole request. */
export interface UploadProgress {
  loaded: number;
  total: number;
}

/**
 * Posts a multipart form with XMLHttpRequest, whose upload events report progress (fetch has none), and
 * parses the answer with `schema`. Rejects with ApiError exactly as lib/api-client does.
 */
export function postMultipart<T>(
  path: string,
  form: FormData,
  schema: z.ZodType<T>,
  options: { onProgress?: (p: UploadProgress) => void; signal?: AbortSignal } = {},
): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open("POST", path);
    xhr.withCredentials = true;
    xhr.setRequestHeader("Accept", "application/json");
    xhr.upload.onprogress = (event) => {
      if (event.lengthComputable) options.onProgress?.({ loaded: event.loaded, total: event.total });
    };
    xhr.onerror = () => reject(new ApiError(0, "NETWORK", "The upload did not reach the Thetafold server. Check your connection and try again."));
    xhr.onabort = () => reject(new DOMException("The upload was cancelled", "AbortError"));
    xhr.onload = () => {
      let payload: unknown;
      try {
        payload = xhr.responseText === "" ? undefined : JSON.parse(xhr.responseText);
      } catch {
        payload = undefined;
      }
      if (xhr.status < 200 || xhr.status >= 300) {
        const parsed = ApiErrorSchema.safeParse(payload);
        if (parsed.success) {
          const { code, message, details } = parsed.data.error;
          reject(new ApiError(xhr.status, code, message, details ?? []));
        } else {
          reject(new ApiError(xhr.status, "BAD_RESPONSE", `The server answered ${xhr.status} ${xhr.statusText}`.trim()));
        }
        return;
      }
      const parsed = schema.safeParse(payload);
      if (!parsed.success) {
        reject(new ApiError(xhr.status, "BAD_RESPONSE", `Unexpected answer from ${path}: ${parsed.error.issues[0]?.message ?? "invalid"}`));
        return;
      }
      resolve(parsed.data);
    };
    options.signal?.addEventListener("abort", () => xhr.abort(), { once: true });
    xhr.send(form);
  });
}

/** Where an upload goes: a sample's runs, or the lab's addenda runs of a platform. */
export type UploadTarget = { kind: "sample"; labId: string; sampleId: string } | { kind: "addenda"; labId: string };

/** The text fields that travel with the file. */
export interface UploadFields {
  mapping?: ImportMapping | null;
  label?: string;
  addendaRunId?: string;
  platform?: string;
  notes?: string;
}

function uploadPath(target: UploadTarget, step: "preview" | "commit"): string {
  const root =
    target.kind === "sample"
      ? `${base(target.labId)}/samples/${encodeURIComponent(target.sampleId)}/runs`
      : `${base(target.labId)}/addenda-runs`;
  return step === "preview" ? `${root}/preview` : root;
}

function uploadForm(file: File, fields: UploadFields): FormData {
  const form = new FormData();
  // Text fields first: the server reads them before the file arrives.
  if (fields.mapping) form.append("mapping", JSON.stringify(fields.mapping));
  if (fields.label) form.append("label", fields.label);
  if (fields.addendaRunId) form.append("addendaRunId", fields.addendaRunId);
  if (fields.platform) form.append("platform", fields.platform);
  if (fields.notes) form.append("notes", fields.notes);
  form.append("file", file, file.name);
  return form;
}

/** Reads and reduces a file on the server without storing anything. */
export function previewUpload(target: UploadTarget, file: File, fields: UploadFields, options: Parameters<typeof postMultipart>[3] = {}) {
  return postMultipart(uploadPath(target, "preview"), uploadForm(file, fields), RunUploadPreviewSchema, options);
}

/** Stores the raw file and its run(s). */
export function commitUpload(target: UploadTarget, file: File, fields: UploadFields, options: Parameters<typeof postMultipart>[3] = {}) {
  return postMultipart(uploadPath(target, "commit"), uploadForm(file, fields), RunCommitResultSchema, options);
}

/** One upload request: the file, its text fields, and where to report progress. */
export interface UploadRequest {
  file: File;
  fields: UploadFields;
  onProgress?: (p: UploadProgress) => void;
  signal?: AbortSignal;
}

/** Preview (reads and reduces, stores nothing). */
export function usePreviewUpload(target: UploadTarget) {
  return useMutation({
    mutationFn: ({ file, fields, onProgress, signal }: UploadRequest) => previewUpload(target, file, fields, { onProgress, signal }),
  });
}

/**
 * Commit (stores the raw file and the run or runs).
 * @param onCommitted the page's own invalidation (the sample's run list, the addenda list), awaited
 */
export function useCommitUpload(target: UploadTarget, onCommitted?: (result: z.infer<typeof RunCommitResultSchema>) => Promise<unknown> | void) {
  return useMutation({
    mutationFn: ({ file, fields, onProgress, signal }: UploadRequest) => commitUpload(target, file, fields, { onProgress, signal }),
    onSuccess: async (result) => {
      await onCommitted?.(result);
    },
  });
}
