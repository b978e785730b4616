import type pg from "pg";
import type PgBoss from "pg-boss";
import type { Database } from "../server/db/client";
import type { Logger } from "../server/logger";
import type { Mailer } from "../server/mail/mailer";
import type { WorkerConfig } from "./config";
import type { LogFollowers } from "./logs/log-follower";
import type { SshPool } from "./ssh/pool";
import type { StagingClaims } from "./staging-claims";

/** What every worker step receives. */
export type WorkerContext = {
  db: Database;
  pool: pg.Pool;
  boss: PgBoss;
  ssh: SshPool;
  config: WorkerConfig;
  log: Logger;
  mailer: Mailer;
  /** Keeps two attempts from staging the same run at once (see staging-claims.ts). */
  stagingClaims: StagingClaims;
  /** Running jobs' logs streamed as they are written (see logs/log-follower.ts). */
  logFollowers: LogFollowers;
};
