/**
 * Each stage of a recipe with the parameter schema its code declares, read from the recipe and its
 * codes, and the hosts each code is installed on. Shared by every form that edits a run's parameters
 * (the composer, resubmission with changes).
 */
import { type Code, codeSchema, recipeSchema } from "@shared/schemas";
import { api } from "@/lib/api-client";

export type StageSchema = {
  stage: string;
  codeName: string;
  codeVersion: string;
  /** The code's parameters as a JSON Schema (the code definition's `parameters`). */
  parameters: Code["definition"]["parameters"];
  /** The group's hosts the stage's code is installed on; empty: any of them may run it. */
  hostIds: string[];
};

export async function fetchStageSchemas(recipeId: string, signal?: AbortSignal): Promise<StageSchema[]> {
  const recipe = await api.get(`/api/recipes/${encodeURIComponent(recipeId)}`, recipeSchema, { signal });
  return Promise.all(
    recipe.stages.map(async (stage) => {
      const code = await api.get(`/api/codes/${encodeURIComponent(stage.codeId)}`, codeSchema, { signal });
      return {
        stage: stage.name,
        codeName: stage.codeName,
        codeVersion: stage.codeVersion,
        parameters: code.definition.parameters,
        hostIds: code.hostIds ?? [],
      };
    }),
  );
}
