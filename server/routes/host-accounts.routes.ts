import { Router } from "express";
import { z } from "zod";
import {
  createHostAccountRequestSchema,
  hostAccountListSchema,
  hostAccountSchema,
  patchHostAccountRequestSchema,
  replaceHostAccountRequestSchema,
} from "../../shared/schemas/host-accounts";
import { requirePrincipal } from "../auth/principal";
import { parseBody, parseParams, shape } from "../http/validate";
import {
  createHostAccount,
  deleteHostAccount,
  listHostAccounts,
  replaceHostAccount,
  setHostAccountDisabled,
} from "../services/host-accounts.service";
import { clientIp, type RouteContext } from "./context";

const hostParams = z.object({ hostId: z.uuid({ error: "hostId must be a UUID" }) });
const accountParams = z.object({ accountId: z.uuid({ error: "accountId must be a UUID" }) });

export function hostAccountRoutes(ctx: RouteContext): Router {
  const { db } = ctx;
  const router = Router();

  router.get("/hosts/:hostId/accounts", async (req, res) => {
    const principal = requirePrincipal(req);
    const { hostId } = parseParams(hostParams, req);
    res.json(shape(hostAccountListSchema, { accounts: await listHostAccounts(db, principal, hostId) }));
  });

  router.post("/hosts/:hostId/accounts", async (req, res) => {
    const principal = requirePrincipal(req);
    const { hostId } = parseParams(hostParams, req);
    const input = parseBody(createHostAccountRequestSchema, req);
    const account = await createHostAccount(
      { db, config: ctx.config },
      principal,
      hostId,
      input,
      clientIp(req),
    );
    res.status(201).json(shape(hostAccountSchema, account));
  });

  router.patch("/host-accounts/:accountId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { accountId } = parseParams(accountParams, req);
    const { disabled } = parseBody(patchHostAccountRequestSchema, req);
    const account = await setHostAccountDisabled(db, principal, accountId, disabled, clientIp(req));
    res.json(shape(hostAccountSchema, account));
  });

  router.post("/host-accounts/:accountId/replacement", async (req, res) => {
    const principal = requirePrincipal(req);
    const { accountId } = parseParams(accountParams, req);
    const input = parseBody(replaceHostAccountRequestSchema, req);
    const account = await replaceHostAccount(
      { db, config: ctx.config },
      principal,
      accountId,
      input,
      clientIp(req),
    );
    res.status(201).json(shape(hostAccountSchema, account));
  });

  router.delete("/host-accounts/:accountId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { accountId } = parseParams(accountParams, req);
    await deleteHostAccount(db, principal, accountId, clientIp(req));
    res.status(204).end();
  });

  return router;
}
