/**
 * A run's log as the worker stored it: chunks of the job's log file in sequence order, each with the
 * byte offset it starts at in that file.
 */
import { and, asc, eq, gt } from "drizzle-orm";
import type { Database, DbExecutor } from "../db/client";
import { runLogChunks } from "../db/schema";

export type StoredLogChunk = { seq: number; offsetBytes: number; content: Buffer; at: Date };

/**
 * Up to `limit` chunks of run `runId` with a sequence number above `afterSeq`, in sequence order.
 *
 * No access check: the caller has checked the reader's role. The run id is read as given; a run that
 * reused another run's results has no log of its own, so a caller that wants to show it passes the
 * original's id (`reusedFrom ?? id`).
 */
export async function readRunLogChunks(
  db: DbExecutor | Database,
  runId: string,
  afterSeq: number,
  limit: number,
): Promise<StoredLogChunk[]> {
  const rows = await db
    .select({
      seq: runLogChunks.seq,
      offsetBytes: runLogChunks.offsetBytes,
      text: runLogChunks.text,
      at: runLogChunks.at,
    })
    .from(runLogChunks)
    .where(and(eq(runLogChunks.runId, runId), gt(runLogChunks.seq, afterSeq)))
    .orderBy(asc(runLogChunks.seq))
    .limit(limit);
  return rows.map((row) => ({
    seq: row.seq,
    offsetBytes: row.offsetBytes,
    content: Buffer.from(row.text, "utf8"),
    at: row.at,
  }));
}
