import { adminUserListSchema } from "@shared/schemas";
import { queryOptions } from "@tanstack/react-query";
import { api } from "@/lib/api-client";

export const adminQueries = {
  all: ["admin"] as const,
  /** Every account on this Sigmaflow site; site admins only. */
  users: () =>
    queryOptions({
      queryKey: [...adminQueries.all, "users"] as const,
      queryFn: ({ signal }) => api.get("/api/admin/users", adminUserListSchema, { signal }),
    }),
};
