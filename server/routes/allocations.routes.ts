import { Router } from "express";
import { z } from "zod";
import {
  allocationListSchema,
  allocationSchema,
  createAllocationRequestSchema,
  ledgerSchema,
} from "../../shared/schemas/allocations";
import { requirePrincipal } from "../auth/principal";
import { parseBody, parseParams, shape } from "../http/validate";
import { allocationLedger, createAllocation, listAllocations } from "../services/allocations.service";
import { clientIp, type RouteContext } from "./context";

const groupParams = z.object({ groupId: z.uuid({ error: "groupId must be a UUID" }) });
const allocationParams = z.object({ allocationId: z.uuid({ error: "allocationId must be a UUID" }) });

export function allocationRoutes({ db }: RouteContext): Router {
  const router = Router();

  router.get("/groups/:groupId/allocations", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    res.json(shape(allocationListSchema, { allocations: await listAllocations(db, principal, groupId) }));
  });

  router.post("/groups/:groupId/allocations", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    const input = parseBody(createAllocationRequestSchema, req);
    const allocation = await createAllocation(db, principal, groupId, input, clientIp(req));
    res.status(201).json(shape(allocationSchema, allocation));
  });

  router.get("/allocations/:allocationId/ledger", async (req, res) => {
    const principal = requirePrincipal(req);
    const { allocationId } = parseParams(allocationParams, req);
    res.json(shape(ledgerSchema, { entries: await allocationLedger(db, principal, allocationId) }));
  });

  return router;
}
