import type { Request } from "express";
import type pg from "pg";
import type PgBoss from "pg-boss";
import type { ServerConfig } from "../config";
import type { Database } from "../db/client";
import type { Logger } from "../logger";
import type { Mailer } from "../mail/mailer";

/** What route modules receive from the app assembly. */
export type RouteContext = {
  db: Database;
  pool: pg.Pool;
  boss: PgBoss;
  config: ServerConfig;
  mailer: Mailer;
  log: Logger;
};

export const clientIp = (req: Request): string | null => req.ip ?? null;
