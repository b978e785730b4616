import { auditListSchema, groupListSchema, groupSchema } from "@shared/schemas";
import { queryOptions } from "@tanstack/react-query";
import { api } from "@/lib/api-client";

export const groupQueries = {
  all: ["groups"] as const,
  /** Every group for a site admin; the caller's own groups for everyone else. */
  list: () =>
    queryOptions({
      queryKey: [...groupQueries.all, "list"] as const,
      queryFn: ({ signal }) => api.get("/api/groups", groupListSchema, { signal }),
    }),
  detail: (groupId: string) =>
    queryOptions({
      queryKey: [...groupQueries.all, "detail", groupId] as const,
      queryFn: ({ signal }) => api.get(`/api/groups/${encodeURIComponent(groupId)}`, groupSchema, { signal }),
    }),
  audit: (groupId: string) =>
    queryOptions({
      queryKey: [...groupQueries.all, "audit", groupId] as const,
      queryFn: ({ signal }) =>
        api.get(`/api/groups/${encodeURIComponent(groupId)}/audit`, auditListSchema, { signal }),
    }),
};
