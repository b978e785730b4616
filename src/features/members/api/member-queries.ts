import { memberListSchema } from "@shared/schemas";
import { queryOptions } from "@tanstack/react-query";
import { api } from "@/lib/api-client";

export const memberQueries = {
  all: ["members"] as const,
  list: (groupId: string) =>
    queryOptions({
      queryKey: [...memberQueries.all, "list", groupId] as const,
      queryFn: ({ signal }) =>
        api.get(`/api/groups/${encodeURIComponent(groupId)}/members`, memberListSchema, { signal }),
    }),
};
