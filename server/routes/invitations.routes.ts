import { Router } from "express";
import { z } from "zod";
import {
  acceptInvitationResponseSchema,
  createInvitationRequestSchema,
  invitationListSchema,
  invitationPreviewSchema,
  invitationSchema,
} from "../../shared/schemas/invitations";
import { requirePrincipal } from "../auth/principal";
import { parseBody, parseParams, shape } from "../http/validate";
import {
  acceptInvitation,
  createInvitation,
  listInvitations,
  previewInvitation,
  revokeInvitation,
} from "../services/invitations.service";
import { clientIp, type RouteContext } from "./context";

const groupParams = z.object({ groupId: z.uuid({ error: "groupId must be a UUID" }) });
const invitationParams = groupParams.extend({
  invitationId: z.uuid({ error: "invitationId must be a UUID" }),
});
const tokenParams = z.object({
  token: z.string().regex(/^[A-Za-z0-9_-]{20,100}$/, { error: "This invitation link is malformed." }),
});

/** A group admin's side (invite, list, revoke) and the invitee's (look at the e-mailed link, accept). */
export function invitationRoutes(ctx: RouteContext): Router {
  const { db } = ctx;
  const router = Router();

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

  router.get("/invitations/:token", async (req, res) => {
    requirePrincipal(req);
    const { token } = parseParams(tokenParams, req);
    res.json(shape(invitationPreviewSchema, await previewInvitation(db, token)));
  });

  router.post("/invitations/:token/accept", async (req, res) => {
    const principal = requirePrincipal(req);
    const { token } = parseParams(tokenParams, req);
    res.json(
      shape(acceptInvitationResponseSchema, await acceptInvitation(db, principal, token, clientIp(req))),
    );
  });

  return router;
}
