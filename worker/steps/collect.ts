/**
 * `collect`: fetch each stage's declared result files into run_artefacts (sha256 recorded), read the
 * scheduler's accounting, charge the ledger the actual core-hours and release the reservation, and
 * settle the run as done, failed or cancelled — all of it once, in one transaction. A done run's results
 * are `pending` from then on, and its postprocess item is sent in the same transaction.
 */
import { createHash } from "node:crypto";
import { and, eq } from "drizzle-orm";
import { withClientTransaction } from "../../server/db/client-transaction";
import { ledgerEntries, runArtifacts, runs, users } from "../../server/db/schema";
import { transitionRun } from "../../server/execution/run-transitions";
import { RUN_STEP_QUEUES } from "../../server/queue/queues";
import { coreHoursFromSeconds } from "../../shared/core-hours";
import { escapeHtml } from "../../shared/html";
import type { RunState } from "../../shared/schemas/runs";
import type { WorkerContext } from "../context";
import { guardStep } from "../failures";
import { loadRun, runtimeFor } from "../run-runtime";
import { RemoteFileError } from "../ssh/errors";

const worker = { kind: "worker" } as const;

export async function collectRun(ctx: WorkerContext, runId: string): Promise<void> {
  const run = await loadRun(ctx, runId);
  if (run?.state !== "collecting") return;
  const rt = await runtimeFor(ctx, run).catch(() => null);
  await guardStep(ctx, run, rt?.host ?? null, "collect", async () => {
    const { session, scheduler, job, plan } = rt ?? (await runtimeFor(ctx, run));
    const collected: { stage: string; name: string; content: Buffer }[] = [];
    const missing: string[] = [];
    for (const stage of plan.stages) {
      for (const name of stage.outputFiles) {
        try {
          const content = await session.readFile(
            `${run.remoteDir}/${stage.dir}/${name}`,
            ctx.config.maxArtifactBytes,
          );
          collected.push({ stage: stage.name, name, content });
        } catch (error) {
          if (error instanceof RemoteFileError) missing.push(`${stage.name}/${name} (${error.message})`);
          else throw error;
        }
      }
    }
    const usage = await scheduler.accounting(session, job, run.cores);
    const charge = chargeFor(run, usage?.coreSeconds ?? fallbackCoreSeconds(run));
    const timedOut = usage?.timedOut === true;
    const finalState: RunState = run.cancelRequestedAt
      ? "cancelled"
      : run.exitCode === 0 && missing.length === 0 && !timedOut
        ? "done"
        : "failed";
    const outcome =
      finalState === "done"
        ? `Finished; ${collected.length} result file(s) collected`
        : finalState === "cancelled"
          ? "Cancelled; the scheduler confirmed the job ended"
          : timedOut
            ? wallTimeLimitMessage(run.wallTimeMinutes)
            : run.exitCode === null
              ? "The scheduler reports the job failed; see the log"
              : run.exitCode !== 0
                ? `The scheduler's job ended with exit code ${run.exitCode}; see the log`
                : `Declared results missing: ${missing.join(", ")}`;
    const message = charge.overCoreSeconds > 0 ? `${outcome}. ${charge.notice}` : outcome;
    const chargedCoreSeconds = charge.chargedCoreSeconds;
    const source = usage ? "scheduler accounting" : "measured by Sigmaflow";
    // On the transaction's own connection, so the postprocess item commits (or not) with the settlement.
    const settled = await withClientTransaction(ctx.pool, async ({ db: tx, executeSql }) => {
      for (const file of collected) {
        await tx
          .insert(runArtifacts)
          .values({
            runId: run.id,
            stage: file.stage,
            name: file.name,
            sizeBytes: file.content.length,
            sha256: createHash("sha256").update(file.content).digest("hex"),
            content: file.content,
          })
          .onConflictDoNothing();
      }
      const moved = await transitionRun(tx, run.id, ["collecting"], finalState, {
        actor: worker,
        message,
        set: {
          chargedCoreSeconds,
          finishedAt: new Date(),
          // A done run's collected files go on to the postprocess step, which settles its results.
          resultsState: finalState === "done" ? "pending" : null,
        },
      });
      if (!moved) return false;
      await tx.insert(ledgerEntries).values([
        {
          allocationId: run.allocationId,
          runId: run.id,
          kind: "charge",
          coreSeconds: chargedCoreSeconds,
          note: charge.overCoreSeconds > 0 ? `${source}; ${charge.notice}` : source,
        },
        {
          allocationId: run.allocationId,
          runId: run.id,
          kind: "release",
          coreSeconds: run.reservedCoreSeconds,
          note: "reservation released",
        },
      ]);
      if (finalState === "done") {
        await ctx.boss.send(
          RUN_STEP_QUEUES.postprocess,
          { runId: run.id },
          { db: { executeSql: executeSql as never } },
        );
      }
      return true;
    });
    if (settled && run.notifyByEmail) await mailSubmitter(ctx, run.id, finalState, message);
  });
}

