import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "./common";
import { identifierSchema } from "./names";

export const recipeStageSchema = z.strictObject({ name: identifierSchema, codeId: uuidSchema });
/** One stage as a recipe row stores it. */
export type RecipeStage = z.infer<typeof recipeStageSchema>;

export const createRecipeRequestSchema = z.strictObject({
  name: identifierSchema,
  description: z.string().max(2000).default(""),
  stages: z
    .array(recipeStageSchema)
    .min(1, { error: "A recipe needs at least one stage." })
    .max(10)
    .refine((stages) => new Set(stages.map((s) => s.name)).size === stages.length, {
      error: "Stage names must be different.",
    }),
});
export type CreateRecipeRequest = z.input<typeof createRecipeRequestSchema>;

export const recipeSchema = z.object({
  id: uuidSchema,
  groupId: uuidSchema,
  name: z.string(),
  description: z.string(),
  stages: z.array(recipeStageSchema.extend({ codeName: z.string(), codeVersion: z.string() })),
  createdAt: isoDateTimeSchema,
});
export type Recipe = z.infer<typeof recipeSchema>;
export const recipeListSchema = z.object({ recipes: z.array(recipeSchema) });
