/**
 * A run's log as the worker stored it: chunks of the job's log file in sequence order, each with the
 * byte offset it starts at in that file and the file's bytes exactly as the host held them. Read page by
 * page (JSON, base64) or whole as a download streamed from the database.
 */
import { and, asc, between, eq, gt, sql } from "drizzle-orm";
import { FINAL_RUN_STATES, type RunLog } from "../../shared/schemas/runs";
import type { Principal } from "../auth/principal";
import type { Database, DbExecutor } from "../db/client";
import { runLogChunks } from "../db/schema";
import { visibleRun } from "./run-reads.service";

export type StoredLogChunk = { seq: number; offsetBytes: number; content: Buffer; at: Date };

/**
 * A page of the log stops early once it holds this many bytes (always at least one chunk), so a page of
 * the largest chunks never holds hundreds of megabytes in the server or the browser.
 */
export const RUN_LOG_PAGE_MAX_BYTES = 8 * 1024 * 1024;
/** Chunks read per database round trip when the whole log is streamed (a chunk is at most 256 KiB). */
const RAW_LOG_CHUNKS_PER_READ = 16;

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
  return db
    .select({
      seq: runLogChunks.seq,
      offsetBytes: runLogChunks.offsetBytes,
      content: runLogChunks.content,
      at: runLogChunks.at,
    })
    .from(runLogChunks)
    .where(and(eq(runLogChunks.runId, runId), gt(runLogChunks.seq, afterSeq)))
    .orderBy(asc(runLogChunks.seq))
    .limit(limit);
}

/**
 * The chunks of one page: at most `limit`, stopping once `maxBytes` are reached (at least one chunk),
 * and whether more chunks follow. Sizes are read first (`octet_length` of a bytea needs no detoasting),
 * then only the chosen chunks' bytes.
 */
export async function readRunLogPage(
  db: DbExecutor | Database,
  runId: string,
  afterSeq: number,
  limit: number,
  maxBytes: number,
): Promise<{ chunks: StoredLogChunk[]; more: boolean }> {
  const sizes = await db
    .select({ seq: runLogChunks.seq, sizeBytes: sql<number>`octet_length(${runLogChunks.content})` })
    .from(runLogChunks)
    .where(and(eq(runLogChunks.runId, runId), gt(runLogChunks.seq, afterSeq)))
    .orderBy(asc(runLogChunks.seq))
    .limit(limit + 1);
  const first = sizes[0];
  if (!first) return { chunks: [], more: false };
  let count = 0;
  let bytes = 0;
  while (count < Math.min(limit, sizes.length)) {
    const size = Number(sizes[count]!.sizeBytes);
    if (count > 0 && bytes + size > maxBytes) break;
    bytes += size;
    count += 1;
  }
  const last = sizes[count - 1]!;
  const chunks = await db
    .select({
      seq: runLogChunks.seq,
      offsetBytes: runLogChunks.offsetBytes,
      content: runLogChunks.content,
      at: runLogChunks.at,
    })
    .from(runLogChunks)
    .where(and(eq(runLogChunks.runId, runId), between(runLogChunks.seq, first.seq, last.seq)))
    .orderBy(asc(runLogChunks.seq));
  return { chunks, more: sizes.length > count };
}

/**
 * A page of a run's log after `afterSeq`, for a reader who may see the run (collaborator or above). A run
 * that reused results has no log of its own: it serves the log of the run that produced them. `done`
 * is decided from the run's state read before the chunks, so a page never claims the end before the
 * last chunk was stored.
 */
export async function readRunLog(
  db: Database,
  principal: Principal,
  runId: string,
  query: { afterSeq: number; limit: number },
): Promise<RunLog> {
  const run = await visibleRun(db, principal, runId, "collaborator");
  const final = FINAL_RUN_STATES.includes(run.state);
  const page = await readRunLogPage(
    db,
    run.reusedFrom ?? run.id,
    query.afterSeq,
    query.limit,
    RUN_LOG_PAGE_MAX_BYTES,
  );
  return {
    chunks: page.chunks.map((chunk) => ({
      seq: chunk.seq,
      offsetBytes: chunk.offsetBytes,
      dataBase64: chunk.content.toString("base64"),
      at: chunk.at.toISOString(),
    })),
    lastSeq: page.chunks.at(-1)?.seq ?? query.afterSeq,
    done: final && !page.more,
  };
}

/**
 * The whole log of a run for a reader who may see the run: a file name for the download, its length, and
 * the bytes as an async sequence read from the database a few chunks at a time, so a large log is never
 * held whole in memory. The download is the log as stored when it was asked for: chunks a running job
 * adds meanwhile are not part of it, so the length announced holds. Access is checked first.
 */
export async function openRunLogDownload(
  db: Database,
  principal: Principal,
  runId: string,
): Promise<{ fileName: string; sizeBytes: number; content: AsyncIterable<Buffer> }> {
  const run = await visibleRun(db, principal, runId, "collaborator");
  const logRunId = run.reusedFrom ?? run.id;
  const [extent] = await db
    .select({
      lastSeq: sql<number | null>`max(${runLogChunks.seq})`,
      sizeBytes: sql<string | null>`sum(octet_length(${runLogChunks.content}))`,
    })
    .from(runLogChunks)
    .where(eq(runLogChunks.runId, logRunId));
  const lastSeq = extent?.lastSeq ?? 0;
  async function* content(): AsyncGenerator<Buffer> {
    let afterSeq = 0;
    while (afterSeq < lastSeq) {
      const chunks = await readRunLogChunks(db, logRunId, afterSeq, RAW_LOG_CHUNKS_PER_READ);
      for (const chunk of chunks) {
        if (chunk.seq > lastSeq) return;
        yield chunk.content;
      }
      if (chunks.length < RAW_LOG_CHUNKS_PER_READ) return;
      afterSeq = chunks.at(-1)!.seq;
    }
  }
  return { fileName: `run-${run.id}.log`, sizeBytes: Number(extent?.sizeBytes ?? 0), content: content() };
}
