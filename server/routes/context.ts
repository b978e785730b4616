import type { Request } from "express";
import type { ServerConfig } from "../config";
import type { Database } from "../db/client";
import type { Logger } from "../logger";
import type { Mailer } from "../mail/mailer";

/** What route modules receive from the app assembly. */
export type RouteContext = { db: Database; config: ServerConfig; mailer: Mailer; log: Logger };

export const clientIp = (req: Request): string | null => req.ip ?? null;
