import { Router } from "express";
import { z } from "zod";
import { runPreviewRequestSchema, runPreviewSchema } from "../../shared/schemas/run-preview";
import { requirePrincipal } from "../auth/principal";
import { parseBody, parseParams, shape } from "../http/validate";
import { previewRun } from "../services/run-preview.service";
import type { RouteContext } from "./context";

const groupParams = z.object({ groupId: z.uuid({ error: "groupId must be a UUID" }) });

export function runPreviewRoutes(ctx: RouteContext): Router {
  const router = Router();

  // A POST because the spec is a body; it changes nothing (no run, reservation or audit entry).
  router.post("/groups/:groupId/runs/preview", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    const { spec } = parseBody(runPreviewRequestSchema, req);
    res.json(shape(runPreviewSchema, await previewRun(ctx.db, principal, groupId, spec)));
  });

  return router;
}
