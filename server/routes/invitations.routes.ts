import { Router } from "express";
import { z } from "zod";
import { acceptInvitationResponseSchema, invitationPreviewSchema } from "../../shared/schemas/invitations";
import { requirePrincipal } from "../auth/principal";
import { parseParams, shape } from "../http/validate";
import { acceptInvitation, previewInvitation } from "../services/invitations.service";
import { clientIp, type RouteContext } from "./context";

const tokenParams = z.object({
  token: z.string().regex(/^[A-Za-z0-9_-]{20,100}$/, { error: "This invitation link is malformed." }),
});

/** The invitee's side: look at an invitation from the e-mail link and accept it. */
export function invitationRoutes({ db }: RouteContext): Router {
  const router = Router();

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
