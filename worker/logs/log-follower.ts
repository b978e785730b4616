/**
 * Follows the logs of running jobs as they are written, instead of at the scheduler poll's pace: one
 * streaming exec per followed log (`tail -c +OFFSET -f`, started from the stored offset), its bytes
 * stored as numbered chunks as soon as whole lines are in (at most one chunk per run every
 * `flushIntervalMs`; lines that arrive meanwhile go into the same chunk). Each stored chunk notifies the
 * servers as the poller's chunks do, so watchers see a line a few tens of milliseconds after the job
 * wrote it.
 *
 * The poller stays the authority: it decides when a job has ended, stops the follower and reads the
 * rest of the log (the last line too) from the stored offset over SFTP. A log that cannot be streamed
 * (no spare channel, no `tail` on the host, the file not there yet) is read by the poller as before.
 * Bytes are stored only through `appendLogChunk`, which refuses a chunk whose offset was already
 * passed, so a follower and a poll never store a byte twice; a follower that finds the log moved on
 * skips what was stored and goes on. Across workers a log is streamed once: each stream holds a claim
 * on its run (run-claims.ts), and a worker that finds the claim taken leaves the log to the other.
 */
import { eq } from "drizzle-orm";
import { runs } from "../../server/db/schema";
import type { WorkerContext } from "../context";
import { planOf, type RunRow } from "../run-runtime";
import type { RemoteSession } from "../ssh/pool";
import type { RemoteStream, RemoteStreamEnd } from "../ssh/remote-stream";
import { appendLogChunk, type LogPosition } from "./log-store";
import { type CompiledStage, compileOutputRules } from "./output-rules";
import { storedProgress } from "./progress";
import { consumableLength } from "./tail";

export type LogFollowOptions = {
  /** Follow running logs by streaming at all (otherwise the poller reads them at its interval). */
  enabled: boolean;
  /** Exec slots per SSH connection left free for run steps; a log is streamed only beyond them. */
  spareSlots: number;
  /** Shortest time between two stored chunks of one log. */
  flushIntervalMs: number;
  /** Largest chunk stored at once. */
  maxChunkBytes: number;
  /** Bytes held per log before the stream is paused (the host's writes then wait on the SSH window). */
  maxBufferedBytes: number;
  /** After a stream could not start or ended by itself, the poller reads that log for this long. */
  retryAfterMs: number;
};

/** Exit status of the follow command when the log file is not there (yet). */
const NO_LOG_YET = 3;

/**
 * The remote side (POSIX sh, GNU or BSD tail): stop when our side of the channel ends (stdin EOF: `cat`
 * returns, `tail` is killed), and end when `tail` ends by itself, so the channel's close always means
 * the stream is over. `cat` holds no pipe of the channel's output, so sshd does not wait for it.
 */
const FOLLOW_SCRIPT = [
  '[ -f "$2" ] || exit 3',
  // A background list's stdin is /dev/null (POSIX, no job control): the channel's stdin is kept as fd 3.
  "exec 3<&0",
  'tail -c "+$1" -f -- "$2" 3<&- & t=$!',
  '{ cat <&3 >/dev/null 2>&1; kill "$t" 2>/dev/null; } >/dev/null 2>&1 & c=$!',
  "exec 3<&-",
  'wait "$t"; s=$?',
  'kill "$c" 2>/dev/null',
  'exit "$s"',
].join("\n");

export function followCommand(logPath: string, offsetBytes: number): string[] {
  return ["sh", "-c", FOLLOW_SCRIPT, "sigmaflow-log-follow", String(offsetBytes + 1), logPath];
}

class FollowedLog {
  private stream: RemoteStream | null = null;
  private buffered: Buffer[] = [];
  private bufferedBytes = 0;
  /** File offset of the first buffered byte. */
  private bufferStart: number;
  private flushing: Promise<void> | null = null;
  private timer: NodeJS.Timeout | null = null;
  private lastFlushAt = 0;
  private paused = false;
  stopped = false;

  constructor(
    private readonly ctx: WorkerContext,
    readonly runId: string,
    private readonly rules: Map<string, CompiledStage>,
    private position: LogPosition,
    private readonly options: LogFollowOptions,
    private readonly onGone: (end: RemoteStreamEnd | null) => void,
  ) {
    this.bufferStart = position.offsetBytes;
  }

  attach(stream: RemoteStream): void {
    this.stream = stream;
  }

