import { Router } from "express";
import { z } from "zod";
import {
  confirmHostKeyRequestSchema,
  createHostRequestSchema,
  hostListSchema,
  hostSchema,
  patchHostRequestSchema,
} from "../../shared/schemas/hosts";
import { requirePrincipal } from "../auth/principal";
import { fetchHostKey } from "../hosts/host-key-probe";
import { parseBody, parseParams, shape } from "../http/validate";
import {
  confirmHostKey,
  createHost,
  deleteHost,
  getHost,
  HOST_KEY_TIMEOUT_MS,
  type HostKeyFetcher,
  listHosts,
  refreshHostKey,
  updateHost,
} from "../services/hosts.service";
import { clientIp, type RouteContext } from "./context";

const groupParams = z.object({ groupId: z.uuid({ error: "groupId must be a UUID" }) });
const hostParams = z.object({ hostId: z.uuid({ error: "hostId must be a UUID" }) });

/**
 * The host-key reader is injectable so these routes can be exercised without a network; by default it
 * is the server's one-handshake SSH probe.
 */
export type HostRouteOptions = { fetchHostKey?: HostKeyFetcher; hostKeyTimeoutMs?: number };

export function hostRoutes({ db }: RouteContext, options: HostRouteOptions = {}): Router {
  const hostDeps = {
    db,
    fetchHostKey: options.fetchHostKey ?? fetchHostKey,
    hostKeyTimeoutMs: options.hostKeyTimeoutMs ?? HOST_KEY_TIMEOUT_MS,
  };
  const router = Router();

  router.get("/groups/:groupId/hosts", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    res.json(shape(hostListSchema, { hosts: await listHosts(db, principal, groupId) }));
  });

  router.post("/groups/:groupId/hosts", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    const input = parseBody(createHostRequestSchema, req);
    res
      .status(201)
      .json(shape(hostSchema, await createHost(hostDeps, principal, groupId, input, clientIp(req))));
  });

  router.get("/hosts/:hostId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { hostId } = parseParams(hostParams, req);
    res.json(shape(hostSchema, await getHost(db, principal, hostId)));
  });

  router.patch("/hosts/:hostId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { hostId } = parseParams(hostParams, req);
    const input = parseBody(patchHostRequestSchema, req);
    res.json(shape(hostSchema, await updateHost(hostDeps, principal, hostId, input, clientIp(req))));
  });

  router.delete("/hosts/:hostId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { hostId } = parseParams(hostParams, req);
    await deleteHost(db, principal, hostId, clientIp(req));
    res.status(204).end();
  });

  router.post("/hosts/:hostId/host-key/refresh", async (req, res) => {
    const principal = requirePrincipal(req);
    const { hostId } = parseParams(hostParams, req);
    res.json(shape(hostSchema, await refreshHostKey(hostDeps, principal, hostId, clientIp(req))));
  });

  router.post("/hosts/:hostId/host-key/confirm", async (req, res) => {
    const principal = requirePrincipal(req);
    const { hostId } = parseParams(hostParams, req);
    const { fingerprint } = parseBody(confirmHostKeyRequestSchema, req);
    res.json(shape(hostSchema, await confirmHostKey(db, principal, hostId, fingerprint, clientIp(req))));
  });

  return router;
}
