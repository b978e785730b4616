/**
 * Recipes: ordered stages, each running one registered code of the same group. Members create them;
 * admins, or the member who created one, delete them while no run refers to them.
 */
import { and, asc, eq, inArray, sql } from "drizzle-orm";
import type { CreateRecipeRequest, Recipe, RecipeStage } from "../../shared/schemas/recipes";
import { recordAudit } from "../audit/record-audit";
import type { Principal } from "../auth/principal";
import type { Database, DbExecutor } from "../db/client";
import { pgErrorCode } from "../db/pg-errors";
import { codes, recipes, runs } from "../db/schema";
import { AppError, conflict, forbidden, notFound } from "../http/errors";
import { requireGroupRole, requireRoleFor } from "./access";
import { retiredCodeMessage } from "./codes.service";

type RecipeRow = typeof recipes.$inferSelect;
type CodeLabel = { id: string; name: string; version: string };

function toRecipe(row: RecipeRow, labels: Map<string, CodeLabel>): Recipe {
  const stages = row.stages as RecipeStage[];
  return {
    id: row.id,
    groupId: row.groupId,
    name: row.name,
    description: row.description,
    stages: stages.map((stage) => ({
      name: stage.name,
      codeId: stage.codeId,
      codeName: labels.get(stage.codeId)?.name ?? "(deleted code)",
      codeVersion: labels.get(stage.codeId)?.version ?? "",
    })),
    createdAt: row.createdAt.toISOString(),
  };
}

async function codeLabels(db: DbExecutor, rows: RecipeRow[]): Promise<Map<string, CodeLabel>> {
  const ids = [...new Set(rows.flatMap((row) => (row.stages as RecipeStage[]).map((s) => s.codeId)))];
  if (ids.length === 0) return new Map();
  const found = await db
    .select({ id: codes.id, name: codes.name, version: codes.version })
    .from(codes)
    .where(inArray(codes.id, ids));
  return new Map(found.map((code) => [code.id, code]));
}

export async function listRecipes(db: Database, principal: Principal, groupId: string): Promise<Recipe[]> {
  await requireGroupRole(db, principal, groupId, "collaborator");
  const rows = await db.select().from(recipes).where(eq(recipes.groupId, groupId)).orderBy(asc(recipes.name));
  const labels = await codeLabels(db, rows);
  return rows.map((row) => toRecipe(row, labels));
}

async function recipeForCaller(db: Database, principal: Principal, recipeId: string) {
  const [row] = await db.select().from(recipes).where(eq(recipes.id, recipeId));
  if (!row) throw notFound("Recipe");
  const role = await requireRoleFor(db, principal, row.groupId, "collaborator", "Recipe");
  return { row, role };
}

export async function getRecipe(db: Database, principal: Principal, recipeId: string): Promise<Recipe> {
  const { row } = await recipeForCaller(db, principal, recipeId);
  return toRecipe(row, await codeLabels(db, [row]));
}

export async function createRecipe(
  db: Database,
  principal: Principal,
  groupId: string,
  input: Required<CreateRecipeRequest>,
  ip: string | null,
): Promise<Recipe> {
  await requireGroupRole(db, principal, groupId, "member");
  const codeIds = [...new Set(input.stages.map((stage) => stage.codeId))];
  return db.transaction(async (tx) => {
    // FOR SHARE keeps these codes from being deleted until this recipe is committed.
    const found = await tx
      .select({ id: codes.id, name: codes.name, version: codes.version, retiredAt: codes.retiredAt })
      .from(codes)
      .where(and(eq(codes.groupId, groupId), inArray(codes.id, codeIds)))
      .for("share");
    const labels = new Map(found.map((code) => [code.id, code]));
    const missing = input.stages
      .map((stage, index) => ({ stage, index }))
      .filter(({ stage }) => !labels.has(stage.codeId))
      .map(({ index }) => ({ path: `stages.${index}.codeId`, message: "is not a code of this group" }));
    if (missing.length > 0) {
      throw new AppError(
        422,
        "unknown_code",
        `${missing[0]!.path}: pick a code registered in this group for every stage.`,
        missing,
      );
    }
    const retired = input.stages
      .map((stage, index) => ({ code: labels.get(stage.codeId)!, index }))
      .filter(({ code }) => code.retiredAt !== null)
      .map(({ code, index }) => ({
        path: `stages.${index}.codeId`,
        message: retiredCodeMessage(code.name, code.version),
      }));
    if (retired.length > 0) {
      throw new AppError(422, "retired_code", `${retired[0]!.path}: ${retired[0]!.message}`, retired);
    }
    const stages: RecipeStage[] = input.stages.map((stage) => ({ name: stage.name, codeId: stage.codeId }));
    const [row] = await tx
      .insert(recipes)
      .values({
        groupId,
        name: input.name,
        description: input.description,
        stages,
        createdBy: principal.userId,
      })
      .onConflictDoNothing({ target: [recipes.groupId, recipes.name] })
      .returning();
    if (!row) throw conflict(`This group already has a recipe named "${input.name}".`, { path: "name" });
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId,
      action: "recipe.create",
      targetType: "recipe",
      targetId: row.id,
      details: { name: row.name, stages },
      ip,
    });
    return toRecipe(row, labels);
  });
}

const usedByRuns = () =>
  conflict("Runs have used this recipe, and their records point at it, so it cannot be deleted.");

export async function deleteRecipe(db: Database, principal: Principal, recipeId: string, ip: string | null) {
  const { row, role } = await recipeForCaller(db, principal, recipeId);
  const isCreator = row.createdBy === principal.userId && role !== "collaborator";
  if (!principal.isSiteAdmin && role !== "admin" && !isCreator) {
    throw forbidden("Only the group's admins or the recipe's author can delete it.");
  }
  try {
    await db.transaction(async (tx) => {
      const [used] = await tx.select({ one: sql`1` }).from(runs).where(eq(runs.recipeId, recipeId)).limit(1);
      if (used) throw usedByRuns();
      await tx.delete(recipes).where(eq(recipes.id, recipeId));
      await recordAudit(tx, {
        actorUserId: principal.userId,
        groupId: row.groupId,
        action: "recipe.delete",
        targetType: "recipe",
        targetId: recipeId,
        details: { name: row.name },
        ip,
      });
    });
  } catch (error) {
    if (pgErrorCode(error) === "23503") throw usedByRuns();
    throw error;
  }
}
