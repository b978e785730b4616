/**
 * One socket's feed of one run's log: every stored chunk after the sequence number the client holds, in
 * order, each once, first the replay and then live ones as notices wake the feed.
 *
 * Invariants: at most one read of the stored log is in flight per feed; a wake-up during a read makes the
 * feed read again after it (from the last sequence number sent, so nothing is sent twice and nothing that
 * was stored meanwhile is missed). Chunks always come from the database, never from a notice's payload.
 * A read that fails (the database busy or away) is tried again after a pause, so the last chunks of a run
 * that ended reach the client without another notice.
 *
 * Shared reads: the feeds of one process that follow the same run usually stand at the same sequence
 * number when a notice wakes them, so a page asked for while the same page is being read joins that read
 * (SharedLogReads): one query and one copy of the bytes for all of a run's watchers instead of one each.
 * A notice makes the run's reads in flight private to those already waiting, so a feed woken by it always
 * reads anew and sees the chunk it announced.
 *
 * Flow control: the bytes a socket was sent but has not acknowledged (the client calls the ack callback of
 * `run:log`) count against its send budget. Past the budget a feed stops and emits `run:paused`; the client
 * goes on with `run:resume` from the last sequence number it holds, which also settles the feed's
 * unacknowledged chunks (the client holds them or asks for them again). A client that never acknowledges
 * thus pauses once per budget's worth of log and resumes, and the server never holds more than about one
 * budget of a socket's log in its buffers.
 */
import type { Socket } from "socket.io";
import { LIVE_EVENTS, type LiveLogChunk } from "../../shared/schemas/live";
import type { Database } from "../db/client";
import type { Logger } from "../logger";
import { readRunLogPage } from "../services/run-log.service";

/**
 * A page read while catching up: the chunks that fit in 4 MiB (at least one; a chunk holds at most
 * 256 KiB, the worker's read per poll), at most 1 024 of them. Streamed logs are stored in many small
 * chunks, so a page by bytes takes a late joiner through a long log in few queries.
 */
const PAGE_MAX_CHUNKS = 1024;
const PAGE_MAX_BYTES = 4 * 1024 * 1024;
/** After this long without an acknowledgement socket.io forgets the callback; the bytes stay counted. */
const ACK_TIMEOUT_MS = 120_000;
/** Pause before a failed read of the stored log is tried again. */
export const READ_RETRY_MS = 1000;

type LogPage = Awaited<ReturnType<typeof readRunLogPage>>;

/**
 * Reads of stored log pages shared by the feeds of one process: a read of (run, after seq) asked for
 * while the same one is in flight joins it. `forget(runId)` (new chunks were stored) lets
 * later readers start a fresh read, so nobody woken by a notice is served a page read before it.
 */
export class SharedLogReads {
  private readonly inFlight = new Map<string, Map<number, Promise<LogPage>>>();

  constructor(private readonly db: Database) {}

  read(logRunId: string, afterSeq: number): Promise<LogPage> {
    const reads = this.inFlight.get(logRunId) ?? new Map<number, Promise<LogPage>>();
    this.inFlight.set(logRunId, reads);
    const key = afterSeq;
    const existing = reads.get(key);
    if (existing) return existing;
    const page = readRunLogPage(this.db, logRunId, afterSeq, PAGE_MAX_CHUNKS, PAGE_MAX_BYTES).finally(() => {
      if (reads.get(key) !== page) return;
      reads.delete(key);
      if (reads.size === 0 && this.inFlight.get(logRunId) === reads) this.inFlight.delete(logRunId);
    });
    reads.set(key, page);
    return page;
  }

  /** New chunks of the run may be stored (or notices were missed: every run when no id is given). */
  forget(logRunId?: string): void {
    if (logRunId === undefined) this.inFlight.clear();
    else this.inFlight.delete(logRunId);
  }
}

/** Bytes sent to one socket and not yet acknowledged, by the feed they belong to. */
export class SendBudget {
  private nextId = 0;
  private readonly pending = new Map<number, { feed: RunLogFeed; bytes: number }>();
  unacknowledgedBytes = 0;

  constructor(readonly limitBytes: number) {}

  /** Whether sending `bytes` more stays within the budget (one chunk always may go when nothing is pending). */
  allows(bytes: number): boolean {
    return this.unacknowledgedBytes === 0 || this.unacknowledgedBytes + bytes <= this.limitBytes;
  }

  add(feed: RunLogFeed, bytes: number): number {
    const id = this.nextId++;
    this.pending.set(id, { feed, bytes });
    this.unacknowledgedBytes += bytes;
    return id;
  }

