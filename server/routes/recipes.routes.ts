import { Router } from "express";
import { z } from "zod";
import { createRecipeRequestSchema, recipeListSchema, recipeSchema } from "../../shared/schemas/recipes";
import { requirePrincipal } from "../auth/principal";
import { parseBody, parseParams, shape } from "../http/validate";
import { createRecipe, deleteRecipe, getRecipe, listRecipes } from "../services/recipes.service";
import { clientIp, type RouteContext } from "./context";

const groupParams = z.object({ groupId: z.uuid({ error: "groupId must be a UUID" }) });
const recipeParams = z.object({ recipeId: z.uuid({ error: "recipeId must be a UUID" }) });

export function recipeRoutes({ db }: RouteContext): Router {
  const router = Router();

  router.get("/groups/:groupId/recipes", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    res.json(shape(recipeListSchema, { recipes: await listRecipes(db, principal, groupId) }));
  });

  router.post("/groups/:groupId/recipes", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    const input = parseBody(createRecipeRequestSchema, req);
    res
      .status(201)
      .json(shape(recipeSchema, await createRecipe(db, principal, groupId, input, clientIp(req))));
  });

  router.get("/recipes/:recipeId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { recipeId } = parseParams(recipeParams, req);
    res.json(shape(recipeSchema, await getRecipe(db, principal, recipeId)));
  });

  router.delete("/recipes/:recipeId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { recipeId } = parseParams(recipeParams, req);
    await deleteRecipe(db, principal, recipeId, clientIp(req));
    res.status(204).end();
  });

  return router;
}
