import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { useState } from "react";
import { ApiErrorSchema } from "@shared/schemas/api-error";
import {
  BundleListSchema,
  BundleSchema,
  BundleStreamLineSchema,
  CreatedShareLinkSchema,
  type Bundle,
  type BundleStreamLine,
  type CreateBundleBody,
  type CreateShareLinkBody,
} from "@shared/schemas/bundles";
import { api, ApiError } from "@/lib/api-client";

/** Keys of one lab's bundles (the list carries the share links too). */
export const bundleKeys = {
  all: ["bundles"] as const,
  lab: (labId: string) => [...bundleKeys.all, labId] as const,
  list: (labId: string) => [...bundleKeys.lab(labId), "list"] as const,
};

const base = (labId: string) => `/api/labs/${encodeURIComponent(labId)}`;

export function bundlesQueryOptions(labId: string) {
  return queryOptions({
    queryKey: bundleKeys.list(labId),
    queryFn: ({ signal }) => api.get(`${base(labId)}/bundles`, BundleListSchema, signal),
  });
}

export function useBundles(labId: string) {
  return useQuery(bundlesQueryOptions(labId));
}

export type BuildProgress = Extract<BundleStreamLine, { type: "progress" }>;

/**
 * POST …/bundles asking for NDJSON progress lines; resolves with the bundle. A server (or test stub)
 * that answers plain JSON works too.
 * @throws ApiError for a refusal (422, 404, …) or an error line in the stream
 */
export async function buildBundleRequest(labId: string, body: CreateBundleBody, onProgress: (p: BuildProgress) => void): Promise<Bundle> {
  let response: Response;
  try {
    response = await fetch(`${base(labId)}/bundles`, {
      method: "POST",
      headers: { Accept: "application/x-ndjson, application/json", "Content-Type": "application/json" },
      credentials: "same-origin",
      body: JSON.stringify(body),
    });
  } catch {
    throw new ApiError(0, "NETWORK", "Could not reach the Thetafold server. Check your connection and try again.");
  }
  if (!response.ok) {
    const parsed = ApiErrorSchema.safeParse(await response.json().catch(() => undefined));
    if (parsed.success) throw new ApiError(response.status, parsed.data.error.code, parsed.data.error.message, parsed.data.error.details ?? []);
    throw new ApiError(response.status, "BAD_RESPONSE", `The server answered ${response.status}`);
  }
  if (!(response.headers.get("content-type") ?? "").includes("ndjson") || !response.body) {
    return BundleSchema.parse(await response.json());
  }
  const reader = response.body.pipeThrough(new TextDecoderStream()).getReader();
  let buffered = "";
  let bundle: Bundle | null = null;
  const handle = (text: string) => {
    if (text.trim() === "") return;
    const line = BundleStreamLineSchema.parse(JSON.parse(text));
    if (line.type === "progress") onProgress(line);
    else if (line.type === "result") bundle = line.bundle;
    else throw new ApiError(500, line.error.code === "INTERNAL" ? "INTERNAL" : "BAD_RESPONSE", line.error.message);
  };
  for (;;) {
    const { value, done } = await reader.read();
    if (done) break;
    buffered += value;
    let nl: number;
    while ((nl = buffered.indexOf("\n")) >= 0) {
      handle(buffered.slice(0, nl));
      buffered = buffered.slice(nl + 1);
    }
  }
  handle(buffered);
  if (!bundle) throw new ApiError(500, "BAD_RESPONSE", "The build ended without a bundle");
  return bundle;
}

/** Builds a bundle with its progress as state. */
export function useBuildBundle(labId: string) {
  const queryClient = useQueryClient();
  const [progress, setProgress] = useState<BuildProgress | null>(null);
  const mutation = useMutation({
    mutationFn: (body: CreateBundleBody) => {
      setProgress(null);
      return buildBundleRequest(labId, body, setProgress);
    },
    onSuccess: () => queryClient.invalidateQueries({ queryKey: bundleKeys.lab(labId) }),
  });
  return { ...mutation, progress };
}

export function useCreateShareLink(labId: string, bundleId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateShareLinkBody) =>
      api.post(`${base(labId)}/bundles/${encodeURIComponent(bundleId)}/links`, body, CreatedShareLinkSchema),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: bundleKeys.lab(labId) }),
  });
}

export function useRevokeShareLink(labId: string, bundleId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (linkId: string) => api.delete(`${base(labId)}/bundles/${encodeURIComponent(bundleId)}/links/${encodeURIComponent(linkId)}`),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: bundleKeys.lab(labId) }),
  });
}
