import {
  hostListSchema,
  type RunPreviewRequest,
  type RunSpecRequest,
  recipeListSchema,
  runPreviewSchema,
  runSummarySchema,
  targetListSchema,
} from "@shared/schemas";
import { queryOptions } from "@tanstack/react-query";
import { api } from "@/lib/api-client";
import { fetchStageSchemas } from "@/lib/stage-schemas";

const group = (groupId: string) => `/api/groups/${encodeURIComponent(groupId)}`;

export type { StageSchema } from "@/lib/stage-schemas";

export const composerQueries = {
  all: ["composer"] as const,
  targets: (groupId: string) =>
    queryOptions({
      queryKey: [...composerQueries.all, "targets", groupId] as const,
      queryFn: ({ signal }) => api.get(`${group(groupId)}/targets`, targetListSchema, { signal }),
    }),
  recipes: (groupId: string) =>
    queryOptions({
      queryKey: [...composerQueries.all, "recipes", groupId] as const,
      queryFn: ({ signal }) => api.get(`${group(groupId)}/recipes`, recipeListSchema, { signal }),
    }),
  hosts: (groupId: string) =>
    queryOptions({
      queryKey: [...composerQueries.all, "hosts", groupId] as const,
      queryFn: ({ signal }) => api.get(`${group(groupId)}/hosts`, hostListSchema, { signal }),
    }),
  /**
   * Each stage's declared parameters (JSON Schema) and the hosts its code is installed on. A code
   * version never changes, so fetched once: reading it again would reset the stage's fields. Should its
   * hosts change meanwhile, the server's preview refuses the host at the Host field.
   */
  stageSchemas: (recipeId: string) =>
    queryOptions({
      queryKey: [...composerQueries.all, "stage-schemas", recipeId] as const,
      queryFn: ({ signal }) => fetchStageSchemas(recipeId, signal),
      staleTime: Number.POSITIVE_INFINITY,
    }),
  /** What submitting this spec would cost, render and reuse; the server stores nothing. */
  preview: (groupId: string, spec: RunSpecRequest) =>
    queryOptions({
      queryKey: [...composerQueries.all, "preview", groupId, spec] as const,
      queryFn: () =>
        api.post(`${group(groupId)}/runs/preview`, { spec } satisfies RunPreviewRequest, runPreviewSchema),
      retry: false,
      staleTime: 10_000,
    }),
};

export function submitRun(groupId: string, spec: RunSpecRequest, onDuplicate: "ask" | "reuse" | "run") {
  return api.post(`${group(groupId)}/runs`, { spec, onDuplicate }, runSummarySchema);
}
