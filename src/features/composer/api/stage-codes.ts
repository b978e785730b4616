import { codeSchema, recipeSchema } from "@shared/schemas";
import { api } from "@/lib/api-client";
import type { StageSchema as ParameterStage } from "@/lib/stage-schemas";

/** A recipe's stage with its code's parameter schema and the hosts that code is installed on. */
export type StageSchema = ParameterStage & {
  /** The group's hosts the stage's code is installed on; empty: any of them may run it. */
  hostIds: string[];
};

/** Each stage of a recipe with what the composer needs of its code: parameters and installed hosts. */
export async function fetchStageCodes(recipeId: string, signal?: AbortSignal): Promise<StageSchema[]> {
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
