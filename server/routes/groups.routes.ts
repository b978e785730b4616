import { Router } from "express";
import { z } from "zod";
import { createGroupRequestSchema, groupListSchema, groupSchema } from "../../shared/schemas/groups";
import { requirePrincipal } from "../auth/principal";
import { parseBody, parseParams, shape } from "../http/validate";
import { createGroup, getGroup, listGroups } from "../services/groups.service";
import { clientIp, type RouteContext } from "./context";

const groupParams = z.object({ groupId: z.uuid({ error: "groupId must be a UUID" }) });

export function groupRoutes({ db }: RouteContext): Router {
  const router = Router();

  router.get("/groups", async (req, res) => {
    const groups = await listGroups(db, requirePrincipal(req));
    res.json(shape(groupListSchema, { groups }));
  });

  router.post("/groups", async (req, res) => {
    const principal = requirePrincipal(req);
    const input = parseBody(createGroupRequestSchema, req);
    res.status(201).json(shape(groupSchema, await createGroup(db, principal, input, clientIp(req))));
  });

  router.get("/groups/:groupId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    res.json(shape(groupSchema, await getGroup(db, principal, groupId)));
  });

  return router;
}
