import { targetDetailSchema, targetListSchema } from "@shared/schemas";
import { queryOptions } from "@tanstack/react-query";
import { api } from "@/lib/api-client";

export const targetQueries = {
  all: ["targets"] as const,
  /** The group's targets, each with its isotopologues nested under it. */
  list: (groupId: string) =>
    queryOptions({
      queryKey: [...targetQueries.all, "list", groupId] as const,
      queryFn: ({ signal }) =>
        api.get(`/api/groups/${encodeURIComponent(groupId)}/targets`, targetListSchema, { signal }),
    }),
  /** One target with its current version, the list of its versions and its isotopologues. */
  detail: (targetId: string) =>
    queryOptions({
      queryKey: [...targetQueries.all, "detail", targetId] as const,
      queryFn: ({ signal }) =>
        api.get(`/api/targets/${encodeURIComponent(targetId)}`, targetDetailSchema, { signal }),
    }),
};
