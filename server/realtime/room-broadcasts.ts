/**
 * What a notice means for the rooms of this process, apart from the log itself (log-feed.ts): a run's
 * state changes go to `run:<id>` as `run:state` (every run_events row once, in order), its progress and
 * timings to `run:<id>` as `run:progress` (at most every PROGRESS_INTERVAL_MS per run), and its summary to
 * `group:<id>` as `group:run`.
 *
 * Each of these is one read per run at a time: a notice during a read asks for one more read after it,
 * so a burst of notices costs a few reads and the events of one run leave in the order they were read.
 */
import { and, asc, desc, eq, gt, gte } from "drizzle-orm";
import type { Server } from "socket.io";
import {
  LIVE_EVENTS,
  type LiveGroupRun,
  type LiveRunProgress,
  type LiveRunState,
} from "../../shared/schemas/live";
import type { Database } from "../db/client";
import { runEvents, runs, runTimings } from "../db/schema";
import type { RunPlan } from "../execution/run-plan";
import { orderTimings } from "../execution/timings-order";
import type { Logger } from "../logger";
import { getRunSummary } from "../services/run-reads.service";

export const PROGRESS_INTERVAL_MS = 250;
/** Runs of one group re-sent after the listener was away (the most recently changed first). */
const CATCH_UP_RUNS_PER_GROUP = 200;

export const runRoom = (runId: string) => `run:${runId}`;
export const groupRoom = (groupId: string) => `group:${groupId}`;

/** One task per key at a time; a request during it runs the task once more afterwards. */
class SingleFlight {
  private readonly running = new Map<string, { again: boolean }>();

  constructor(private readonly onError: (key: string, error: unknown) => void) {}

  request(key: string, task: () => Promise<void>): void {
    const current = this.running.get(key);
    if (current) {
      current.again = true;
      return;
    }
    const state = { again: false };
    this.running.set(key, state);
    const loop = async () => {
      do {
        state.again = false;
        try {
          await task();
        } catch (error) {
          this.onError(key, error);
        }
      } while (state.again);
      this.running.delete(key);
    };
    void loop();
  }
}

export class RoomBroadcasts {
  /** Per run room: the last run_events row broadcast, so a joining socket gets it first and then what follows. */
  private readonly lastState = new Map<string, { eventId: number; payload: LiveRunState }>();
  private readonly progressTimers = new Map<string, { timer: NodeJS.Timeout; pending: boolean }>();
  private readonly reads: SingleFlight;

  constructor(
    private readonly io: Server,
    private readonly db: Database,
    log: Logger,
  ) {
    this.reads = new SingleFlight((key, error) =>
      log.error({ err: error, key }, "live feed: reading a run for its room failed"),
    );
  }

  private hasRoom(room: string): boolean {
    return (this.io.sockets.adapter.rooms.get(room)?.size ?? 0) > 0;
  }

  private hasGroupRooms(): boolean {
    for (const room of this.io.sockets.adapter.rooms.keys()) if (room.startsWith("group:")) return true;
    return false;
  }

  /**
   * A socket joined `run:<runId>` (it is in the room already): it gets the state it joins at, then every
   * later change with the others, and the current progress.
   */
  joined(socketId: string, runId: string): void {
    const last = this.lastState.get(runId);
    if (last) this.io.to(socketId).emit(LIVE_EVENTS.state, last.payload);
    else this.stateChanged(runId);
    this.progressChanged(runId);
  }

  /** The last socket left `run:<runId>`: forget the run's cursor. */
  roomEmptied(runId: string): void {
    this.lastState.delete(runId);
    const progress = this.progressTimers.get(runId);
    if (progress) clearTimeout(progress.timer);
    this.progressTimers.delete(runId);
  }

  /** Stops the progress timers (the server is shutting down). */
  close(): void {
    for (const { timer } of this.progressTimers.values()) clearTimeout(timer);
    this.progressTimers.clear();
  }

  /** A run_events row was stored (or may have been, after the listener was away). */
  stateChanged(runId: string): void {
    if (this.hasRoom(runRoom(runId))) this.reads.request(`state:${runId}`, () => this.sendStates(runId));
    if (this.hasGroupRooms()) this.reads.request(`summary:${runId}`, () => this.sendSummary(runId));
  }

