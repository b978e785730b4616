import { healthSchema } from "@shared/schemas";
import { queryOptions } from "@tanstack/react-query";
import { api } from "@/lib/api-client";

const HEALTH_POLL_MS = 60_000;

export const healthQueries = {
  all: ["health"] as const,
  status: () =>
    queryOptions({
      queryKey: [...healthQueries.all, "status"] as const,
      queryFn: ({ signal }) => api.get("/api/health", healthSchema, { signal }),
      refetchInterval: HEALTH_POLL_MS,
      staleTime: HEALTH_POLL_MS,
    }),
};
