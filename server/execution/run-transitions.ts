/**
 * The one way a run changes state: a conditional UPDATE (`where state in (...)`) plus a run_events row
 * and a NOTIFY, in the caller's transaction. A step whose expected state is gone (cancelled meanwhile,
 * or already done by a previous attempt) gets `false` and must not act.
 */
import { and, eq, inArray, sql } from "drizzle-orm";
import type { RunState } from "../../shared/schemas/execution/runs";
import type { DbExecutor } from "../db/client";
import { runEvents, runs } from "../db/schema";

export type Actor = { kind: "user"; userId: string } | { kind: "worker" } | { kind: "system" };

type RunUpdate = Partial<typeof runs.$inferInsert>;

export const RUN_NOTIFY_CHANNEL = "sigmaflow_run_events";

export async function transitionRun(
  db: DbExecutor,
  runId: string,
  from: readonly RunState[],
  to: RunState,
  options: { actor: Actor; message?: string | null; set?: RunUpdate },
): Promise<boolean> {
  const [previous] = await db
    .select({ state: runs.state })
    .from(runs)
    .where(and(eq(runs.id, runId), inArray(runs.state, [...from])))
    .for("update");
  if (!previous) return false;
  await db
    .update(runs)
    .set({ ...options.set, state: to, stateMessage: options.message ?? null, updatedAt: new Date() })
    .where(eq(runs.id, runId));
  await db.insert(runEvents).values({
    runId,
    fromState: previous.state,
    toState: to,
    actor: options.actor.kind,
    actorUserId: options.actor.kind === "user" ? options.actor.userId : null,
    message: options.message ?? null,
  });
  await notifyRun(db, runId, { type: "state", state: to });
  return true;
}

/** Tells listening servers that something about the run changed (delivered at commit). */
export async function notifyRun(
  db: DbExecutor,
  runId: string,
  payload: Record<string, unknown>,
): Promise<void> {
  await db.execute(sql`select pg_notify(${RUN_NOTIFY_CHANNEL}, ${JSON.stringify({ runId, ...payload })})`);
}
