/**
 * Changing a run that exists: cancelling it (at once before it reaches the scheduler, through the
 * scheduler afterwards) and resubmitting it as a new run from its stored spec.
 */
import { eq } from "drizzle-orm";
import {
  FINAL_RUN_STATES,
  type ResubmitRunRequest,
  type RunState,
  type RunSummary,
  runSpecSchema,
} from "../../shared/schemas/runs";
import { recordAudit } from "../audit/record-audit";
import type { Principal } from "../auth/principal";
import { withClientTransaction } from "../db/client-transaction";
import { ledgerEntries, runs } from "../db/schema";
import { applySpecChanges } from "../execution/run-spec";
import { transitionRun } from "../execution/run-transitions";
import { conflict, forbidden } from "../http/errors";
import { RUN_STEP_QUEUES } from "../queue/queues";
import { requireGroupRole } from "./access";
import { createRun, type RunDeps } from "./run-create.service";
import { getRunSummary, visibleRun } from "./run-reads.service";

/** States in which no scheduler job can exist yet (a held run counts by the state it was held in). */
const BEFORE_SCHEDULER: RunState[] = ["queued", "staging"];

/**
 * Cancels a run. Before it reaches the scheduler it is cancelled at once and its reservation released;
 * afterwards the scheduler is asked to cancel and the run becomes `cancelled` when the scheduler confirms.
 */
export async function cancelRun(
  deps: RunDeps,
  principal: Principal,
  runId: string,
  ip: string | null,
): Promise<RunSummary> {
  const { db } = deps;
  const run = await visibleRun(db, principal, runId, "member");
  const role = await requireGroupRole(db, principal, run.groupId, "member");
  if (run.submittedBy !== principal.userId && role !== "admin" && !principal.isSiteAdmin) {
    throw forbidden("Only the person who submitted the run, or a group admin, can cancel it.");
  }
  if ((FINAL_RUN_STATES as RunState[]).includes(run.state))
    throw conflict(`The run is already ${run.state}.`);
  await withClientTransaction(deps.pool, async ({ db: tx, executeSql }) => {
    const actor = { kind: "user" as const, userId: principal.userId };
    const beforeScheduler =
      BEFORE_SCHEDULER.includes(run.state) ||
      (run.state === "held" && BEFORE_SCHEDULER.includes(run.heldFromState ?? "queued"));
    const stopped =
      beforeScheduler &&
      (await transitionRun(tx, runId, [run.state], "cancelled", {
        actor,
        message: "Cancelled before it reached the scheduler",
        set: {
          cancelRequestedAt: new Date(),
          cancelRequestedBy: principal.userId,
          finishedAt: new Date(),
          chargedCoreSeconds: 0,
          waitingForSlotSince: null,
        },
      }));
    if (stopped) {
      await tx.insert(ledgerEntries).values({
        allocationId: run.allocationId,
        runId,
        kind: "release",
        coreSeconds: run.reservedCoreSeconds,
        note: "cancelled before start",
      });
    } else {
      await tx
        .update(runs)
        .set({ cancelRequestedAt: new Date(), cancelRequestedBy: principal.userId, updatedAt: new Date() })
        .where(eq(runs.id, runId));
      await deps.boss.send(RUN_STEP_QUEUES.cancel, { runId }, { db: { executeSql: executeSql as never } });
    }
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId: run.groupId,
      action: "run.cancel",
      targetType: "run",
      targetId: runId,
      ip,
    });
  });
  return (await getRunSummary(db, runId))!;
}

/** A new run from the original's spec exactly as stored, with only what `changes` names changed. */
export async function resubmitRun(
  deps: RunDeps,
  principal: Principal,
  runId: string,
  request: ResubmitRunRequest,
  ip: string | null,
): Promise<RunSummary> {
  const original = await visibleRun(deps.db, principal, runId, "member");
  const spec = applySpecChanges(runSpecSchema.parse(original.spec), request.changes);
  return createRun(
    deps,
    principal,
    original.groupId,
    { spec, onDuplicate: request.onDuplicate },
    { resubmittedFrom: runId, ip },
  );
}