  receive(bytes: Buffer): void {
    if (this.stopped) return;
    this.buffered.push(bytes);
    this.bufferedBytes += bytes.length;
    if (this.bufferedBytes >= this.options.maxBufferedBytes && !this.paused) {
      this.paused = true;
      this.stream?.pause();
    }
    this.scheduleFlush();
  }

  ended(end: RemoteStreamEnd): void {
    if (this.stopped) return;
    void this.stop().then(() => this.onGone(end));
  }

  /** Stops streaming; resolves once a chunk being stored is stored. Bytes not yet stored are dropped. */
  async stop(): Promise<void> {
    this.stopped = true;
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    this.stream?.close();
    this.buffered = [];
    this.bufferedBytes = 0;
    await this.flushing;
  }

  private scheduleFlush(): void {
    if (this.stopped || this.flushing || this.timer) return;
    const wait = Math.max(0, this.lastFlushAt + this.options.flushIntervalMs - Date.now());
    this.timer = setTimeout(() => {
      this.timer = null;
      this.flushing = this.flush().finally(() => {
        this.flushing = null;
        if (this.bufferedBytes > 0) this.scheduleFlush();
      });
    }, wait);
  }

  private async flush(): Promise<void> {
    this.lastFlushAt = Date.now();
    for (;;) {
      if (this.stopped) return;
      this.skipStored();
      const bytes = this.takeConsumable();
      if (bytes.length === 0) break;
      let next: LogPosition | null;
      try {
        next = await appendLogChunk(this.ctx, this.runId, this.rules, this.position, bytes);
      } catch (error) {
        this.ctx.log.warn(
          { runId: this.runId, err: error },
          "storing a followed log failed; the poller reads it",
        );
        void this.stop().then(() => this.onGone(null));
        return;
      }
      if (next) {
        this.position = next;
        this.drop(bytes.length);
      } else if (!(await this.reloadPosition())) {
        return;
      }
      if (bytes.length < this.options.maxChunkBytes) break;
    }
    if (this.paused && this.bufferedBytes < this.options.maxBufferedBytes / 2) {
      this.paused = false;
      this.stream?.resume();
    }
  }

  /** Someone else stored part of the log (a poll, another worker): take its position and go on after it. */
  private async reloadPosition(): Promise<boolean> {
    const [row] = await this.ctx.db
      .select({ offsetBytes: runs.logOffsetBytes, seq: runs.logSeq, progress: runs.progress })
      .from(runs)
      .where(eq(runs.id, this.runId));
    if (!row || row.offsetBytes < this.position.offsetBytes) {
      void this.stop().then(() => this.onGone(null));
      return false;
    }
    this.position = { offsetBytes: row.offsetBytes, seq: row.seq, progress: storedProgress(row.progress) };
    return true;
  }

  /** Drops buffered bytes that are already stored. */
  private skipStored(): void {
    const stored = this.position.offsetBytes - this.bufferStart;
    // When the stream runs behind the stored log, bytes up to the stored offset are dropped as they come.
    if (stored > 0) this.drop(Math.min(stored, this.bufferedBytes));
  }

  /** Whole lines from the front of the buffer (or a cut at a character's end in an over-long line). */
  private takeConsumable(): Buffer {
    if (this.bufferedBytes === 0 || this.bufferStart !== this.position.offsetBytes) return Buffer.alloc(0);
    const all = this.buffered.length === 1 ? this.buffered[0]! : Buffer.concat(this.buffered);
    this.buffered = [all];
    const window = all.subarray(0, this.options.maxChunkBytes);
    const take = consumableLength(window, this.options.maxChunkBytes, false);
    return Buffer.from(window.subarray(0, take));
  }

  private drop(count: number): void {
    if (count <= 0) return;
    const all = this.buffered.length === 1 ? this.buffered[0]! : Buffer.concat(this.buffered);
    const rest = all.subarray(count);
    this.buffered = rest.length > 0 ? [rest] : [];
    this.bufferedBytes = rest.length;
    this.bufferStart += count;
  }
}

/** The logs this worker streams now, by run. */
export class LogFollowers {
  private readonly followed = new Map<string, FollowedLog>();
  private readonly starting = new Set<string>();
  private readonly notBefore = new Map<string, number>();

  constructor(
    private readonly ctx: WorkerContext,
    private readonly options: LogFollowOptions,
  ) {}

  /** Whether this worker streams the run's log; the poller leaves a streamed log alone while the job runs. */
  isFollowing(runId: string): boolean {
    return this.followed.has(runId) || this.starting.has(runId);
  }

