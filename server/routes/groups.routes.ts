import { Router } from "express";
import { z } from "zod";
import { auditListSchema } from "../../shared/schemas/audit";
import { createGroupRequestSchema, groupListSchema, groupSchema } from "../../shared/schemas/groups";
import {
  createInvitationRequestSchema,
  invitationListSchema,
  invitationSchema,
} from "../../shared/schemas/invitations";
import { memberListSchema, memberSchema, updateMemberRequestSchema } from "../../shared/schemas/members";
import { requirePrincipal } from "../auth/principal";
import { parseBody, parseParams, shape } from "../http/validate";
import { listGroupAudit } from "../services/audit.service";
import { createGroup, getGroup, listGroups } from "../services/groups.service";
import { createInvitation, listInvitations, revokeInvitation } from "../services/invitations.service";
import { changeMemberRole, listMembers, removeMember } from "../services/members.service";
import { clientIp, type RouteContext } from "./context";

const groupParams = z.object({ groupId: z.uuid({ error: "groupId must be a UUID" }) });
const memberParams = groupParams.extend({ userId: z.uuid({ error: "userId must be a UUID" }) });
const invitationParams = groupParams.extend({
  invitationId: z.uuid({ error: "invitationId must be a UUID" }),
});

export function groupRoutes(ctx: RouteContext): Router {
  const { db } = ctx;
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

  router.get("/groups/:groupId/invitations", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    res.json(shape(invitationListSchema, { invitations: await listInvitations(db, principal, groupId) }));
  });

  router.post("/groups/:groupId/invitations", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    const input = parseBody(createInvitationRequestSchema, req);
    const deps = {
      db,
      mailer: ctx.mailer,
      publicUrl: ctx.config.publicUrl,
      ttlDays: ctx.config.invitationTtlDays,
    };
    const invitation = await createInvitation(deps, principal, groupId, input, clientIp(req));
    res.status(201).json(shape(invitationSchema, invitation));
  });

  router.delete("/groups/:groupId/invitations/:invitationId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId, invitationId } = parseParams(invitationParams, req);
    await revokeInvitation(db, principal, groupId, invitationId, clientIp(req));
    res.status(204).end();
  });

  router.get("/groups/:groupId/audit", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    res.json(shape(auditListSchema, { entries: await listGroupAudit(db, principal, groupId) }));
  });

  return router;
}
