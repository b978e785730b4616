/**
 * Starts a Sigmaflow worker: `node --import tsx worker/index.ts`. Several may run against the same
 * PostgreSQL; they share the queues and take turns polling each host.
 */
import { createDatabase } from "../server/db/client";
import { applyMigrations } from "../server/db/migrate";
import { createLogger } from "../server/logger";
import { createMailer } from "../server/mail/mailer";
import { createBoss, createRunQueues, RUN_STEP_QUEUES, runStepPayloadSchema } from "../server/queue/queues";
import { loadWorkerConfig } from "./config";
import type { WorkerContext } from "./context";
import { LogFollowers } from "./logs/log-follower";
import { every, pollAllHosts, reconcileRunsInFlight, resumeHeldRuns } from "./maintenance";
import { RunClaims } from "./run-claims";
import { SshPool } from "./ssh/pool";
import { cancelRunOnHost } from "./steps/cancel";
import { collectRun } from "./steps/collect";
import { postprocessRun, reconcilePendingResults } from "./steps/postprocess";
import { stageRun } from "./steps/stage";

/** Step items one handler loop takes per fetch. */
const STEP_BATCH_SIZE = 4;

export async function startWorker(config = loadWorkerConfig()) {
  const log = createLogger(config.logLevel).child({ service: "sigmaflow-worker" });
  await applyMigrations(config.databaseUrl);
  const { db, pool } = createDatabase(config.databaseUrl, { maxConnections: config.dbPoolSize });
  const boss = createBoss(config.databaseUrl);
  boss.on("error", (error) => log.error({ err: error }, "queue error"));
  await boss.start();
  await createRunQueues(boss);
  const ssh = new SshPool(config.ssh);
  const base: Omit<WorkerContext, "logFollowers"> = {
    db,
    pool,
    boss,
    ssh,
    config,
    log,
    mailer: createMailer(config.smtp),
    stagingClaims: new RunClaims(config.databaseUrl, "staging"),
    logFollowClaims: new RunClaims(config.databaseUrl, "log-follow"),
  };
  const ctx: WorkerContext = Object.assign(base, {
    logFollowers: undefined as unknown as LogFollowers,
  });
  ctx.logFollowers = new LogFollowers(ctx, config.logFollow);

  const handlers = {
    [RUN_STEP_QUEUES.stage]: stageRun,
    [RUN_STEP_QUEUES.collect]: collectRun,
    [RUN_STEP_QUEUES.cancel]: cancelRunOnHost,
    [RUN_STEP_QUEUES.postprocess]: postprocessRun,
  } as const;
  for (const [queue, handler] of Object.entries(handlers)) {
    for (let i = 0; i < config.concurrency; i += 1) {
      // A full batch means more items are probably waiting: the loop then fetches again at once instead
      // of sleeping for the polling interval (pg-boss sleeps unless the worker was notified).
      let workerId = "";
      workerId = await boss.work(
        queue,
        { batchSize: STEP_BATCH_SIZE, pollingIntervalSeconds: config.queuePollSeconds },
        async (jobs) => {
          if (jobs.length === STEP_BATCH_SIZE) boss.notifyWorker(workerId);
          await Promise.all(
            jobs.map(async (job) => {
              const { runId } = runStepPayloadSchema.parse(job.data);
              try {
                await handler(ctx, runId);
              } catch (error) {
                // pg-boss retries the item; the log says why it had to.
                log.error({ err: error, runId, queue }, "run step failed; the queue will retry it");
                throw error;
              }
            }),
          );
        },
      );
    }
  }

  const reattached = await reconcileRunsInFlight(ctx);
  const resultsPending = await reconcilePendingResults(ctx);
  log.info({ reattached, resultsPending }, "worker started");
  const onError = (error: unknown) => log.error({ err: error }, "worker timer failed");
  const stopPolling = every(config.pollIntervalMs, () => pollAllHosts(ctx), onError);
  const stopProbing = every(config.holdProbeIntervalMs, () => resumeHeldRuns(ctx), onError);

  return {
    ctx,
    async stop() {
      await stopPolling();
      await stopProbing();
      await ctx.logFollowers.closeAll();
      await boss.stop({ graceful: true, wait: true, timeout: 10_000 });
      ssh.close();
      await ctx.stagingClaims.close();
      await ctx.logFollowClaims.close();
      ctx.mailer.close();
      await pool.end();
    },
  };
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const worker = await startWorker();
  let stopping = false;
  const shutdown = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    worker.ctx.log.info({ signal }, "worker stopping: finishing the steps in hand");
    await worker.stop();
    process.exit(0);
  };
  process.on("SIGINT", () => void shutdown("SIGINT"));
  process.on("SIGTERM", () => void shutdown("SIGTERM"));
}
