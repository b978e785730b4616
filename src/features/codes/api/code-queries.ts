import { codeListSchema, hostListSchema, recipeListSchema, targetListSchema } from "@shared/schemas";
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

export const recipeQueries = {
  all: ["recipes"] as const,
  /** The group's recipes with their stages (each stage's code by name and version). */
  list: (groupId: string) =>
    queryOptions({
      queryKey: [...recipeQueries.all, "list", groupId] as const,
      queryFn: ({ signal }) =>
        api.get(`/api/groups/${encodeURIComponent(groupId)}/recipes`, recipeListSchema, { signal }),
    }),
};

/** The group's targets, for choosing the one a preview renders for (same key as the Targets page). */
export const previewTargetQueries = {
  list: (groupId: string) =>
    queryOptions({
      queryKey: ["targets", "list", groupId] as const,
      queryFn: ({ signal }) =>
        api.get(`/api/groups/${encodeURIComponent(groupId)}/targets`, targetListSchema, { signal }),
    }),
};

/** The group's hosts, for naming where each code version is installed. */
export const codeHostQueries = {
  list: (groupId: string) =>
    queryOptions({
      queryKey: ["hosts", "list", groupId] as const,
      queryFn: ({ signal }) =>
        api.get(`/api/groups/${encodeURIComponent(groupId)}/hosts`, hostListSchema, { signal }),
    }),
};
