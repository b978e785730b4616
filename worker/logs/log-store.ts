/**
 * Appends one chunk of a run's log: the bytes exactly as read, the run's offset, sequence number and
 * progress moved on, and the timings the output rules found, in one transaction. The update is
 * conditional on the offset the chunk starts at, so two readers of the same log (the poller and a
 * streaming follower, or two workers) never store a byte twice: the second one finds the offset moved
 * and stores nothing.
 */
import { and, eq } from "drizzle-orm";
import { runLogChunks, runs, runTimings } from "../../server/db/schema";
import type { RunStageProgress } from "../../shared/schemas/runs";
import type { WorkerContext } from "../context";
import { type CompiledStage, parseLogLines } from "./output-rules";
import { advanceProgress } from "./progress";
import { decodeLogText } from "./tail";

/** Where a run's stored log ends: the next chunk starts at `offsetBytes` and gets number `seq + 1`. */
export type LogPosition = { offsetBytes: number; seq: number; progress: RunStageProgress | null };

/**
 * Parses `bytes` (whole lines, or a cut at a character's end) with the run's output rules and stores
 * them after `at`. Returns the position after the chunk, or null when the stored log had already moved
 * past `at` (someone else stored these bytes).
 */
export async function appendLogChunk(
  ctx: WorkerContext,
  runId: string,
  rules: Map<string, CompiledStage>,
  at: LogPosition,
  bytes: Buffer,
): Promise<LogPosition | null> {
  // Bytes that are not UTF-8 read as U+FFFD in this copy only; the bytes themselves are stored.
  const parsed = parseLogLines(decodeLogText(bytes), rules, at.progress?.stage ?? null);
  // Lines the output rules skipped (too long, over the time budget, a rule that no longer compiles):
  // the log itself is stored whole, so only timings and progress from those lines are missing.
  if (parsed.notes.length > 0) ctx.log.warn({ runId, notes: parsed.notes }, "output rules skipped lines");
  const next: LogPosition = {
    offsetBytes: at.offsetBytes + bytes.length,
    seq: at.seq + 1,
    progress: advanceProgress(at.progress, parsed),
  };
  const stored = await ctx.db.transaction(async (tx) => {
    const advanced = await tx
      .update(runs)
      .set({
        logOffsetBytes: next.offsetBytes,
        logSeq: next.seq,
        progress: next.progress,
        updatedAt: new Date(),
      })
      .where(and(eq(runs.id, runId), eq(runs.logOffsetBytes, at.offsetBytes)))
      .returning({ id: runs.id });
    if (advanced.length === 0) return false;
    await tx
      .insert(runLogChunks)
      .values({ runId, seq: next.seq, offsetBytes: at.offsetBytes, content: bytes });
    for (const timing of parsed.timings) {
      await tx
        .insert(runTimings)
        .values({ runId, ...timing })
        .onConflictDoUpdate({
          target: [runTimings.runId, runTimings.stage, runTimings.symmetry],
          set: { elapsedMs: timing.elapsedMs },
        });
    }
    return true;
  });
  return stored ? next : null;
}