  acknowledge(id: number): void {
    const entry = this.pending.get(id);
    if (!entry) return;
    this.pending.delete(id);
    this.unacknowledgedBytes -= entry.bytes;
  }

  /** Forgets what one feed sent (it resumed from a sequence number, or stopped). */
  settle(feed: RunLogFeed): void {
    for (const [id, entry] of this.pending) {
      if (entry.feed === feed) {
        this.pending.delete(id);
        this.unacknowledgedBytes -= entry.bytes;
      }
    }
  }
}

export type RunLogFeedOptions = {
  reads: SharedLogReads;
  log: Logger;
  socket: Socket;
  budget: SendBudget;
  /** The run the client joined (chunks are labelled with it). */
  runId: string;
  /** The run whose log is read: the run itself, or the one whose results it reused. */
  logRunId: string;
  afterSeq: number;
  /** Send the log at all (false until a join asks for it). */
  withLog: boolean;
};

export class RunLogFeed {
  readonly runId: string;
  readonly logRunId: string;
  private lastSentSeq: number;
  /** Bumped by `restart`: a read started before belongs to an older cursor and is dropped. */
  private generation = 0;
  private reading = false;
  private again = false;
  private paused = false;
  private stopped = false;
  private withLog: boolean;
  private retryTimer: NodeJS.Timeout | null = null;

  constructor(private readonly options: RunLogFeedOptions) {
    this.runId = options.runId;
    this.logRunId = options.logRunId;
    this.lastSentSeq = options.afterSeq;
    this.withLog = options.withLog;
  }

  /**
   * Go on from `afterSeq` (a repeated join or a resume): the client holds everything up to it. `withLog`
   * false stops sending the log until a later join asks for it.
   */
  restart(afterSeq: number, withLog = true): void {
    this.options.budget.settle(this);
    this.withLog = withLog;
    this.lastSentSeq = afterSeq;
    this.generation += 1;
    this.paused = false;
    this.wake();
  }

  /** New chunks may be stored: read after the last one sent (now, or after the read in flight). */
  wake(): void {
    if (this.stopped || this.paused || !this.withLog) return;
    if (this.reading) {
      this.again = true;
      return;
    }
    this.reading = true;
    this.pump()
      .catch((error: unknown) => {
        this.options.log.error(
          { err: error, runId: this.runId },
          `live feed: reading the stored log failed; trying again in ${READ_RETRY_MS} ms`,
        );
        // Nothing may wake the feed again (the run's last chunk was stored): it tries by itself.
        if (!this.retryTimer && !this.stopped)
          this.retryTimer = setTimeout(() => {
            this.retryTimer = null;
            this.wake();
          }, READ_RETRY_MS);
      })
      .finally(() => {
        this.reading = false;
        // A wake-up that came while the failed or finished read was in flight still deserves its read.
        if (this.again && !this.stopped && !this.paused) this.wake();
      });
  }

  stop(): void {
    this.stopped = true;
    if (this.retryTimer) clearTimeout(this.retryTimer);
    this.retryTimer = null;
    this.options.budget.settle(this);
  }

  private async pump(): Promise<void> {
    const { reads, socket, budget } = this.options;
    do {
      this.again = false;
      for (;;) {
        const generation = this.generation;
        // Shared with the process's other feeds of this run: the page is read-only here.
        const page = await reads.read(this.logRunId, this.lastSentSeq);
        if (this.stopped || this.paused) return;
        // Restarted while reading: this page starts at the old cursor; read from the new one.
        if (generation !== this.generation) continue;
        for (const chunk of page.chunks) {
          if (chunk.seq <= this.lastSentSeq) continue;
          if (!budget.allows(chunk.content.byteLength)) {
            this.paused = true;
            socket.emit(LIVE_EVENTS.paused, { runId: this.runId, lastSentSeq: this.lastSentSeq });
            return;
          }
          const id = budget.add(this, chunk.content.byteLength);
          const payload: LiveLogChunk = {
            runId: this.runId,
            seq: chunk.seq,
            offsetBytes: chunk.offsetBytes,
            data: chunk.content,
            at: chunk.at.toISOString(),
          };
          socket.timeout(ACK_TIMEOUT_MS).emit(LIVE_EVENTS.log, payload, (timedOut: Error | null) => {
            if (!timedOut) budget.acknowledge(id);
          });
          this.lastSentSeq = chunk.seq;
        }
        if (!page.more) break;
      }
    } while (this.again && !this.stopped && !this.paused);
  }
}
