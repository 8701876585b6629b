import { queryOptions, useQuery } from "@tanstack/react-query";
import { z } from "zod";
import { OutboxMessageSchema } from "@shared/schemas/labs";
import { api } from "@/lib/api-client";

/** Keys of the fake mail server's received messages (site administrators, while the fake is on). */
export const outboxKeys = {
  all: ["outbox"] as const,
  list: () => [...outboxKeys.all, "list"] as const,
};

export function outboxQueryOptions() {
  return queryOptions({
    queryKey: outboxKeys.list(),
    queryFn: ({ signal }) => api.get("/api/outbox", z.array(OutboxMessageSchema), signal),
    // New mail arrives while the page is open (someone just sent an invitation): look again every few seconds.
    refetchInterval: 5_000,
    staleTime: 0,
  });
}

export function useOutbox() {
  return useQuery(outboxQueryOptions());
}