  /** A log chunk was stored: progress and timings may have moved. */
  progressChanged(runId: string): void {
    if (!this.hasRoom(runRoom(runId))) return;
    const throttled = this.progressTimers.get(runId);
    if (throttled) {
      throttled.pending = true;
      return;
    }
    const entry = {
      pending: false,
      timer: setTimeout(() => {
        this.progressTimers.delete(runId);
        if (entry.pending) this.progressChanged(runId);
      }, PROGRESS_INTERVAL_MS),
    };
    entry.timer.unref();
    this.progressTimers.set(runId, entry);
    this.reads.request(`progress:${runId}`, () => this.sendProgress(runId));
  }

  /** After the listener was away: every room reads again what it may have missed. */
  catchUp(since: Date): void {
    for (const room of [...this.io.sockets.adapter.rooms.keys()]) {
      if (room.startsWith("run:")) {
        const runId = room.slice("run:".length);
        this.reads.request(`state:${runId}`, () => this.sendStates(runId));
        this.progressChanged(runId);
      } else if (room.startsWith("group:")) {
        const groupId = room.slice("group:".length);
        this.reads.request(`group:${groupId}`, () => this.sendGroupChanges(groupId, since));
      }
    }
  }

  private async sendStates(runId: string): Promise<void> {
    const room = runRoom(runId);
    if (!this.hasRoom(room)) return;
    const last = this.lastState.get(runId);
    const columns = {
      id: runEvents.id,
      toState: runEvents.toState,
      message: runEvents.message,
      at: runEvents.at,
    };
    // A room's first read starts at the run's latest event; later reads send every event after the last sent.
    const rows = last
      ? await this.db
          .select(columns)
          .from(runEvents)
          .where(and(eq(runEvents.runId, runId), gt(runEvents.id, last.eventId)))
          .orderBy(asc(runEvents.id))
          .limit(100)
      : await this.db
          .select(columns)
          .from(runEvents)
          .where(eq(runEvents.runId, runId))
          .orderBy(desc(runEvents.id))
          .limit(1);
    if (!this.hasRoom(room)) return;
    for (const row of rows) {
      const payload: LiveRunState = {
        runId,
        state: row.toState,
        message: row.message,
        at: row.at.toISOString(),
      };
      this.lastState.set(runId, { eventId: row.id, payload });
      this.io.to(room).emit(LIVE_EVENTS.state, payload);
    }
    // More than one page stored since: read on.
    if (rows.length === 100) this.reads.request(`state:${runId}`, () => this.sendStates(runId));
  }

  private async sendProgress(runId: string): Promise<void> {
    const room = runRoom(runId);
    if (!this.hasRoom(room)) return;
    const payload = await readRunProgress(this.db, runId);
    if (payload && this.hasRoom(room)) this.io.to(room).emit(LIVE_EVENTS.progress, payload);
  }

  private async sendSummary(runId: string): Promise<void> {
    const summary = await getRunSummary(this.db, runId);
    if (!summary) return;
    const room = groupRoom(summary.groupId);
    if (!this.hasRoom(room)) return;
    const payload: LiveGroupRun = { groupId: summary.groupId, run: summary };
    this.io.to(room).emit(LIVE_EVENTS.groupRun, payload);
  }

  private async sendGroupChanges(groupId: string, since: Date): Promise<void> {
    // A second of slack for clocks: the database stamps updated_at, this process measured `since`.
    const changed = await this.db
      .select({ id: runs.id })
      .from(runs)
      .where(and(eq(runs.groupId, groupId), gte(runs.updatedAt, new Date(since.getTime() - 1_000))))
      .orderBy(desc(runs.updatedAt))
      .limit(CATCH_UP_RUNS_PER_GROUP);
    for (const { id } of changed.reverse()) await this.sendSummary(id);
  }
}

/**
 * The run's progress and per-symmetry timings as the run page shows them (timings in the order the
 * stages run; a run that reused results shows the timings of the run that produced them).
 */
export async function readRunProgress(db: Database, runId: string): Promise<LiveRunProgress | null> {
  const summary = await getRunSummary(db, runId);
  if (!summary) return null;
  const [run] = await db
    .select({ plan: runs.plan, reusedFrom: runs.reusedFrom })
    .from(runs)
    .where(eq(runs.id, runId));
  if (!run) return null;
  const timings = await db
    .select()
    .from(runTimings)
    .where(eq(runTimings.runId, run.reusedFrom ?? runId))
    .orderBy(runTimings.stage);
  return {
    runId,
    progress: summary.progress,
    timings: orderTimings(
      timings.map((t) => ({ stage: t.stage, symmetry: t.symmetry, durationSeconds: t.elapsedMs / 1000 })),
      run.plan as RunPlan,
    ),
  };
}
