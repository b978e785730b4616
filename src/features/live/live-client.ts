/**
 * The tab's one connection to the live run feed (socket.io at LIVE_PATH, contract in
 * shared/schemas/live.ts). Loaded on demand (load-live.ts), so socket.io-client stays out of the main
 * bundle. The session cookie authenticates the handshake (same origin).
 *
 * Runs: one room per run, joined while anything on the page watches it; a log follower (the terminal)
 * holds the last sequence number it took, every (re-)join and resume asks for the chunks after it, and a
 * chunk at or below it is dropped (acknowledged, not shown), so a reconnect leaves no gap and no double.
 * Groups: run summaries for the runs list.
 */
import { isoDateTimeSchema, uuidSchema } from "@shared/schemas/common";
import {
  LIVE_EVENTS,
  LIVE_PATH,
  type LiveGroupRun,
  type LiveJoinRun,
  type LiveRunProgress,
  type LiveRunState,
  liveAckSchema,
  liveGroupRunSchema,
  liveRunPausedSchema,
  liveRunProgressSchema,
  liveRunStateSchema,
} from "@shared/schemas/live";
import type { RunSummary } from "@shared/schemas/runs";
import { io, type Socket } from "socket.io-client";
import { z } from "zod";

/** `connecting` before the first connection, `live` while connected, `reconnecting` after a loss. */
export type LiveStatus = "connecting" | "live" | "reconnecting";

export type LiveRunWatcher = {
  onState?: (event: LiveRunState) => void;
  onProgress?: (event: LiveRunProgress) => void;
};

export type LiveLogChunkBytes = { seq: number; data: Uint8Array };

export type LiveLogFollower = {
  /** A new chunk (seq above every one taken before); call `ack` once its bytes are written. */
  onChunk: (chunk: LiveLogChunkBytes, ack: () => void) => void;
  /** The server stopped sending this run's chunks; call `resume` when ready for more. */
  onPaused: () => void;
  /** The server refused to join the run (no access, no such run). */
  onRefused?: (message: string) => void;
};

export type LiveLogHandle = {
  /** Asks for the chunks after the last one taken (after `run:paused`). */
  resume: () => void;
  /** The sequence number of the last chunk taken. */
  lastSeq: () => number;
  stop: () => void;
};

type RunEntry = { watchers: Set<LiveRunWatcher>; follower: LiveLogFollower | null; lastSeq: number };

/**
 * Bytes of a chunk as socket.io delivers them in a browser (ArrayBuffer) or elsewhere (a byte view). Told
 * by their tag rather than `instanceof`, which fails for buffers made in another realm (a frame, a test
 * environment).
 */
const isArrayBuffer = (value: unknown): value is ArrayBuffer =>
  Object.prototype.toString.call(value) === "[object ArrayBuffer]";
const chunkDataSchema = z.custom<ArrayBufferView | ArrayBuffer>(
  (value) => isArrayBuffer(value) || ArrayBuffer.isView(value),
  { message: "data must be binary" },
);
const liveLogChunkSchema = z.object({
  runId: uuidSchema,
  seq: z.number().int().min(1),
  offsetBytes: z.number().int().min(0),
  data: chunkDataSchema,
  at: isoDateTimeSchema,
});

function toBytes(data: ArrayBufferView | ArrayBuffer): Uint8Array {
  return ArrayBuffer.isView(data)
    ? new Uint8Array(data.buffer, data.byteOffset, data.byteLength)
    : new Uint8Array(data);
}

/** Answers to a join that say "not now" rather than "no": the join is sent again after these delays. */
const TRANSIENT_JOIN_ERRORS = new Set(["busy", "too_many_requests", "internal_error"]);
const JOIN_RETRY_DELAYS_MS = [1_000, 2_000, 4_000, 8_000];

export class LiveClient {
  private readonly socket: Socket;
  private currentStatus: LiveStatus = "connecting";
  private readonly statusListeners = new Set<(status: LiveStatus) => void>();
  private readonly runs = new Map<string, RunEntry>();
  private readonly groups = new Map<string, Set<(run: RunSummary) => void>>();

  constructor(socket: Socket = io({ path: LIVE_PATH, withCredentials: true })) {
    this.socket = socket;
    socket.on("connect", () => {
      this.setStatus("live");
      for (const runId of this.runs.keys()) this.join(runId, LIVE_EVENTS.joinRun);
      for (const groupId of this.groups.keys()) socket.emit(LIVE_EVENTS.joinGroup, { groupId });
    });
    socket.on("disconnect", () => this.setStatus("reconnecting"));
    // socket.io tries again by itself (with back-off); until then the page refreshes slowly.
    socket.on("connect_error", () => this.setStatus("reconnecting"));
    socket.on(LIVE_EVENTS.log, (raw: unknown, ack?: unknown) => this.onLog(raw, ack));
    socket.on(LIVE_EVENTS.state, (raw: unknown) => {
      const event = liveRunStateSchema.safeParse(raw);
      if (!event.success) return;
      for (const watcher of this.runs.get(event.data.runId)?.watchers ?? []) watcher.onState?.(event.data);
    });
    socket.on(LIVE_EVENTS.progress, (raw: unknown) => {
      const event = liveRunProgressSchema.safeParse(raw);
      if (!event.success) return;
      for (const watcher of this.runs.get(event.data.runId)?.watchers ?? []) watcher.onProgress?.(event.data);
    });
    socket.on(LIVE_EVENTS.paused, (raw: unknown) => {
      const event = liveRunPausedSchema.safeParse(raw);
      if (!event.success) return;
      this.runs.get(event.data.runId)?.follower?.onPaused();
    });
    socket.on(LIVE_EVENTS.groupRun, (raw: unknown) => {
      const event = liveGroupRunSchema.safeParse(raw);
      if (!event.success) return;
      const data: LiveGroupRun = event.data;
      for (const listener of this.groups.get(data.groupId) ?? []) listener(data.run);
    });
  }

