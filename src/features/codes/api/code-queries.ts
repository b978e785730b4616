import { codeListSchema } from "@shared/schemas";
import { queryOptions } from "@tanstack/react-query";
import { api } from "@/lib/api-client";

export const codeQueries = {
  all: ["codes"] as const,
  /** The group's registered codes, every version, by name. */
  list: (groupId: string) =>
    queryOptions({
      queryKey: [...codeQueries.all, "list", groupId] as const,
      queryFn: ({ signal }) =>
        api.get(`/api/groups/${encodeURIComponent(groupId)}/codes`, codeListSchema, { signal }),
    }),
};
