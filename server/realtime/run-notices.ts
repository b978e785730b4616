/**
 * The server process's one LISTEN connection on RUN_NOTIFY_CHANNEL. Each server instance listens for
 * itself: PostgreSQL delivers every notice to every listening connection, so every instance hears every
 * state change and stored log chunk and forwards it to its own sockets. This is why Sigmaflow does not use
 * the socket.io PostgreSQL adapter: it would send each event through PostgreSQL a second time (to tell the
 * other instances what they already heard) and ask for sticky sessions' bookkeeping for nothing.
 *
 * Notices only wake the feeds up: what is sent always comes from the stored rows. A notice lost while the
 * connection was down is therefore harmless, as long as every feed reads again once it is back: `onListening`
 * is called after each (re)connection, and the caller wakes every feed there.
 */
import pg from "pg";
import { z } from "zod";
import { uuidSchema } from "../../shared/schemas/common";
import { runStateSchema } from "../../shared/schemas/runs";
import { RUN_NOTIFY_CHANNEL } from "../execution/run-transitions";
import type { Logger } from "../logger";

/** The payloads the triggers of drizzle/0004 raise. */
export const runNoticeSchema = z.discriminatedUnion("type", [
  z.object({ runId: uuidSchema, type: z.literal("state"), state: runStateSchema }),
  z.object({ runId: uuidSchema, type: z.literal("log"), seq: z.int().min(1) }),
]);
export type RunNotice = z.infer<typeof runNoticeSchema>;

export type RunNoticeListenerOptions = {
  /** Connection settings of the server's pool; the listener opens its own client with them. */
  connection: pg.ClientConfig;
  log: Logger;
  onNotice(notice: RunNotice): void;
  /**
   * After LISTEN succeeded. `lostAt` is null the first time; after a reconnection it is when the previous
   * connection was lost (notices since then may be missing).
   */
  onListening(lostAt: Date | null): void;
  /** Backoff between attempts: first delay, doubling up to the maximum. */
  retryBaseMs?: number;
  retryMaxMs?: number;
};

export type RunNoticeListener = {
  /** Resolves once the first LISTEN succeeded (attempts go on in the background if it failed). */
  ready: Promise<void>;
  /** Whether LISTEN is in effect right now. */
  listening(): boolean;
  close(): Promise<void>;
};

/** `application_name` of the connection, so operators (and tests) can find it in pg_stat_activity. */
export const LISTENER_APPLICATION_NAME = "sigmaflow-live-listener";

export function startRunNoticeListener(options: RunNoticeListenerOptions): RunNoticeListener {
  const { log } = options;
  const retryBaseMs = options.retryBaseMs ?? 250;
  const retryMaxMs = options.retryMaxMs ?? 10_000;
  let client: pg.Client | null = null;
  let closed = false;
  let active = false;
  let everListened = false;
  /** When the last connection that was listening went away. */
  let lostAt: Date | null = null;
  let failures = 0;
  let retryTimer: NodeJS.Timeout | null = null;
  let markReady: () => void = () => {};
  const ready = new Promise<void>((resolve) => {
    markReady = resolve;
  });

  function scheduleRetry(reason: string) {
    if (closed || retryTimer) return;
    const delayMs = Math.min(retryMaxMs, retryBaseMs * 2 ** Math.min(failures, 16));
    failures += 1;
    log.warn({ reason, retryInMs: delayMs }, "live feed: LISTEN connection lost, connecting again");
    retryTimer = setTimeout(() => {
      retryTimer = null;
      void connect();
    }, delayMs);
  }

  async function connect() {
    if (closed) return;
    const next = new pg.Client({
      ...options.connection,
      application_name: LISTENER_APPLICATION_NAME,
      keepAlive: true,
    });
    client = next;
    let lost = false;
    const onLost = (reason: string) => {
      if (lost) return;
      lost = true;
      if (active) lostAt = new Date();
      active = false;
      next.removeAllListeners("notification");
      next.end().catch(() => {});
      if (client === next) client = null;
      scheduleRetry(reason);
    };
    next.on("error", (error) => onLost(error.message));
    next.on("end", () => onLost("connection ended"));
    next.on("notification", (message) => {
      if (message.channel !== RUN_NOTIFY_CHANNEL || !message.payload) return;
      let parsed: ReturnType<typeof runNoticeSchema.safeParse>;
      try {
        parsed = runNoticeSchema.safeParse(JSON.parse(message.payload));
      } catch {
        parsed = runNoticeSchema.safeParse(undefined);
      }
      if (!parsed.success) {
        log.warn({ payload: message.payload.slice(0, 200) }, "live feed: notice of unexpected shape ignored");
        return;
      }
      options.onNotice(parsed.data);
    });
    try {
      await next.connect();
      await next.query(`LISTEN ${RUN_NOTIFY_CHANNEL}`);
    } catch (error) {
      onLost((error as Error).message);
      return;
    }
    if (closed || lost) {
      next.end().catch(() => {});
      return;
    }
    active = true;
    failures = 0;
    const since = everListened ? (lostAt ?? new Date()) : null;
    everListened = true;
    if (since) log.info("live feed: listening again; joined feeds catch up from the stored log");
    markReady();
    options.onListening(since);
  }

  void connect();
  return {
    ready,
    listening: () => active,
    async close() {
      closed = true;
      active = false;
      if (retryTimer) clearTimeout(retryTimer);
      retryTimer = null;
      const current = client;
      client = null;
      markReady();
      if (current) {
        current.removeAllListeners("notification");
        await current.end().catch(() => {});
      }
    },
  };
}
