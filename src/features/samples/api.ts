import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import {
  BatchSchema,
  SampleDetailSchema,
  SampleSchema,
  type CreateBatchBody,
  type CreateSampleBody,
  type SampleListQuery,
  type UpdateSampleBody,
} from "@shared/schemas/samples";
import { api } from "@/lib/api-client";

/** Filters of the sample list as the page holds them (all optional; the server fills in defaults). */
export type SampleFilters = Partial<SampleListQuery>;

/** Keys of a lab's samples and batches. */
export const sampleKeys = {
  all: ["samples"] as const,
  lab: (labId: string) => [...sampleKeys.all, labId] as const,
  lists: (labId: string) => [...sampleKeys.lab(labId), "list"] as const,
  list: (labId: string, filters: SampleFilters) => [...sampleKeys.lists(labId), filters] as const,
  detail: (labId: string, sampleId: string) => [...sampleKeys.lab(labId), "detail", sampleId] as const,
  batches: (labId: string) => [...sampleKeys.lab(labId), "batches"] as const,
};

const base = (labId: string) => `/api/labs/${encodeURIComponent(labId)}`;

function listPath(labId: string, filters: SampleFilters): string {
  const params = new URLSearchParams();
  if (filters.q) params.set("q", filters.q);
  if (filters.batchId) params.set("batchId", filters.batchId);
  if (filters.sort) params.set("sort", filters.sort);
  if (filters.order) params.set("order", filters.order);
  const qs = params.toString();
  return `${base(labId)}/samples${qs ? `?${qs}` : ""}`;
}

export function samplesQueryOptions(labId: string, filters: SampleFilters = {}) {
  return queryOptions({
    queryKey: sampleKeys.list(labId, filters),
    queryFn: ({ signal }) => api.get(listPath(labId, filters), z.array(SampleSchema), signal),
  });
}

export function sampleQueryOptions(labId: string, sampleId: string) {
  return queryOptions({
    queryKey: sampleKeys.detail(labId, sampleId),
    queryFn: ({ signal }) => api.get(`${base(labId)}/samples/${encodeURIComponent(sampleId)}`, SampleDetailSchema, signal),
  });
}

export function batchesQueryOptions(labId: string) {
  return queryOptions({
    queryKey: sampleKeys.batches(labId),
    queryFn: ({ signal }) => api.get(`${base(labId)}/batches`, z.array(BatchSchema), signal),
  });
}

export function useSamples(labId: string, filters: SampleFilters) {
  return useQuery({ ...samplesQueryOptions(labId, filters), placeholderData: (previous) => previous });
}

export function useSample(labId: string, sampleId: string) {
  return useQuery(sampleQueryOptions(labId, sampleId));
}

export function useBatches(labId: string) {
  return useQuery(batchesQueryOptions(labId));
}

/** Everything about the lab's samples is stale after a write (counts, lists, the detail). */
export function useInvalidateSamples(labId: string) {
  const queryClient = useQueryClient();
  return () => queryClient.invalidateQueries({ queryKey: sampleKeys.lab(labId) });
}

export function useCreateBatch(labId: string) {
  const invalidate = useInvalidateSamples(labId);
  return useMutation({
    mutationFn: (body: CreateBatchBody) => api.post(`${base(labId)}/batches`, body, BatchSchema),
    onSuccess: async () => {
      await invalidate();
    },
  });
}

export function useCreateSample(labId: string) {
  const invalidate = useInvalidateSamples(labId);
  return useMutation({
    mutationFn: (body: CreateSampleBody) => api.post(`${base(labId)}/samples`, body, SampleSchema),
    onSuccess: async () => {
      await invalidate();
    },
  });
}

export function useUpdateSample(labId: string, sampleId: string) {
  const invalidate = useInvalidateSamples(labId);
  return useMutation({
    mutationFn: (body: UpdateSampleBody) => api.patch(`${base(labId)}/samples/${encodeURIComponent(sampleId)}`, body, SampleSchema),
    onSuccess: async () => {
      await invalidate();
    },
  });
}

export function useDeleteSample(labId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (sampleId: string) => api.delete(`${base(labId)}/samples/${encodeURIComponent(sampleId)}`),
    onSuccess: async (_data, sampleId) => {
      queryClient.removeQueries({ queryKey: sampleKeys.detail(labId, sampleId) });
      await queryClient.invalidateQueries({ queryKey: sampleKeys.lists(labId) });
      await queryClient.invalidateQueries({ queryKey: sampleKeys.batches(labId) });
    },
  });
}
