import { performance } from "node:perf_hooks";
import { sql } from "drizzle-orm";
import { Router } from "express";
import { healthSchema } from "../../shared/schemas/health";
import { shape } from "../http/validate";
import type { RouteContext } from "./context";

const VERSION = process.env.npm_package_version ?? "0.1.0";

export function healthRoutes({ db }: RouteContext): Router {
  const router = Router();
  router.get("/health", async (_req, res) => {
    const started = performance.now();
    try {
      await db.execute(sql`select 1`);
      const latencyMs = Math.round((performance.now() - started) * 10) / 10;
      res.json(shape(healthSchema, { status: "ok", database: { ok: true, latencyMs }, version: VERSION }));
    } catch (error) {
      const body = {
        status: "degraded" as const,
        database: { ok: false, latencyMs: null, error: (error as Error).message },
        version: VERSION,
      };
      res.status(503).json(shape(healthSchema, body));
    }
  });
  return router;
}
