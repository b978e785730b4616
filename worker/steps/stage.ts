/**
 * `stage` then `submit`: copy the run's planned files into a fresh run folder on the host (sha256 checked
 * there), then hand the batch script to the scheduler. Both are safe to repeat: staging rewrites the
 * same files; submission is serialised per run by a row lock and finds an existing scheduler job
 * by the run's token, so a restarted worker never submits twice.
 */
import { dirname } from "node:path/posix";
import { eq } from "drizzle-orm";
import { runs } from "../../server/db/schema";
import { transitionRun } from "../../server/execution/run-transitions";
import type { WorkerContext } from "../context";
import { guardStep } from "../failures";
import { takeHostSlot } from "../host-slots";
import { loadRun, type RunRuntime, runtimeFor } from "../run-runtime";
import { prepareRunDir, stageFiles } from "../ssh/remote-fs";

const worker = { kind: "worker" } as const;

export async function stageRun(ctx: WorkerContext, runId: string): Promise<void> {
  // A duplicate item that finds the run being staged leaves it to that attempt, which submits it (or
  // fails and is retried by the queue); the run is read only once the claim is held, so a later
  // duplicate sees the files already staged.
  if (!(await ctx.stagingClaims.tryClaim(runId))) return;
  try {
    await stageClaimedRun(ctx, runId);
  } finally {
    await ctx.stagingClaims.release(runId);
  }
}

async function stageClaimedRun(ctx: WorkerContext, runId: string): Promise<void> {
  const run = await loadRun(ctx, runId);
  if (!run || (run.state !== "queued" && run.state !== "staging")) return;
  const rt = await runtimeFor(ctx, run).catch(() => null);
  await guardStep(ctx, run, rt?.host ?? null, "stage", async () => {
    const runtime = rt ?? (await runtimeFor(ctx, run));
    const { session, plan } = runtime;
    if (run.state === "queued" && !(await takeHostSlot(ctx, run))) return;
    if (!run.stagedFiles) {
      const runDir = await prepareRunDir(session, dirname(run.remoteDir), run.remoteDir.split("/").at(-1)!);
      const staged = await stageFiles(
        session,
        runDir,
        plan.files.map((file) => ({
          relativePath: file.relativePath,
          content: Buffer.from(file.contentBase64, "base64"),
        })),
      );
      for (const file of staged) {
        const expected = plan.files.find((f) => f.relativePath === file.relativePath);
        if (expected && expected.sha256 !== file.sha256) {
          throw new Error(`staged ${file.relativePath} does not match its sha256 on the host`);
        }
      }
      await ctx.db
        .update(runs)
        .set({ stagedFiles: staged, updatedAt: new Date() })
        .where(eq(runs.id, run.id));
    }
    await submitRun(ctx, run.id, runtime);
  });
}

/**
 * Everything the submission needs from the database is read before its transaction opens (`runtime`):
 * a transaction that waited for a second pooled connection while holding one would, with enough
 * submissions at once, hold every connection of the pool and wait forever.
 */
export async function submitRun(ctx: WorkerContext, runId: string, runtime: RunRuntime): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    // The row lock makes submission one-at-a-time per run across worker processes, and makes a
    // concurrent cancel wait until the scheduler job id is recorded.
    const [run] = await tx.select().from(runs).where(eq(runs.id, runId)).for("update");
    if (run?.state !== "staging") return;
    const { session, scheduler, job, plan } = runtime;
    const submitted = await scheduler.submit(session, {
      ...job,
      cores: run.cores,
      wallTimeMinutes: run.wallTimeMinutes,
      wallTimeGraceSeconds: ctx.config.wallTimeGraceSeconds,
      scriptName: plan.scriptName,
    });
    const moved = await transitionRun(tx, run.id, ["staging"], "submitted", {
      actor: worker,
      message: submitted.alreadySubmitted
        ? `Found the scheduler job ${submitted.jobId} submitted earlier`
        : `Submitted to the scheduler as job ${submitted.jobId}`,
      set: { schedulerJobId: submitted.jobId },
    });
    if (!moved) await scheduler.cancel(session, { ...job, jobId: submitted.jobId });
  });
}
