import { Router } from "express";
import { z } from "zod";
import {
  createIsotopologueRequestSchema,
  createTargetRequestSchema,
  targetDetailSchema,
  targetListSchema,
  targetVersionSchema,
  updateTargetRequestSchema,
} from "../../shared/schemas/targets";
import { requirePrincipal } from "../auth/principal";
import { parseBody, parseParams, shape } from "../http/validate";
import {
  createIsotopologue,
  createTarget,
  deleteTarget,
  getTarget,
  getTargetVersion,
  listTargets,
  updateTarget,
} from "../services/targets.service";
import { clientIp, type RouteContext } from "./context";

const groupParams = z.object({ groupId: z.uuid({ error: "groupId must be a UUID" }) });
const targetParams = z.object({ targetId: z.uuid({ error: "targetId must be a UUID" }) });
const versionParams = targetParams.extend({
  version: z.coerce
    .number({ error: "version must be a whole number from 1" })
    .int({ error: "version must be a whole number from 1" })
    .min(1, { error: "version must be a whole number from 1" })
    .max(2_147_483_647, { error: "version must be a whole number from 1" }),
});

/**
 * Paths whose request bodies may carry the text of an XYZ file (up to MAX_XYZ_BYTES, escaped in JSON),
 * so app.ts gives them a larger body limit than other routes.
 */
export const TARGET_WRITE_PATHS = ["/groups/:groupId/targets", "/targets/:targetId"];

export function targetRoutes({ db }: RouteContext): Router {
  const router = Router();

  router.get("/groups/:groupId/targets", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    res.json(shape(targetListSchema, { targets: await listTargets(db, principal, groupId) }));
  });

  router.post("/groups/:groupId/targets", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    const input = parseBody(createTargetRequestSchema, req);
    res
      .status(201)
      .json(shape(targetDetailSchema, await createTarget(db, principal, groupId, input, clientIp(req))));
  });

  router.get("/targets/:targetId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { targetId } = parseParams(targetParams, req);
    res.json(shape(targetDetailSchema, await getTarget(db, principal, targetId)));
  });

  router.get("/targets/:targetId/versions/:version", async (req, res) => {
    const principal = requirePrincipal(req);
    const { targetId, version } = parseParams(versionParams, req);
    res.json(shape(targetVersionSchema, await getTargetVersion(db, principal, targetId, version)));
  });

  router.patch("/targets/:targetId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { targetId } = parseParams(targetParams, req);
    const input = parseBody(updateTargetRequestSchema, req);
    res.json(shape(targetDetailSchema, await updateTarget(db, principal, targetId, input, clientIp(req))));
  });

  router.post("/targets/:targetId/isotopologues", async (req, res) => {
    const principal = requirePrincipal(req);
    const { targetId } = parseParams(targetParams, req);
    const input = parseBody(createIsotopologueRequestSchema, req);
    res
      .status(201)
      .json(
        shape(targetDetailSchema, await createIsotopologue(db, principal, targetId, input, clientIp(req))),
      );
  });

  router.delete("/targets/:targetId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { targetId } = parseParams(targetParams, req);
    await deleteTarget(db, principal, targetId, clientIp(req));
    res.status(204).end();
  });

  return router;
}
