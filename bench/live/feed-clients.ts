/**
 * A process of live feed clients for bench/live/fanout.bench.ts (started with `fork`): it opens the
 * socket.io connections it is asked for (API token, as tests/integration/support/live-client.ts does),
 * then each joins the run it is given, checking what arrives as it arrives (DeliveryCheck) and
 * acknowledging every chunk.
 * Asked to collect, it waits until each client holds its run's whole log (or the time is up) and sends
 * back one report per client.
 *
 * Messages from the parent: `{ type: "connect", baseUrl, token, count }`, `{ type: "join", runIds }` (one
 * run per connection), then `{ type: "collect", expectedBytes: { [runId]: bytes }, timeoutMs }`. To the
 * parent: `{ type: "connected", connections, retries }`, `{ type: "joined", clients }`, then
 * `{ type: "reports", reports, disconnects, errors }`.
 */
import type { Socket } from "socket.io-client";
import { connectLive } from "../../tests/integration/support/live-client";
import { DeliveryCheck, type DeliveryReport, followRun } from "./feed-support";

export type ConnectMessage = { type: "connect"; baseUrl: string; token: string; count: number };
export type ConnectedMessage = { type: "connected"; connections: number; retries: number };
/** The run of each connection, in the order they were opened. */
export type JoinMessage = { type: "join"; runIds: string[] };
export type CollectMessage = { type: "collect"; expectedBytes: Record<string, number>; timeoutMs: number };
export type JoinedMessage = { type: "joined"; clients: number };
export type ReportsMessage = {
  type: "reports";
  reports: DeliveryReport[];
  /** Connections the server or the network ended before the collection. */
  disconnects: number;
  errors: string[];
};

/** Connections opened at once: enough to be quick, few enough not to swamp the server. */
const CONNECT_CONCURRENCY = 10;
/** Handshakes tried per connection (each waits 10 s, live-client.ts). */
const CONNECT_ATTEMPTS = 5;

const sockets: Socket[] = [];
const checks: DeliveryCheck[] = [];
let disconnects = 0;
let retries = 0;
let collecting = false;
const errors: string[] = [];

/** One connection, tried again when the handshake times out (a loaded machine answers slowly). */
async function connectOnce(baseUrl: string, token: string): Promise<Socket> {
  for (let attempt = 1; ; attempt += 1) {
    try {
      return await connectLive(baseUrl, { token });
    } catch (error) {
      if (attempt >= CONNECT_ATTEMPTS) throw error;
      retries += 1;
    }
  }
}

async function connect(message: ConnectMessage) {
  let opened = 0;
  await Promise.all(
    Array.from({ length: CONNECT_CONCURRENCY }, async () => {
      while (opened < message.count) {
        opened += 1;
        const socket = await connectOnce(message.baseUrl, message.token);
        socket.on("disconnect", (reason) => {
          if (collecting) return;
          disconnects += 1;
          if (errors.length < 10) errors.push(`disconnected: ${reason}`);
        });
        sockets.push(socket);
      }
    }),
  );
  process.send!({ type: "connected", connections: sockets.length, retries } satisfies ConnectedMessage);
}

async function join(message: JoinMessage) {
  let next = 0;
  await Promise.all(
    Array.from({ length: CONNECT_CONCURRENCY }, async () => {
      while (next < message.runIds.length) {
        const index = next++;
        const runId = message.runIds[index]!;
        const check = new DeliveryCheck(runId, false);
        checks.push(check);
        // A client whose joins were all refused is reported with what it got (nothing): incomplete.
        await followRun(sockets[index]!, runId, check).catch((error: unknown) => {
          if (errors.length < 10) errors.push(String(error));
        });
      }
    }),
  );
  process.send!({ type: "joined", clients: checks.length } satisfies JoinedMessage);
}

async function collect(message: CollectMessage) {
  const deadline = Date.now() + message.timeoutMs;
  const whole = () =>
    checks.every((check) => check.report.bytes >= (message.expectedBytes[check.report.runId] ?? 0));
  while (!whole() && Date.now() < deadline) await new Promise((resolve) => setTimeout(resolve, 50));
  collecting = true;
  for (const socket of sockets) socket.close();
  process.send!({
    type: "reports",
    reports: checks.map((check) => check.finish()),
    disconnects,
    errors,
  } satisfies ReportsMessage);
}

process.on("message", (message: ConnectMessage | JoinMessage | CollectMessage) => {
  const handled =
    message.type === "connect"
      ? connect(message)
      : message.type === "join"
        ? join(message)
        : collect(message);
  handled.catch((error: unknown) => {
    console.error(error);
    process.exit(1);
  });
});
