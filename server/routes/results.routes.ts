import { Router } from "express";
import { z } from "zod";
import { runResultsSchema } from "../../shared/schemas/results";
import { requirePrincipal } from "../auth/principal";
import { parseParams, shape } from "../http/validate";
import { getRunResults } from "../services/results.service";
import type { RouteContext } from "./context";

const runParams = z.object({ runId: z.uuid({ error: "runId must be a UUID" }) });

/** A run's results (worker/steps/postprocess.ts derives them after the run is done). */
export function resultRoutes(ctx: RouteContext): Router {
  const router = Router();

  router.get("/runs/:runId/results", async (req, res) => {
    const principal = requirePrincipal(req);
    const { runId } = parseParams(runParams, req);
    res.json(shape(runResultsSchema, await getRunResults(ctx.db, principal, runId)));
  });

  return router;
}
