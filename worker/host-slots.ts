/**
 * A host's `max_concurrent_runs`: a queued run starts staging only while fewer of the host's runs are
 * between staging and collecting. The check and the transition happen under a lock of the host row, so
 * the limit holds across worker processes; a run that finds no slot is marked waiting and the poller
 * hands waiting runs back to staging, oldest first, as slots free up.
 */
import { and, asc, count, eq, inArray, isNotNull, sql } from "drizzle-orm";
import { hosts, runs } from "../server/db/schema";
import { transitionRun } from "../server/execution/run-transitions";
import { RUN_STEP_QUEUES } from "../server/queue/queues";
import type { RunState } from "../shared/schemas/runs";
import type { WorkerContext } from "./context";
import type { RunRow } from "./run-runtime";

/** States that hold one of the host's slots. */
export const SLOT_STATES: RunState[] = ["staging", "submitted", "running", "collecting"];

const worker = { kind: "worker" } as const;

class NoFreeSlot extends Error {
  constructor(
    readonly hostName: string,
    readonly maxConcurrentRuns: number,
  ) {
    super(`${hostName} runs at most ${maxConcurrentRuns} at once`);
  }
}

/**
 * queued → staging when the host has a free slot. The transition is made first and the host row locked
 * last, so the lock (which serialises the count across workers) is held only for the count and the
 * commit; a count over the limit rolls the transition back. Returns false when the run is no longer
 * queued or must wait (then it is marked waiting, and keeps its place by the time it first waited).
 */
export async function takeHostSlot(ctx: WorkerContext, run: RunRow): Promise<boolean> {
  try {
    return await ctx.db.transaction(async (tx) => {
      const moved = await transitionRun(tx, run.id, ["queued"], "staging", {
        actor: worker,
        message: "Copying inputs to the host",
        set: { waitingForSlotSince: null },
      });
      if (!moved) return false;
      const [host] = await tx
        .select({ name: hosts.name, maxConcurrentRuns: hosts.maxConcurrentRuns })
        .from(hosts)
        .where(eq(hosts.id, run.hostId))
        .for("no key update");
      const [active] = await tx
        .select({ n: count() })
        .from(runs)
        .where(and(eq(runs.hostId, run.hostId), inArray(runs.state, SLOT_STATES)));
      // This run is already counted among the active ones.
      if (host && (active?.n ?? 0) > host.maxConcurrentRuns) {
        throw new NoFreeSlot(host.name, host.maxConcurrentRuns);
      }
      return true;
    });
  } catch (error) {
    if (!(error instanceof NoFreeSlot)) throw error;
    await ctx.db
      .update(runs)
      .set({
        waitingForSlotSince: sql`coalesce(${runs.waitingForSlotSince}, now())`,
        stateMessage: `Waiting for a free slot: ${error.message}`,
      })
      .where(and(eq(runs.id, run.id), eq(runs.state, "queued")));
    return false;
  }
}

/**
 * For every host with waiting runs, sends the stage step again for as many of its oldest waiting runs as
 * it has free slots. A duplicate item is harmless: the step re-reads the run and the slot is taken under
 * the host lock. Returns how many runs were handed back.
 */
export async function wakeWaitingRuns(ctx: WorkerContext): Promise<number> {
  const waitingHosts = await ctx.db
    .selectDistinct({ hostId: runs.hostId })
    .from(runs)
    .where(and(eq(runs.state, "queued"), isNotNull(runs.waitingForSlotSince)));
  let woken = 0;
  for (const { hostId } of waitingHosts) {
    const [host] = await ctx.db
      .select({ maxConcurrentRuns: hosts.maxConcurrentRuns })
      .from(hosts)
      .where(eq(hosts.id, hostId));
    const [active] = await ctx.db
      .select({ n: count() })
      .from(runs)
      .where(and(eq(runs.hostId, hostId), inArray(runs.state, SLOT_STATES)));
    const free = (host?.maxConcurrentRuns ?? 0) - (active?.n ?? 0);
    if (free <= 0) continue;
    const next = await ctx.db
      .select({ id: runs.id })
      .from(runs)
      .where(and(eq(runs.hostId, hostId), eq(runs.state, "queued"), isNotNull(runs.waitingForSlotSince)))
      .orderBy(asc(runs.waitingForSlotSince), asc(runs.createdAt))
      .limit(free);
    for (const { id } of next) await ctx.boss.send(RUN_STEP_QUEUES.stage, { runId: id });
    woken += next.length;
  }
  return woken;
}
