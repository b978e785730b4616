import {
  codeSchema,
  hostListSchema,
  type RunPreviewRequest,
  type RunSpecRequest,
  recipeListSchema,
  recipeSchema,
  runPreviewSchema,
  runSummarySchema,
  targetListSchema,
} from "@shared/schemas";
import { queryOptions } from "@tanstack/react-query";
import { api } from "@/lib/api-client";

const group = (groupId: string) => `/api/groups/${encodeURIComponent(groupId)}`;

export type StageSchema = {
  stage: string;
  codeName: string;
  codeVersion: string;
  parameters: Record<string, unknown>;
};

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
  /** Each stage's declared parameters (JSON Schema); a code version never changes, so fetched once. */
  stageSchemas: (recipeId: string) =>
    queryOptions({
      queryKey: [...composerQueries.all, "stage-schemas", recipeId] as const,
      queryFn: async ({ signal }): Promise<StageSchema[]> => {
        const recipe = await api.get(`/api/recipes/${encodeURIComponent(recipeId)}`, recipeSchema, {
          signal,
        });
        return Promise.all(
          recipe.stages.map(async (stage) => {
            const code = await api.get(`/api/codes/${encodeURIComponent(stage.codeId)}`, codeSchema, {
              signal,
            });
            return {
              stage: stage.name,
              codeName: stage.codeName,
              codeVersion: stage.codeVersion,
              parameters: code.definition.parameters,
            };
          }),
        );
      },
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
