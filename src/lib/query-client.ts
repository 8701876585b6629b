import { QueryClient } from "@tanstack/react-query";
import { ApiError } from "./api-client";

/** Client errors (4xx) are answers, not hiccups: retrying them only delays the message. */
function shouldRetry(failureCount: number, error: unknown): boolean {
  if (error instanceof ApiError && error.status >= 400 && error.status < 500) return false;
  return failureCount < 2;
}

/** The app's QueryClient: 30 s freshness, retries only for network and server failures. */
export function createQueryClient(): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: { staleTime: 30_000, retry: shouldRetry, refetchOnWindowFocus: true },
      mutations: { retry: false },
    },
  });
}
