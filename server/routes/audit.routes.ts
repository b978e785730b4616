import { Router } from "express";
import { z } from "zod";
import { auditListSchema } from "../../shared/schemas/audit";
import { requirePrincipal } from "../auth/principal";
import { parseParams, shape } from "../http/validate";
import { listGroupAudit } from "../services/audit.service";
import type { RouteContext } from "./context";

const groupParams = z.object({ groupId: z.uuid({ error: "groupId must be a UUID" }) });

export function auditRoutes({ db }: RouteContext): Router {
  const router = Router();

  router.get("/groups/:groupId/audit", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    res.json(shape(auditListSchema, { entries: await listGroupAudit(db, principal, groupId) }));
  });

  return router;
}
