import type pg from "pg";
import type PgBoss from "pg-boss";
import type { Database } from "../server/db/client";
import type { Logger } from "../server/logger";
import type { Mailer } from "../server/mail/mailer";
import type { WorkerConfig } from "./config";
import type { LogFollowers } from "./logs/log-follower";
import type { RunClaims } from "./run-claims";
import type { SshPool } from "./ssh/pool";

/** What every worker step receives. */
export type WorkerContext = {
  db: Database;
  pool: pg.Pool;
  boss: PgBoss;
  ssh: SshPool;
  config: WorkerConfig;
  log: Logger;
  mailer: Mailer;
  /** Keeps two attempts from staging the same run at once (see run-claims.ts). */
  stagingClaims: RunClaims;
  /** Keeps two workers from streaming the same log at once (see run-claims.ts). */
  logFollowClaims: RunClaims;
  /** Running jobs' logs streamed as they are written (see logs/log-follower.ts). */
  logFollowers: LogFollowers;
};
