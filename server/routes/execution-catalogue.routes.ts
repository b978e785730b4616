/**
 * The execution catalogue under /api: hosts and their accounts, codes, recipes and allocations.
 * The host-key reader is injectable so the routes can be exercised without a network; by default it is
 * the server's one-handshake SSH probe.
 */
import { Router } from "express";
import { fetchHostKey } from "../hosts/host-key-probe";
import { HOST_KEY_TIMEOUT_MS, type HostKeyFetcher } from "../services/hosts.service";
import { allocationRoutes } from "./allocations.routes";
import { codeRoutes } from "./codes.routes";
import type { RouteContext } from "./context";
import { hostRoutes } from "./hosts.routes";
import { recipeRoutes } from "./recipes.routes";

export type ExecutionCatalogueOptions = { fetchHostKey?: HostKeyFetcher; hostKeyTimeoutMs?: number };

export function executionCatalogueRoutes(ctx: RouteContext, options: ExecutionCatalogueOptions = {}): Router {
  const router = Router();
  router.use(
    hostRoutes(ctx, {
      db: ctx.db,
      fetchHostKey: options.fetchHostKey ?? fetchHostKey,
      hostKeyTimeoutMs: options.hostKeyTimeoutMs ?? HOST_KEY_TIMEOUT_MS,
    }),
  );
  router.use(codeRoutes(ctx));
  router.use(recipeRoutes(ctx));
  router.use(allocationRoutes(ctx));
  return router;
}
