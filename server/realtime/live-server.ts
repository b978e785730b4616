/**
 * The live run feed: socket.io at LIVE_PATH on the server's HTTP server (contract: shared/schemas/live.ts).
 *
 * Fan-out is our own LISTEN path (run-notices.ts): this process's one LISTEN connection hears every notice
 * and wakes the feeds of its own sockets; every server instance behind one address does the same for its
 * sockets, so no event crosses between instances and no socket.io adapter is involved.
 *
 * Rooms: `run:<id>` (state and progress broadcasts; each socket also has its own log feed per run, since
 * each client holds its own last sequence number) and `group:<id>` (run summaries).
 */
import type { Server as HttpServer } from "node:http";
import type pg from "pg";
import { Server, type Socket } from "socket.io";
import type { z } from "zod";
import {
  LIVE_EVENTS,
  LIVE_PATH,
  type LiveAck,
  liveJoinGroupSchema,
  liveJoinRunSchema,
  liveLeaveRunSchema,
} from "../../shared/schemas/live";
import type { Principal } from "../auth/principal";
import { sessionMiddleware } from "../auth/session";
import type { ServerConfig } from "../config";
import type { Database } from "../db/client";
import { AppError, validationError } from "../http/errors";
import type { Logger } from "../logger";
import { requireGroupRole } from "../services/access";
import { visibleRun } from "../services/run-reads.service";
import {
  authenticateSocket,
  currentPrincipal,
  originCheck,
  publicOrigin,
  sessionOnHandshake,
} from "./live-auth";
import { RunLogFeed, SendBudget, SharedLogReads } from "./log-feed";
import { groupRoom, RoomBroadcasts, runRoom } from "./room-broadcasts";
import { type RunNotice, startRunNoticeListener } from "./run-notices";

/** Unacknowledged log bytes one socket may have before its feeds pause. */
export const DEFAULT_SEND_BUDGET_BYTES = 4 * 1024 * 1024;
/** Rooms one socket may be in: a runs list and a few run pages are far below. */
const MAX_RUNS_PER_SOCKET = 64;
const MAX_GROUPS_PER_SOCKET = 32;
/** Client events of one socket handled at once; more are refused until these are answered. */
const MAX_EVENTS_IN_FLIGHT = 8;
/** Client messages are a few ids; anything larger is refused by engine.io before parsing. */
const MAX_CLIENT_MESSAGE_BYTES = 16 * 1024;

export type LiveFeedDeps = {
  db: Database;
  pool: pg.Pool;
  config: ServerConfig;
  log: Logger;
};

export type LiveFeedOptions = {
  sendBudgetBytes?: number;
  /** How often each connection's credential and room permissions are checked again (default 30 s). */
  recheckIntervalMs?: number;
};

/**
 * Credentials and permissions are checked at the handshake and at every join; a revoked token, an ended
 * session or a removed membership would otherwise keep a socket in rooms it joined before. Every so often
 * each connection is checked again: one whose credential no longer holds is disconnected, and rooms its
 * person may no longer read are left.
 */
export const DEFAULT_RECHECK_INTERVAL_MS = 30_000;

export type LiveFeed = {
  io: Server;
  /** Resolves once the LISTEN connection first listens. */
  ready: Promise<void>;
  /** Whether the LISTEN connection listens right now. */
  listening(): boolean;
  /** Ends the sockets and the LISTEN connection; the HTTP server is left to its owner. */
  close(): Promise<void>;
};

type SocketState = {
  budget: SendBudget;
  feeds: Map<string, RunLogFeed>;
  groups: Set<string>;
  /** Client events being handled: each costs a few queries, so a socket gets only a few at once. */
  inFlight: number;
};

function parse<S extends z.ZodType>(schema: S, payload: unknown): z.infer<S> {
  const result = schema.safeParse(payload);
  if (!result.success) throw validationError(result.error, "body");
  return result.data;
}

/**
 * Attaches the live feed to `httpServer`. Call it after the Express app is the server's request listener:
 * socket.io takes the requests under LIVE_PATH and hands every other one to the listeners already there.
 */
