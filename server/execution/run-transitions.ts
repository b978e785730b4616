/**
 * The one way a run changes state: a conditional UPDATE (`where state in (...)`) plus a run_events row,
 * in the caller's transaction; the row's trigger notifies listeners on RUN_NOTIFY_CHANNEL at commit
 * (drizzle/0004). A step whose expected state is gone (cancelled meanwhile, or already done by a
 * previous attempt) gets `false` and must not act.
 *
 * A run becomes `cancelled` because a person asked: that event is recorded as theirs (runs.cancel_requested_by)
 * even when the worker is the one that sees the scheduler confirm it.
 */
import { and, eq, inArray } from "drizzle-orm";
import type { RunState } from "../../shared/schemas/runs";
import type { DbExecutor } from "../db/client";
import { runEvents, runs } from "../db/schema";

export type Actor = { kind: "user"; userId: string } | { kind: "worker" } | { kind: "system" };

type RunUpdate = Partial<typeof runs.$inferInsert>;

/** Raised by the triggers on run_events and run_log_chunks; see drizzle/0004_run_notifications.sql. */
export const RUN_NOTIFY_CHANNEL = "sigmaflow_run_events";

export async function transitionRun(
  db: DbExecutor,
  runId: string,
  from: readonly RunState[],
  to: RunState,
  options: { actor: Actor; message?: string | null; set?: RunUpdate },
): Promise<boolean> {
  const previous = from.length === 1 ? from[0]! : await lockedStateAmong(db, runId, from);
  if (!previous) return false;
  // The conditional update takes the row lock itself; with one possible source state it also tells
  // which state the run left, so no separate read is needed.
  const moved = await db
    .update(runs)
    .set({ ...options.set, state: to, stateMessage: options.message ?? null, updatedAt: new Date() })
    .where(and(eq(runs.id, runId), eq(runs.state, previous)))
    .returning({ cancelRequestedBy: runs.cancelRequestedBy });
  const [row] = moved;
  if (!row) return false;
  const actor: Actor =
    to === "cancelled" && options.actor.kind !== "user" && row.cancelRequestedBy
      ? { kind: "user", userId: row.cancelRequestedBy }
      : options.actor;
  await db.insert(runEvents).values({
    runId,
    fromState: previous,
    toState: to,
    actor: actor.kind,
    actorUserId: actor.kind === "user" ? actor.userId : null,
    message: options.message ?? null,
  });
  return true;
}

/** With several possible source states: the current one, row-locked, or null when it is none of them. */
async function lockedStateAmong(db: DbExecutor, runId: string, from: readonly RunState[]) {
  const [row] = await db
    .select({ state: runs.state })
    .from(runs)
    .where(and(eq(runs.id, runId), inArray(runs.state, [...from])))
    .for("update");
  return row?.state ?? null;
}
