import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { useState } from "react";
import { z } from "zod";
import {
  FitHistorySchema,
  FitOutcomeSchema,
  FitSchema,
  RankResultSchema,
  RankStreamLineSchema,
  ThermoTableSchema,
  ThetaDCurveSchema,
  type CreateFitBody,
  type PreviewFitBody,
  type RankBody,
  type RankResult,
} from "@shared/schemas/fits";
import { api, ApiError } from "@/lib/api-client";

const runBase = (labId: string, runId: string) => `/api/labs/${encodeURIComponent(labId)}/runs/${encodeURIComponent(runId)}`;
const fitBase = (labId: string, fitId: string) => `/api/labs/${encodeURIComponent(labId)}/fits/${encodeURIComponent(fitId)}`;

/** Query keys of the fit workspace; every variable a fetch uses is in its key. */
export const fitKeys = {
  all: ["fits"] as const,
  run: (labId: string, runId: string) => ["fits", "run", labId, runId] as const,
  history: (labId: string, runId: string) => ["fits", "run", labId, runId, "history"] as const,
  thetaD: (labId: string, runId: string, fitId: string | undefined) => ["fits", "run", labId, runId, "theta-d", fitId ?? null] as const,
  thermo: (labId: string, runId: string, fitId: string | undefined, at: readonly number[]) =>
    ["fits", "run", labId, runId, "thermo", fitId ?? null, at] as const,
  detail: (labId: string, fitId: string) => ["fits", "detail", labId, fitId] as const,
};

/** A run's fits, newest first, every state. */
export function fitHistoryQueryOptions(labId: string, runId: string) {
  return queryOptions({
    queryKey: fitKeys.history(labId, runId),
    queryFn: ({ signal }) => api.get(`${runBase(labId, runId)}/fits`, FitHistorySchema, signal),
  });
}

/** One stored fit with residuals and curve. */
export function fitQueryOptions(labId: string, fitId: string) {
  return queryOptions({
    queryKey: fitKeys.detail(labId, fitId),
    queryFn: ({ signal }) => api.get(fitBase(labId, fitId), FitSchema, signal),
  });
}

/** θ_D(T) of the run against a fit (default: the approved one, else the newest). */
export function thetaDQueryOptions(labId: string, runId: string, fitId?: string) {
  const q = fitId ? `?fitId=${encodeURIComponent(fitId)}` : "";
  return queryOptions({
    queryKey: fitKeys.thetaD(labId, runId, fitId),
    queryFn: ({ signal }) => api.get(`${runBase(labId, runId)}/theta-d${q}`, ThetaDCurveSchema, signal),
  });
}

function thermoQueryString(fitId: string | undefined, at: readonly number[]): string {
  const parts: string[] = [];
  if (fitId) parts.push(`fitId=${encodeURIComponent(fitId)}`);
  if (at.length > 0) parts.push(`at=${at.join(",")}`);
  return parts.length ? `?${parts.join("&")}` : "";
}

/** S(T) and H(T) − H(0); `at` empty gives the default table of round temperatures and 298.15 K. */
export function thermoQueryOptions(labId: string, runId: string, fitId: string | undefined, at: readonly number[]) {
  return queryOptions({
    queryKey: fitKeys.thermo(labId, runId, fitId, at),
    queryFn: ({ signal }) => api.get(`${runBase(labId, runId)}/thermo${thermoQueryString(fitId, at)}`, ThermoTableSchema, signal),
  });
}

/** Address of the CSV download of the same table. */
export function thermoCsvUrl(labId: string, runId: string, fitId: string | undefined, at: readonly number[]): string {
  return `${runBase(labId, runId)}/thermo.csv${thermoQueryString(fitId, at)}`;
}

export const useFitHistory = (labId: string, runId: string) => useQuery(fitHistoryQueryOptions(labId, runId));
export const useFit = (labId: string, fitId: string | undefined) =>
  useQuery({ ...fitQueryOptions(labId, fitId ?? ""), enabled: fitId !== undefined });
export const useThetaD = (labId: string, runId: string, fitId: string | undefined, enabled = true) =>
  useQuery({ ...thetaDQueryOptions(labId, runId, fitId), enabled });
export const useThermo = (labId: string, runId: string, fitId: string | undefined, at: readonly number[], enabled = true) =>
  useQuery({ ...thermoQueryOptions(labId, runId, fitId, at), enabled });

