import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import { Router } from "express";
import { z } from "zod";
import {
  createRunRequestSchema,
  resubmitRunRequestSchema,
  runDetailSchema,
  runListQuerySchema,
  runListSchema,
  runLogQuerySchema,
  runLogSchema,
  runSummarySchema,
} from "../../shared/schemas/runs";
import { requirePrincipal } from "../auth/principal";
import { AppError, validationError } from "../http/errors";
import { parseBody, parseParams, shape } from "../http/validate";
import {
  cancelRun,
  createRun,
  getRunDetail,
  listRuns,
  openRunLogDownload,
  readArtifact,
  readRunLog,
  resubmitRun,
} from "../services/runs.service";
import { clientIp, type RouteContext } from "./context";

const groupParams = z.object({ groupId: z.uuid({ error: "groupId must be a UUID" }) });
const runParams = z.object({ runId: z.uuid({ error: "runId must be a UUID" }) });
const artifactParams = runParams.extend({ artifactId: z.uuid({ error: "artifactId must be a UUID" }) });

function parseQuery<S extends z.ZodType>(schema: S, query: unknown): z.infer<S> {
  const result = schema.safeParse(query);
  if (!result.success) throw validationError(result.error, "query");
  return result.data;
}

export function runRoutes(ctx: RouteContext): Router {
  const router = Router();
  const deps = () => ({ db: ctx.db, pool: ctx.pool, boss: ctx.boss });

  router.post("/groups/:groupId/runs", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    const input = parseBody(createRunRequestSchema, req);
    const run = await createRun(deps(), principal, groupId, input, { ip: clientIp(req) });
    res.status(201).json(shape(runSummarySchema, run));
  });

  router.get("/groups/:groupId/runs", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    const query = runListQuerySchema.safeParse(req.query);
    if (!query.success) {
      // A 400 naming the parameter: a list's query is addressed by hand and shared as a link.
      const failed = validationError(query.error, "query");
      throw new AppError(400, "invalid_query", failed.message, failed.details);
    }
    res.json(shape(runListSchema, await listRuns(ctx.db, principal, groupId, query.data)));
  });

  router.get("/runs/:runId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { runId } = parseParams(runParams, req);
    res.json(shape(runDetailSchema, await getRunDetail(ctx.db, principal, runId)));
  });

  router.get("/runs/:runId/log", async (req, res) => {
    const principal = requirePrincipal(req);
    const { runId } = parseParams(runParams, req);
    const query = parseQuery(runLogQuerySchema, req.query);
    res.json(shape(runLogSchema, await readRunLog(ctx.db, principal, runId, query)));
  });

  router.get("/runs/:runId/log/raw", async (req, res) => {
    const principal = requirePrincipal(req);
    const { runId } = parseParams(runParams, req);
    const download = await openRunLogDownload(ctx.db, principal, runId);
    res.setHeader("content-type", "application/octet-stream");
    res.setHeader("content-disposition", `attachment; filename="${download.fileName}"`);
    res.setHeader("content-length", String(download.sizeBytes));
    res.setHeader("cache-control", "no-store");
    try {
      // pipeline waits for the client to take each chunk before the next page is read, and stops
      // reading when the client goes away.
      await pipeline(Readable.from(download.content), res);
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code === "ERR_STREAM_PREMATURE_CLOSE") return;
      throw error;
    }
  });

  router.get("/runs/:runId/artifacts/:artifactId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { runId, artifactId } = parseParams(artifactParams, req);
    const artifact = await readArtifact(ctx.db, principal, runId, artifactId);
    res.setHeader("content-type", "application/octet-stream");
    res.setHeader("content-disposition", `attachment; filename="${artifact.name}"`);
    res.setHeader("x-content-sha256", artifact.sha256);
    res.send(artifact.content);
  });

  router.post("/runs/:runId/cancel", async (req, res) => {
    const principal = requirePrincipal(req);
    const { runId } = parseParams(runParams, req);
    res.json(shape(runSummarySchema, await cancelRun(deps(), principal, runId, clientIp(req))));
  });

  router.post("/runs/:runId/resubmit", async (req, res) => {
    const principal = requirePrincipal(req);
    const { runId } = parseParams(runParams, req);
    const input = parseBody(resubmitRunRequestSchema, req);
    res
      .status(201)
      .json(shape(runSummarySchema, await resubmitRun(deps(), principal, runId, input, clientIp(req))));
  });

  return router;
}