export function attachLiveFeed(
  httpServer: HttpServer,
  deps: LiveFeedDeps,
  options: LiveFeedOptions = {},
): LiveFeed {
  const { db, log } = deps;
  const sendBudgetBytes = options.sendBudgetBytes ?? DEFAULT_SEND_BUDGET_BYTES;
  const expectedOrigin = publicOrigin(deps.config.publicUrl);
  const io = new Server(httpServer, {
    path: LIVE_PATH,
    serveClient: false,
    maxHttpBufferSize: MAX_CLIENT_MESSAGE_BYTES,
    allowRequest: originCheck(expectedOrigin, log),
  });
  io.engine.use(sessionOnHandshake(sessionMiddleware(deps.pool, deps.config), expectedOrigin));
  io.use(authenticateSocket(db));

  const broadcasts = new RoomBroadcasts(io, db, log);
  /** One read of a stored log page for all of this process's feeds at the same place in the same run. */
  const reads = new SharedLogReads(db);
  const states = new Map<string, SocketState>();
  /** Log feeds by the run whose log they read: a log notice wakes exactly these. */
  const feedsByLogRun = new Map<string, Set<RunLogFeed>>();

  io.sockets.adapter.on("delete-room", (room: string) => {
    if (room.startsWith("run:")) broadcasts.roomEmptied(room.slice("run:".length));
  });

  function addFeed(feed: RunLogFeed) {
    const set = feedsByLogRun.get(feed.logRunId) ?? new Set<RunLogFeed>();
    feedsByLogRun.set(feed.logRunId, set);
    set.add(feed);
  }

  function removeFeed(feed: RunLogFeed) {
    feed.stop();
    const set = feedsByLogRun.get(feed.logRunId);
    set?.delete(feed);
    if (set?.size === 0) feedsByLogRun.delete(feed.logRunId);
  }

  function onNotice(notice: RunNotice) {
    if (notice.type === "log") {
      reads.forget(notice.runId);
      for (const feed of feedsByLogRun.get(notice.runId) ?? []) feed.wake();
      broadcasts.progressChanged(notice.runId);
    } else {
      broadcasts.stateChanged(notice.runId);
    }
  }

  const listener = startRunNoticeListener({
    connection: deps.pool.options,
    log,
    onNotice,
    onListening(lostAt) {
      if (!lostAt) return;
      // Notices may have been missed while the connection was down: every feed reads what is stored.
      reads.forget();
      for (const set of feedsByLogRun.values()) for (const feed of set) feed.wake();
      broadcasts.catchUp(lostAt);
    },
  });

  /** Runs `handle` for a client event and answers its ack with ok or the API's error code and message. */
  function handler(
    socket: Socket,
    event: string,
    handle: (payload: unknown, state: SocketState) => Promise<(() => void) | undefined>,
  ) {
    socket.on(event, (payload: unknown, ack?: unknown) => {
      const reply = (answer: LiveAck) => {
        if (typeof ack === "function") ack(answer);
      };
      const state = states.get(socket.id);
      if (!state) return;
      if (state.inFlight >= MAX_EVENTS_IN_FLIGHT) {
        reply({
          ok: false,
          error: { code: "too_many_requests", message: "Wait for the answers to your earlier requests." },
        });
        return;
      }
      state.inFlight += 1;
      handle(payload, state)
        .finally(() => {
          state.inFlight -= 1;
        })
        .then(
          (afterAck) => {
            if (socket.disconnected) return;
            reply({ ok: true });
            afterAck?.();
          },
          (error: unknown) => {
            if (error instanceof AppError) {
              reply({ ok: false, error: { code: error.code, message: error.message } });
              return;
            }
            if (isPoolWaitTimeout(error)) {
              // Every connection of the pool was busy for its whole wait: the browser asks again.
              log.warn({ event }, "live feed: no database connection came free in time");
              reply({
                ok: false,
                error: { code: "busy", message: "The server is busy; asking again shortly." },
              });
              return;
            }
            log.error({ err: error, event }, "live feed: handling a client event failed");
            reply({
              ok: false,
              error: { code: "internal_error", message: "Something went wrong; try again." },
            });
          },
        );
    });
  }

  /** run:join and run:resume: the client holds the run's log up to `afterSeq`. */
  async function joinRun(socket: Socket, payload: unknown, state: SocketState) {
    const { runId, afterSeq, log: withLog } = parse(liveJoinRunSchema, payload);
    const principal = await currentPrincipal(db, socket);
    const run = await visibleRun(db, principal, runId, "collaborator");
    if (socket.disconnected) return undefined;
    const existing = state.feeds.get(run.id);
    if (existing) return () => existing.restart(afterSeq, withLog);
    if (state.feeds.size >= MAX_RUNS_PER_SOCKET)
      throw new AppError(
        429,
        "too_many_rooms",
        `One connection follows at most ${MAX_RUNS_PER_SOCKET} runs; leave one first.`,
      );
    // A run that reused another's results has no log of its own: it serves the original's (as HTTP does).
    const feed = new RunLogFeed({
      reads,
      log,
      socket,
      budget: state.budget,
      runId: run.id,
      logRunId: run.reusedFrom ?? run.id,
      afterSeq,
      withLog,
    });
    state.feeds.set(run.id, feed);
    addFeed(feed);
    socket.join(runRoom(run.id));
    // After the ack, so the client hears that it joined before the first chunk.
    return () => {
      broadcasts.joined(socket.id, run.id);
      feed.wake();
    };
  }

  io.on("connection", (socket) => {
    states.set(socket.id, {
      budget: new SendBudget(sendBudgetBytes),
      feeds: new Map(),
      groups: new Set(),
      inFlight: 0,
    });

    handler(socket, LIVE_EVENTS.joinRun, (payload, state) => joinRun(socket, payload, state));
    handler(socket, LIVE_EVENTS.resumeRun, (payload, state) => joinRun(socket, payload, state));

    handler(socket, LIVE_EVENTS.leaveRun, async (payload, state) => {
      const { runId } = parse(liveLeaveRunSchema, payload);
      const feed = state.feeds.get(runId);
      if (feed) {
        removeFeed(feed);
        state.feeds.delete(runId);
      }
      socket.leave(runRoom(runId));
      return undefined;
    });

    handler(socket, LIVE_EVENTS.joinGroup, async (payload, state) => {
      const { groupId } = parse(liveJoinGroupSchema, payload);
      const principal = await currentPrincipal(db, socket);
      // The same permission as listing the group's runs.
      await requireGroupRole(db, principal, groupId, "collaborator");
      if (socket.disconnected || state.groups.has(groupId)) return undefined;
      if (state.groups.size >= MAX_GROUPS_PER_SOCKET)
        throw new AppError(
          429,
          "too_many_rooms",
          `One connection follows at most ${MAX_GROUPS_PER_SOCKET} groups.`,
        );
      state.groups.add(groupId);
      socket.join(groupRoom(groupId));
      return undefined;
    });

    socket.on("disconnect", () => {
      const state = states.get(socket.id);
      states.delete(socket.id);
      for (const feed of state?.feeds.values() ?? []) removeFeed(feed);
    });
  });

  /** Checks one connection again (see DEFAULT_RECHECK_INTERVAL_MS). */
  async function recheck(socket: Socket, state: SocketState) {
    let principal: Principal;
    try {
      principal = await currentPrincipal(db, socket);
    } catch (error) {
      if (!(error instanceof AppError)) throw error;
      socket.emit("error", { code: error.code, message: error.message });
      socket.disconnect(true);
      return;
    }
    for (const [runId, feed] of [...state.feeds]) {
      const allowed = await visibleRun(db, principal, runId, "collaborator").then(
        () => true,
        (error: unknown) => (error instanceof AppError ? false : Promise.reject(error)),
      );
      if (allowed || socket.disconnected) continue;
      removeFeed(feed);
      state.feeds.delete(runId);
      socket.leave(runRoom(runId));
    }
    for (const groupId of [...state.groups]) {
      const allowed = await requireGroupRole(db, principal, groupId, "collaborator").then(
        () => true,
        (error: unknown) => (error instanceof AppError ? false : Promise.reject(error)),
      );
      if (allowed || socket.disconnected) continue;
      state.groups.delete(groupId);
      socket.leave(groupRoom(groupId));
    }
  }

  let rechecking = false;
  const recheckTimer = setInterval(() => {
    if (rechecking) return;
    rechecking = true;
    const sockets = [...io.sockets.sockets.values()];
    void (async () => {
      for (const socket of sockets) {
        const state = states.get(socket.id);
        if (!state || socket.disconnected) continue;
        await recheck(socket, state).catch((error: unknown) =>
          log.warn({ err: error }, "live feed: checking a connection again failed; next time"),
        );
      }
    })().finally(() => {
      rechecking = false;
    });
  }, options.recheckIntervalMs ?? DEFAULT_RECHECK_INTERVAL_MS);
  recheckTimer.unref();

  return {
    io,
    ready: listener.ready,
    listening: listener.listening,
    async close() {
      clearInterval(recheckTimer);
      await listener.close();
      broadcasts.close();
      for (const socket of io.sockets.sockets.values()) socket.disconnect(true);
      io.engine.close();
    },
  };
}

/**
 * node-postgres's refusal when no pooled connection came free within `connectionTimeoutMillis`, also as
 * the cause of Drizzle's query error.
 */
function isPoolWaitTimeout(error: unknown): boolean {
  for (let current = error, depth = 0; current instanceof Error && depth < 5; depth++) {
    if (current.message === "timeout exceeded when trying to connect") return true;
    current = current.cause;
  }
  return false;
}