  status(): LiveStatus {
    return this.currentStatus;
  }

  onStatus(listener: (status: LiveStatus) => void): () => void {
    this.statusListeners.add(listener);
    return () => this.statusListeners.delete(listener);
  }

  /** State and progress events of a run while the returned function is not called. */
  watchRun(runId: string, watcher: LiveRunWatcher): () => void {
    const entry = this.entry(runId);
    entry.watchers.add(watcher);
    return () => {
      entry.watchers.delete(watcher);
      this.leaveIfUnused(runId, entry);
    };
  }

  /**
   * The run's log from its first chunk (a fresh follower holds nothing), then live. One follower per run:
   * a second one replaces the first.
   */
  followLog(runId: string, follower: LiveLogFollower): LiveLogHandle {
    const entry = this.entry(runId);
    entry.follower = follower;
    entry.lastSeq = 0;
    if (this.socket.connected) this.join(runId, LIVE_EVENTS.joinRun);
    return {
      resume: () => {
        if (entry.follower === follower && this.socket.connected) this.join(runId, LIVE_EVENTS.resumeRun);
      },
      lastSeq: () => entry.lastSeq,
      stop: () => {
        if (entry.follower !== follower) return;
        entry.follower = null;
        // Still watched for its state: the server stops sending the log.
        if (entry.watchers.size > 0 && this.socket.connected) this.join(runId, LIVE_EVENTS.joinRun);
        this.leaveIfUnused(runId, entry);
      },
    };
  }

  /** Summaries of the group's runs as they change, while the returned function is not called. */
  watchGroup(groupId: string, listener: (run: RunSummary) => void): () => void {
    let listeners = this.groups.get(groupId);
    if (!listeners) {
      listeners = new Set();
      this.groups.set(groupId, listeners);
      if (this.socket.connected) this.socket.emit(LIVE_EVENTS.joinGroup, { groupId });
    }
    listeners.add(listener);
    const held = listeners;
    return () => {
      held.delete(listener);
      // The server keeps the socket in the group's room (there is no leave); events are then ignored.
      if (held.size === 0) this.groups.delete(groupId);
    };
  }

  close(): void {
    this.socket.removeAllListeners();
    this.socket.close();
    this.statusListeners.clear();
  }

  private setStatus(status: LiveStatus) {
    if (status === this.currentStatus) return;
    this.currentStatus = status;
    for (const listener of this.statusListeners) listener(status);
  }

  private entry(runId: string): RunEntry {
    let entry = this.runs.get(runId);
    if (!entry) {
      entry = { watchers: new Set(), follower: null, lastSeq: 0 };
      this.runs.set(runId, entry);
      if (this.socket.connected) this.join(runId, LIVE_EVENTS.joinRun);
    }
    return entry;
  }

  private leaveIfUnused(runId: string, entry: RunEntry) {
    if (entry.watchers.size > 0 || entry.follower || this.runs.get(runId) !== entry) return;
    this.runs.delete(runId);
    if (this.socket.connected) this.socket.emit(LIVE_EVENTS.leaveRun, { runId });
  }

  private join(runId: string, event: typeof LIVE_EVENTS.joinRun | typeof LIVE_EVENTS.resumeRun, attempt = 0) {
    const entry = this.runs.get(runId);
    if (!entry) return;
    // A page that shows no log (state and timings only) does not have the whole log replayed to it.
    const payload: LiveJoinRun = { runId, afterSeq: entry.lastSeq, log: entry.follower !== null };
    this.socket.emit(event, payload, (raw: unknown) => {
      const ack = liveAckSchema.safeParse(raw);
      if (!ack.success || ack.data.ok) return;
      // A busy server is asked again, later each time; a refusal (no access, no such run) is final.
      if (TRANSIENT_JOIN_ERRORS.has(ack.data.error.code) && attempt < JOIN_RETRY_DELAYS_MS.length) {
        setTimeout(() => {
          if (this.runs.get(runId) === entry && this.socket.connected) this.join(runId, event, attempt + 1);
        }, JOIN_RETRY_DELAYS_MS[attempt]);
        return;
      }
      entry.follower?.onRefused?.(ack.data.error.message);
    });
  }

  private onLog(raw: unknown, ack: unknown) {
    const acknowledge = () => {
      if (typeof ack === "function") ack();
    };
    const chunk = liveLogChunkSchema.safeParse(raw);
    if (!chunk.success) return;
    const entry = this.runs.get(chunk.data.runId);
    // Nobody shows this run's log, or the chunk is one already taken (a replay after a re-join).
    if (!entry?.follower || chunk.data.seq <= entry.lastSeq) {
      acknowledge();
      return;
    }
    entry.lastSeq = chunk.data.seq;
    entry.follower.onChunk({ seq: chunk.data.seq, data: toBytes(chunk.data.data) }, acknowledge);
  }
}
