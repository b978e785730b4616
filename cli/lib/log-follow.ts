/**
 * Following a run's log to the end: every stored chunk from the start, then new ones as the worker stores
 * them, each written exactly once and in sequence order, until the run reaches a final state.
 *
 * Two ways to follow, one writer: the live feed over socket.io (shared/schemas/live.ts) when the server
 * offers it, and otherwise `GET /api/runs/:id/log?afterSeq=` once a second. Both hand chunks to a
 * {@link ChunkWriter} that remembers the last sequence number written and drops anything at or below it,
 * so a reconnect (which joins again from that number), a switch from the feed to HTTP, or an HTTP page
 * overlapping a live chunk never doubles a byte; a gap in the feed's numbers is filled from the stored log
 * before the later chunk is written, so none is skipped.
 */
import {
  FINAL_RUN_STATES,
  RUN_LOG_PAGE_DEFAULT,
  type RunState,
  runDetailSchema,
  runLogSchema,
} from "../../shared/schemas/runs";
import type { ApiClient } from "./api-client";

/** Chunks asked for per HTTP page: the server's default page. */
export const LOG_PAGE_LIMIT = RUN_LOG_PAGE_DEFAULT;
/** Pages read one after another before the follower yields to other work (a log of 10⁶ chunks is 2000). */
const MAX_PAGES_PER_DRAIN = 100_000;

export type LogChunk = { seq: number; data: Buffer };

/** Writes chunks in sequence order, each once: anything at or below the last written seq is dropped. */
export class ChunkWriter {
  private last = 0;
  constructor(private readonly out: (data: Buffer) => Promise<void>) {}

  /** The sequence number of the last chunk written (0 before the first). */
  get lastSeq(): number {
    return this.last;
  }

  /** Writes the chunk unless it was written already; resolves once the bytes are handed to `out`. */
  async accept(chunk: LogChunk): Promise<boolean> {
    if (chunk.seq <= this.last) return false;
    await this.out(chunk.data);
    this.last = chunk.seq;
    return true;
  }
}

/** Runs async tasks one at a time in the order they were queued (socket events arrive concurrently). */
export class SerialQueue {
  private tail: Promise<unknown> = Promise.resolve();
  run<T>(task: () => Promise<T>): Promise<T> {
    const next = this.tail.then(task);
    this.tail = next.catch(() => undefined);
    return next;
  }
}

export function isFinalState(state: RunState): boolean {
  return FINAL_RUN_STATES.includes(state);
}

/**
 * Writes every stored chunk after the writer's last seq, page by page, up to `untilSeq` when given.
 *
 * @returns whether the server says the log is complete (the run is final and nothing follows)
 */
export async function drainStoredLog(
  client: ApiClient,
  runId: string,
  writer: ChunkWriter,
  untilSeq = Number.POSITIVE_INFINITY,
): Promise<{ done: boolean }> {
  for (let page = 0; page < MAX_PAGES_PER_DRAIN; page++) {
    const afterSeq = writer.lastSeq;
    const log = await client.request(
      "GET",
      `/api/runs/${runId}/log?afterSeq=${afterSeq}&limit=${LOG_PAGE_LIMIT}`,
      runLogSchema,
    );
    let wrote = false;
    for (const chunk of log.chunks) {
      if (chunk.seq > untilSeq) return { done: false };
      if (await writer.accept({ seq: chunk.seq, data: Buffer.from(chunk.dataBase64, "base64") }))
        wrote = true;
    }
    // A page that brought chunks may have more behind it (the server also ends a page at a size limit,
    // so a short page is no sign of the end): ask again at once until a page is empty or says `done`.
    const more = log.chunks.length > 0 && !log.done;
    // A page that moved nothing forward would repeat forever: stop and let the caller poll again.
    if (!wrote || !more || writer.lastSeq >= untilSeq) return { done: log.done && !more };
  }
  return { done: false };
}

/** The run's current state, read from `GET /api/runs/:id`. */
export async function readRunState(client: ApiClient, runId: string): Promise<RunState> {
  return (await client.request("GET", `/api/runs/${runId}`, runDetailSchema)).state;
}

export function sleep(ms: number, signal?: AbortSignal): Promise<void> {
  return new Promise((resolve) => {
    if (signal?.aborted) return resolve();
    const timer = setTimeout(done, ms);
    function done() {
      clearTimeout(timer);
      signal?.removeEventListener("abort", done);
      resolve();
    }
    signal?.addEventListener("abort", done, { once: true });
  });
}

/**
 * Follows the log over HTTP: drains what is stored, waits `pollIntervalMs`, and again, until the server
 * says the log is complete; then reads the run's final state.
 *
 * @returns the final state, or null when `signal` aborted the following
 */
export async function followOverHttp(
  client: ApiClient,
  runId: string,
  writer: ChunkWriter,
  options: { pollIntervalMs: number; signal?: AbortSignal },
): Promise<RunState | null> {
  while (!options.signal?.aborted) {
    const { done } = await drainStoredLog(client, runId, writer);
    if (done) {
      const state = await readRunState(client, runId);
      if (isFinalState(state)) return state;
    }
    await sleep(options.pollIntervalMs, options.signal);
  }
  return null;
}
