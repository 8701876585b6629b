import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import {
  CompareCurvesSchema,
  ComparisonResultSchema,
  ComparisonSchema,
  type CompareGroupBy,
  type CreateComparisonBody,
} from "@shared/schemas/compare";
import { BatchSchema, SampleSchema } from "@shared/schemas/samples";
import { api } from "@/lib/api-client";
import { compareSearch } from "./utils";

/** What a comparison asks for; every field goes into the query key. */
export interface CompareSelection {
  parameter: string;
  groupBy: CompareGroupBy;
  batchIds: string[];
  sampleIds: string[];
}

/** Keys of the comparison views of one lab. */
export const compareKeys = {
  all: ["compare"] as const,
  lab: (labId: string) => [...compareKeys.all, labId] as const,
  result: (labId: string, s: CompareSelection) => [...compareKeys.lab(labId), "result", s] as const,
  curves: (labId: string, s: CompareSelection) => [...compareKeys.lab(labId), "curves", s] as const,
  saved: (labId: string) => [...compareKeys.lab(labId), "saved"] as const,
  choices: (labId: string) => [...compareKeys.lab(labId), "choices"] as const,
};

const base = (labId: string) => `/api/labs/${encodeURIComponent(labId)}`;

export function compareQueryOptions(labId: string, s: CompareSelection) {
  return queryOptions({
    queryKey: compareKeys.result(labId, s),
    queryFn: ({ signal }) => api.get(`${base(labId)}/compare?${compareSearch(s)}`, ComparisonResultSchema, signal),
  });
}

export function compareCurvesQueryOptions(labId: string, s: CompareSelection) {
  return queryOptions({
    queryKey: compareKeys.curves(labId, s),
    queryFn: ({ signal }) => api.get(`${base(labId)}/compare/curves?${compareSearch(s)}`, CompareCurvesSchema, signal),
  });
}

export function savedComparisonsQueryOptions(labId: string) {
  return queryOptions({
    queryKey: compareKeys.saved(labId),
    queryFn: ({ signal }) => api.get(`${base(labId)}/comparisons`, z.array(ComparisonSchema), signal),
  });
}

/** Batches and samples to choose from (the lab's lists, read for the pickers). */
export function choicesQueryOptions(labId: string) {
  return queryOptions({
    queryKey: compareKeys.choices(labId),
    queryFn: async ({ signal }) => {
      const [batches, samples] = await Promise.all([
        api.get(`${base(labId)}/batches`, z.array(BatchSchema), signal),
        api.get(`${base(labId)}/samples`, z.array(SampleSchema), signal),
      ]);
      return { batches, samples };
    },
  });
}

/** The CSV export of a comparison (a plain link: the browser downloads it with the session cookie). */
export function compareCsvUrl(labId: string, s: CompareSelection): string {
  return `${base(labId)}/compare.csv?${compareSearch(s)}`;
}

export function useComparison(labId: string, s: CompareSelection) {
  return useQuery({ ...compareQueryOptions(labId, s), placeholderData: (prev) => prev });
}

export function useCompareCurves(labId: string, s: CompareSelection, enabled: boolean) {
  return useQuery({ ...compareCurvesQueryOptions(labId, s), enabled, placeholderData: (prev) => prev });
}

export function useSavedComparisons(labId: string) {
  return useQuery(savedComparisonsQueryOptions(labId));
}

export function useCompareChoices(labId: string) {
  return useQuery(choicesQueryOptions(labId));
}

export function useSaveComparison(labId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateComparisonBody) => api.post(`${base(labId)}/comparisons`, body, ComparisonSchema),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: compareKeys.saved(labId) }),
  });
}