/** The reason a run stopped at its limit carries; the same words whichever scheduler stopped it. */
export function wallTimeLimitMessage(wallTimeMinutes: number): string {
  return `Stopped at its wall-time limit of ${wallTimeMinutes} min`;
}

/** Core-hours in a sentence: three decimals. */
const coreHours = (coreSeconds: number) => coreHoursFromSeconds(coreSeconds).toFixed(3);

/**
 * What a run is charged. The reservation is the run's worst case (cores × wall-time limit), the amount
 * the allocation's balance was checked against at creation, so the charge is capped there: a job that
 * ran past its limit (the grace period before KILL, a scheduler's late kill) never spends more than
 * was set aside for it. What was used beyond the reservation is stated in `notice`, which goes into
 * the ledger entry and the run's history.
 */
export function chargeFor(
  run: Pick<typeof runs.$inferSelect, "reservedCoreSeconds">,
  measuredCoreSeconds: number,
): { chargedCoreSeconds: number; overCoreSeconds: number; notice: string } {
  const usedCoreSeconds = Math.max(0, Math.round(measuredCoreSeconds));
  const chargedCoreSeconds = Math.min(usedCoreSeconds, run.reservedCoreSeconds);
  const overCoreSeconds = usedCoreSeconds - chargedCoreSeconds;
  return {
    chargedCoreSeconds,
    overCoreSeconds,
    notice:
      overCoreSeconds > 0
        ? `It used ${coreHours(usedCoreSeconds)} core-hours, ${coreHours(overCoreSeconds)} over its reservation of ${coreHours(run.reservedCoreSeconds)}; it was charged the reservation`
        : "",
  };
}

/** Without scheduler accounting: cores × the wall time Sigmaflow saw between start and collection. */
function fallbackCoreSeconds(run: typeof runs.$inferSelect): number {
  const started = run.startedAt ?? run.createdAt;
  return run.cores * Math.max(0, (Date.now() - started.getTime()) / 1000);
}

async function mailSubmitter(
  ctx: WorkerContext,
  runId: string,
  state: RunState,
  message: string,
): Promise<void> {
  const [row] = await ctx.db
    .select({ email: users.email, name: runs.name })
    .from(runs)
    .innerJoin(users, and(eq(users.id, runs.submittedBy)))
    .where(eq(runs.id, runId));
  if (!row) return;
  const link = `${ctx.config.publicUrl}/runs/${runId}`;
  await ctx.mailer
    .send({
      to: row.email,
      subject: `Sigmaflow: run "${row.name}" ${state}`,
      text: `${message}.\n\n${link}\n\nComputed data are model results: validate them before use in design work.`,
      // The message can quote the scheduler or the host (an exit reason, a path): text, never markup.
      html: `<p>${escapeHtml(message)}.</p><p><a href="${escapeHtml(link)}">Open the run</a></p>`,
    })
    .catch((error: unknown) => ctx.log.warn({ err: error, runId }, "could not mail run notice"));
}
