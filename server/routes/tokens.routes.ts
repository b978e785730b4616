import { Router } from "express";
import { z } from "zod";
import {
  apiTokenListSchema,
  createApiTokenRequestSchema,
  createdApiTokenSchema,
} from "../../shared/schemas/tokens";
import { requirePrincipal } from "../auth/principal";
import { forbidden } from "../http/errors";
import { parseBody, parseParams, shape } from "../http/validate";
import { createApiToken, listApiTokens, revokeApiToken } from "../services/tokens.service";
import { clientIp, type RouteContext } from "./context";

const tokenParams = z.object({ tokenId: z.uuid({ error: "tokenId must be a UUID" }) });

export function tokenRoutes({ db }: RouteContext): Router {
  const router = Router();

  router.get("/tokens", async (req, res) => {
    res.json(shape(apiTokenListSchema, { tokens: await listApiTokens(db, requirePrincipal(req)) }));
  });

  router.post("/tokens", async (req, res) => {
    const principal = requirePrincipal(req);
    // A leaked token must not be able to mint more tokens: creating one needs a browser session.
    if (principal.via !== "session")
      throw forbidden("API tokens are created in the browser, not with a token.");
    const input = parseBody(createApiTokenRequestSchema, req);
    res
      .status(201)
      .json(shape(createdApiTokenSchema, await createApiToken(db, principal, input, clientIp(req))));
  });

  router.delete("/tokens/:tokenId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { tokenId } = parseParams(tokenParams, req);
    await revokeApiToken(db, principal, tokenId, clientIp(req));
    res.status(204).end();
  });

  return router;
}
