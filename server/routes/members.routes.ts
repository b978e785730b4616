import { Router } from "express";
import { z } from "zod";
import { memberListSchema, memberSchema, updateMemberRequestSchema } from "../../shared/schemas/members";
import { requirePrincipal } from "../auth/principal";
import { parseBody, parseParams, shape } from "../http/validate";
import { changeMemberRole, listMembers, removeMember } from "../services/members.service";
import { clientIp, type RouteContext } from "./context";

const groupParams = z.object({ groupId: z.uuid({ error: "groupId must be a UUID" }) });
const memberParams = groupParams.extend({ userId: z.uuid({ error: "userId must be a UUID" }) });

export function memberRoutes({ db }: RouteContext): Router {
  const router = Router();

  router.get("/groups/:groupId/members", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    res.json(shape(memberListSchema, { members: await listMembers(db, principal, groupId) }));
  });

  router.patch("/groups/:groupId/members/:userId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId, userId } = parseParams(memberParams, req);
    const { role } = parseBody(updateMemberRequestSchema, req);
    res.json(
      shape(memberSchema, await changeMemberRole(db, principal, groupId, userId, role, clientIp(req))),
    );
  });

  router.delete("/groups/:groupId/members/:userId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId, userId } = parseParams(memberParams, req);
    await removeMember(db, principal, groupId, userId, clientIp(req));
    res.status(204).end();
  });

  return router;
}
