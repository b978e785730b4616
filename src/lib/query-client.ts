import { type DefaultOptions, QueryClient } from "@tanstack/react-query";
import { isApiRequestError } from "./api-error";

const MAX_RETRIES = 2;

/** Client errors (4xx) are answers, not accidents: retrying them only delays the message. */
function shouldRetry(failureCount: number, error: unknown): boolean {
  if (isApiRequestError(error) && !error.isRetryable) return false;
  return failureCount < MAX_RETRIES;
}

export function createQueryClient(overrides: DefaultOptions = {}): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: { staleTime: 30_000, retry: shouldRetry, ...overrides.queries },
      mutations: { retry: false, ...overrides.mutations },
    },
  });
}
