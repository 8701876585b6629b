import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { MaskResultSchema, RunDetailSchema, RunSummarySchema, type MaskBody, type RunDetail } from "@shared/schemas/runs";
import { api } from "@/lib/api-client";

/** Keys of runs: one run's detail, and the lab's addenda runs. */
export const runKeys = {
  all: ["runs"] as const,
  lab: (labId: string) => [...runKeys.all, labId] as const,
  detail: (labId: string, runId: string) => [...runKeys.lab(labId), "detail", runId] as const,
  addenda: (labId: string) => [...runKeys.lab(labId), "addenda"] as const,
};

const base = (labId: string) => `/api/labs/${encodeURIComponent(labId)}`;

/** Download addresses (plain links: the browser saves the file under the name the server gives). */
export const runDownloads = {
  raw: (labId: string, runId: string) => `${base(labId)}/runs/${encodeURIComponent(runId)}/raw`,
  reducedCsv: (labId: string, runId: string) => `${base(labId)}/runs/${encodeURIComponent(runId)}/reduced.csv`,
};

export function runQueryOptions(labId: string, runId: string) {
  return queryOptions({
    queryKey: runKeys.detail(labId, runId),
    queryFn: ({ signal }) => api.get(`${base(labId)}/runs/${encodeURIComponent(runId)}`, RunDetailSchema, signal),
  });
}

export function addendaRunsQueryOptions(labId: string) {
  return queryOptions({
    queryKey: runKeys.addenda(labId),
    queryFn: ({ signal }) => api.get(`${base(labId)}/addenda-runs`, z.array(RunSummarySchema), signal),
  });
}

export function useRun(labId: string, runId: string) {
  return useQuery(runQueryOptions(labId, runId));
}

export function useAddendaRuns(labId: string) {
  return useQuery(addendaRunsQueryOptions(labId));
}

/**
 * Masks or unmasks points. The run's points flip at once on screen (optimistic) and are read back after.
 * @param onChanged called after the server answered, e.g. to refresh the sample page's counts
 */
export function useMaskPoints(labId: string, runId: string, onChanged?: () => void) {
  const queryClient = useQueryClient();
  const key = runKeys.detail(labId, runId);
  return useMutation({
    mutationFn: (body: MaskBody) => api.patch(`${base(labId)}/runs/${encodeURIComponent(runId)}/mask`, body, MaskResultSchema),
    onMutate: async (body) => {
      await queryClient.cancelQueries({ queryKey: key });
      const previous = queryClient.getQueryData<RunDetail>(key);
      if (previous) {
        const chosen = new Set(body.indices);
        const points = previous.points.map((p) => (chosen.has(p.index) ? { ...p, masked: body.masked } : p));
        queryClient.setQueryData<RunDetail>(key, { ...previous, points, maskedCount: points.filter((p) => p.masked).length });
      }
      return { previous };
    },
    onError: (_error, _body, context) => {
      if (context?.previous) queryClient.setQueryData(key, context.previous);
    },
    onSettled: async () => {
      await queryClient.invalidateQueries({ queryKey: key });
      onChanged?.();
    },
  });
}

/** After an upload: the addenda list and any open run are stale. */
export function useInvalidateRuns(labId: string) {
  const queryClient = useQueryClient();
  return () => queryClient.invalidateQueries({ queryKey: runKeys.lab(labId) });
}