  /**
   * Starts streaming a running job's log if it is not streamed yet and a channel is spare. Returns
   * whether the log is streamed now, here or by another worker. `run` is the row as the poll read it; the stream starts from the
   * offset stored now.
   */
  async follow(run: RunRow, session: RemoteSession): Promise<boolean> {
    if (!this.options.enabled) return false;
    if (this.isFollowing(run.id)) return true;
    if ((this.notBefore.get(run.id) ?? 0) > Date.now()) return false;
    this.starting.add(run.id);
    try {
      return await this.start(run, session);
    } catch (error) {
      this.ctx.log.warn({ runId: run.id, err: error }, "could not stream the log; the poller reads it");
      this.notBefore.set(run.id, Date.now() + this.options.retryAfterMs);
      return false;
    } finally {
      this.starting.delete(run.id);
    }
  }

  private async start(run: RunRow, session: RemoteSession): Promise<boolean> {
    // One stream per log across the workers: a log another worker streams is left to it.
    if (!(await this.ctx.logFollowClaims.tryClaim(run.id))) return true;
    let streaming = false;
    try {
      streaming = await this.openStream(run, session);
      return streaming;
    } finally {
      if (!streaming) await this.ctx.logFollowClaims.release(run.id);
    }
  }

  private async openStream(run: RunRow, session: RemoteSession): Promise<boolean> {
    // The poll's copy of the row: if a chunk was stored since, the stream's first append finds the
    // offset moved, takes the stored position and skips those bytes (no query per poll for logs that
    // wait for a spare channel).
    const plan = planOf(run);
    const position: LogPosition = {
      offsetBytes: run.logOffsetBytes,
      seq: run.logSeq,
      progress: storedProgress(run.progress),
    };
    const log = new FollowedLog(this.ctx, run.id, compileOutputRules(plan), position, this.options, (end) =>
      this.gone(log, end),
    );
    const stream = await session.openStream(
      followCommand(`${run.remoteDir}/${plan.logName}`, position.offsetBytes),
      { onData: (bytes) => log.receive(bytes), onEnd: (end) => log.ended(end) },
      { spareSlots: this.options.spareSlots },
    );
    if (!stream) return false;
    log.attach(stream);
    if (log.stopped) return false;
    this.followed.set(run.id, log);
    return true;
  }

  private gone(log: FollowedLog, end: RemoteStreamEnd | null): void {
    if (this.followed.get(log.runId) === log) {
      this.followed.delete(log.runId);
      this.releaseClaim(log.runId);
    }
    this.notBefore.set(log.runId, Date.now() + this.options.retryAfterMs);
    if (end && end.code !== NO_LOG_YET && (end.error || end.code !== 0)) {
      this.ctx.log.info(
        { runId: log.runId, code: end.code, err: end.error?.message, stderr: end.stderr.slice(0, 500) },
        "log stream ended; the poller reads the log",
      );
    }
  }

  /** Stops streaming a run's log; resolves once a chunk being stored is stored. */
  async stop(runId: string): Promise<void> {
    const log = this.followed.get(runId);
    this.notBefore.delete(runId);
    if (!log) return;
    this.followed.delete(runId);
    await log.stop();
    this.releaseClaim(runId);
  }

  private releaseClaim(runId: string): void {
    // A lost claim connection took the lock with it; nothing else to undo.
    this.ctx.logFollowClaims.release(runId).catch(() => undefined);
  }

  /** Stops streaming every log whose run is no longer submitted or running. */
  async retain(activeRunIds: Set<string>): Promise<void> {
    const gone = [...this.followed.keys()].filter((runId) => !activeRunIds.has(runId));
    for (const runId of this.notBefore.keys()) if (!activeRunIds.has(runId)) this.notBefore.delete(runId);
    await Promise.all(gone.map((runId) => this.stop(runId)));
  }

  /** Stops every stream; waits at most `waitMs` for chunks being stored (the database may be gone). */
  async closeAll(waitMs = 5000): Promise<void> {
    let timer: NodeJS.Timeout | undefined;
    const stopped = Promise.all([...this.followed.keys()].map((runId) => this.stop(runId)));
    const waited = new Promise<void>((resolve) => {
      timer = setTimeout(resolve, waitMs);
    });
    await Promise.race([stopped, waited]);
    clearTimeout(timer);
  }

  stats(): { followed: number } {
    return { followed: this.followed.size };
  }
}
