/**
 * pg-boss queues of the execution engine. A queue item only says "do step S for run R"; the run row is
 * the authority, and every step re-reads it. Retries here cover crashes of the worker process itself
 * (the item expires and runs again); transport trouble is retried by the steps with their own backoff so
 * that a run can end up `held` with a reason a person can read.
 */
import PgBoss from "pg-boss";
import { z } from "zod";

export const RUN_STEP_QUEUES = {
  stage: "run-stage",
  collect: "run-collect",
  cancel: "run-cancel",
  /** Turns a done run's collected files into results (worker/steps/postprocess.ts). */
  postprocess: "run-postprocess",
} as const;
export type RunStepName = keyof typeof RUN_STEP_QUEUES;

export const runStepPayloadSchema = z.strictObject({ runId: z.uuid() });
export type RunStepPayload = z.infer<typeof runStepPayloadSchema>;

/** Long enough for a large staging over a slow link; an expired item is retried by pg-boss. */
const STEP_EXPIRE_SECONDS = 15 * 60;

export function createBoss(connectionString: string, options: { maintenance?: boolean } = {}) {
  return new PgBoss({
    connectionString,
    schema: "pgboss",
    max: 5,
    supervise: options.maintenance ?? true,
    schedule: false,
    application_name: "sigmaflow",
  });
}

export async function createRunQueues(boss: PgBoss): Promise<void> {
  for (const name of Object.values(RUN_STEP_QUEUES)) {
    await boss.createQueue(name, {
      name,
      retryLimit: 5,
      retryDelay: 2,
      retryBackoff: true,
      expireInSeconds: STEP_EXPIRE_SECONDS,
      retentionMinutes: 60,
    });
  }
}
