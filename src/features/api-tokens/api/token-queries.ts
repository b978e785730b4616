import { apiTokenListSchema } from "@shared/schemas";
import { queryOptions } from "@tanstack/react-query";
import { api } from "@/lib/api-client";

export const tokenQueries = {
  all: ["api-tokens"] as const,
  /** The caller's own tokens; secrets are never listed, only their prefixes. */
  list: () =>
    queryOptions({
      queryKey: [...tokenQueries.all, "list"] as const,
      queryFn: ({ signal }) => api.get("/api/tokens", apiTokenListSchema, { signal }),
    }),
};
