import { meSchema } from "@shared/schemas";
import { queryOptions } from "@tanstack/react-query";
import { api } from "@/lib/api-client";

export const authQueries = {
  all: ["auth"] as const,
  /** The signed-in person, their memberships and the CSRF token; a 401 means signed out. */
  me: () =>
    queryOptions({
      queryKey: [...authQueries.all, "me"] as const,
      queryFn: ({ signal }) => api.get("/api/me", meSchema, { signal }),
      staleTime: 5 * 60_000,
    }),
};