/** Fit without saving. */
export function usePreviewFit(labId: string, runId: string) {
  return useMutation({
    mutationFn: (body: PreviewFitBody) => api.post(`${runBase(labId, runId)}/fits/preview`, body, FitOutcomeSchema),
  });
}

/** Fit and store a draft; refreshes the run's history, θ_D(T) and thermo views. */
export function useSaveFit(labId: string, runId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateFitBody) => api.post(`${runBase(labId, runId)}/fits`, body, FitSchema),
    onSuccess: async () => {
      await qc.invalidateQueries({ queryKey: fitKeys.run(labId, runId) });
    },
  });
}

/** Approve a draft (leads); the run's previously approved fit becomes superseded. */
export function useApproveFit(labId: string, runId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (fitId: string) => api.post(`${fitBase(labId, fitId)}/approve`, undefined, FitSchema),
    onSuccess: async (fit) => {
      await Promise.all([
        qc.invalidateQueries({ queryKey: fitKeys.run(labId, runId) }),
        qc.invalidateQueries({ queryKey: fitKeys.detail(labId, fit.id) }),
      ]);
    },
  });
}

/** Progress of a ranking: candidates done of total, and the one that just finished. */
export interface RankProgress {
  done: number;
  total: number;
  label: string;
}

const ErrorLineSchema = z.object({ error: z.object({ code: z.string(), message: z.string() }) });

/**
 * Ranks candidate models on the server, reading its NDJSON stream so progress shows as each
 * candidate finishes.
 */
export async function rankStream(
  labId: string,
  runId: string,
  body: RankBody,
  onProgress: (p: RankProgress) => void,
  signal?: AbortSignal,
): Promise<RankResult> {
  let response: Response;
  try {
    response = await fetch(`${runBase(labId, runId)}/rank`, {
      method: "POST",
      headers: { Accept: "application/x-ndjson", "Content-Type": "application/json" },
      credentials: "same-origin",
      body: JSON.stringify(body),
      signal,
    });
  } catch (cause) {
    if (cause instanceof DOMException && cause.name === "AbortError") throw cause;
    throw new ApiError(0, "NETWORK", "Could not reach the Thetafold server. Check your connection and try again.");
  }
  if (!response.ok) {
    const parsed = ErrorLineSchema.safeParse(await response.json().catch(() => undefined));
    if (parsed.success) throw new ApiError(response.status, parsed.data.error.code as never, parsed.data.error.message);
    throw new ApiError(response.status, "BAD_RESPONSE", `The server answered ${response.status}`);
  }
  const handle = (text: string): RankResult | undefined => {
    if (text.trim() === "") return undefined;
    const line = RankStreamLineSchema.parse(JSON.parse(text));
    if (line.type === "progress") onProgress({ done: line.done, total: line.total, label: line.label });
    else if (line.type === "error") throw new ApiError(500, line.error.code as never, line.error.message);
    else return line.result;
    return undefined;
  };
  let result: RankResult | undefined;
  if (!response.body) {
    for (const text of (await response.text()).split("\n")) result = handle(text) ?? result;
  } else {
    const reader = response.body.getReader();
    const decoder = new TextDecoder();
    let buffer = "";
    for (;;) {
      const { value, done } = await reader.read();
      if (value) buffer += decoder.decode(value, { stream: true });
      let cut = buffer.indexOf("\n");
      while (cut >= 0) {
        result = handle(buffer.slice(0, cut)) ?? result;
        buffer = buffer.slice(cut + 1);
        cut = buffer.indexOf("\n");
      }
      if (done) break;
    }
    result = handle(buffer) ?? result;
  }
  if (!result) throw new ApiError(500, "BAD_RESPONSE", "The ranking ended without a result");
  return RankResultSchema.parse(result);
}

/** Ranking as a mutation with its live progress. */
export function useRankModels(labId: string, runId: string) {
  const [progress, setProgress] = useState<RankProgress | null>(null);
  const mutation = useMutation({
    mutationFn: (body: RankBody) => {
      setProgress({ done: 0, total: body.candidates?.length || 0, label: "" });
      return rankStream(labId, runId, body, setProgress);
    },
    onSettled: () => setProgress(null),
  });
  return { ...mutation, progress };
}
