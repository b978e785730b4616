/**
 * Checks a run spec against the group's recipe and codes: every named stage exists, each stage's code
 * is still registered, and the parameters fit the code's declared schema (defaults filled in).
 */
import { and, eq, inArray } from "drizzle-orm";
import { type CodeDefinition, codeDefinitionSchema } from "../../shared/schemas/codes";
import type { RecipeStage } from "../../shared/schemas/recipes";
import type { RunSpecRequest } from "../../shared/schemas/runs";
import type { Database, DbExecutor } from "../db/client";
import { codes, recipes } from "../db/schema";
import { validateParameters } from "../execution/parameters";
import type { StageInput } from "../execution/run-plan";
import { AppError } from "../http/errors";
import { retiredCodeMessage } from "./codes.service";

export async function loadStages(
  db: Database,
  groupId: string,
  spec: Pick<RunSpecRequest, "recipeId" | "parameters">,
): Promise<StageInput[]> {
  const [recipe] = await db
    .select()
    .from(recipes)
    .where(and(eq(recipes.id, spec.recipeId), eq(recipes.groupId, groupId)));
  if (!recipe)
    throw new AppError(422, "validation_failed", "The recipe does not exist in this group.", [
      { path: "spec.recipeId", message: "Unknown recipe." },
    ]);
  const stages = recipe.stages as RecipeStage[];
  const codeRows = await db
    .select()
    .from(codes)
    .where(
      and(
        eq(codes.groupId, groupId),
        inArray(
          codes.id,
          stages.map((s) => s.codeId),
        ),
      ),
    );
  const byId = new Map(
    codeRows.map((row) => [row.id, codeDefinitionSchema.parse(row.definition) as CodeDefinition]),
  );
  refuseRetiredCodes(stages, codeRows);
  const unknownStages = Object.keys(spec.parameters).filter((name) => !stages.some((s) => s.name === name));
  if (unknownStages.length > 0) {
    throw new AppError(
      422,
      "validation_failed",
      `The recipe has no stage named ${unknownStages.join(", ")}.`,
      unknownStages.map((name) => ({
        path: `spec.parameters.${name}`,
        message: "No such stage in the recipe.",
      })),
    );
  }
  const problems: { path: string; message: string }[] = [];
  const inputs = stages.map((stage) => {
    const definition = byId.get(stage.codeId);
    if (!definition)
      throw new AppError(422, "validation_failed", `The code of stage ${stage.name} was deleted.`);
    const check = validateParameters(definition, spec.parameters[stage.name] ?? {});
    if (!check.valid) {
      for (const issue of check.errors) {
        problems.push({
          path: `spec.parameters.${stage.name}${issue.path ? `.${issue.path}` : ""}`,
          message: issue.message,
        });
      }
      return { name: stage.name, codeId: stage.codeId, definition, parameters: {} };
    }
    // Defaults from the schema are filled in, so equal runs get equal fingerprints however they are written.
    return { name: stage.name, codeId: stage.codeId, definition, parameters: check.parameters };
  });
  if (problems.length > 0) {
    throw new AppError(
      422,
      "validation_failed",
      `The parameters do not fit the codes' declarations: ${problems[0]!.path}: ${problems[0]!.message}`,
      problems,
    );
  }
  return inputs;
}

type CodeRow = typeof codes.$inferSelect;

/** A retired code version keeps its existing runs, but no new run (nor its preview) may use it. */
function refuseRetiredCodes(
  stages: readonly { name: string; codeId: string }[],
  codeRows: readonly Pick<CodeRow, "id" | "name" | "version" | "retiredAt">[],
): void {
  const retired = stages.flatMap((stage) => {
    const row = codeRows.find((r) => r.id === stage.codeId);
    return row?.retiredAt
      ? [
          {
            path: `spec.parameters.${stage.name}`,
            message: `Stage ${stage.name}: ${retiredCodeMessage(row.name, row.version)}`,
          },
        ]
      : [];
  });
  if (retired.length > 0) {
    throw new AppError(422, "retired_code", retired[0]!.message, retired);
  }
}

/**
 * Inside the transaction that stores a run: takes FOR SHARE on the stages' codes and checks again that
 * none was retired since the run was checked. Retiring takes FOR UPDATE on the code, so it waits for
 * this transaction, or this one waits for it and then sees the code retired.
 */
export async function holdStageCodes(
  tx: DbExecutor,
  stages: readonly { name: string; codeId: string }[],
): Promise<void> {
  const codeRows = await tx
    .select({ id: codes.id, name: codes.name, version: codes.version, retiredAt: codes.retiredAt })
    .from(codes)
    .where(
      inArray(
        codes.id,
        stages.map((stage) => stage.codeId),
      ),
    )
    .orderBy(codes.id)
    .for("share");
  refuseRetiredCodes(stages, codeRows);
}
