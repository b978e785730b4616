/**
 * A process of live feed clients for bench/live/fanout.bench.ts (started with `fork`): it opens one
 * socket.io connection per client given (API token, as tests/integration/support/live-client.ts does),
 * each joining its run, checking what arrives as it arrives (DeliveryCheck) and acknowledging every chunk.
 * Asked to collect, it waits until each client holds its run's whole log (or the time is up) and sends
 * back one report per client.
 *
 * Messages from the parent: `{ type: "start", baseUrl, token, clients: [{ runId }] }`, then
 * `{ type: "collect", expectedBytes: { [runId]: bytes }, timeoutMs }`. To the parent:
 * `{ type: "joined", clients }`, then `{ type: "reports", reports, disconnects, errors }`.
 */
import type { Socket } from "socket.io-client";
import { connectLive } from "../../tests/integration/support/live-client";
import { DeliveryCheck, type DeliveryReport, followRun } from "./feed-support";

export type StartMessage = { type: "start"; baseUrl: string; token: string; clients: { runId: string }[] };
export type CollectMessage = { type: "collect"; expectedBytes: Record<string, number>; timeoutMs: number };
export type JoinedMessage = { type: "joined"; clients: number };
export type ReportsMessage = {
  type: "reports";
  reports: DeliveryReport[];
  /** Connections the server or the network ended before the collection. */
  disconnects: number;
  errors: string[];
};

/** Connections opened at once while starting: enough to be quick, few enough not to swamp the server. */
const CONNECT_CONCURRENCY = 20;

const sockets: Socket[] = [];
const checks: DeliveryCheck[] = [];
let disconnects = 0;
let collecting = false;
const errors: string[] = [];

async function start(message: StartMessage) {
  let next = 0;
  await Promise.all(
    Array.from({ length: CONNECT_CONCURRENCY }, async () => {
      while (next < message.clients.length) {
        const { runId } = message.clients[next++]!;
        const socket = await connectLive(message.baseUrl, { token: message.token });
        socket.on("disconnect", (reason) => {
          if (collecting) return;
          disconnects += 1;
          if (errors.length < 10) errors.push(`disconnected: ${reason}`);
        });
        const check = new DeliveryCheck(runId, false);
        sockets.push(socket);
        checks.push(check);
        await followRun(socket, runId, check);
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

process.on("message", (message: StartMessage | CollectMessage) => {
  const handled = message.type === "start" ? start(message) : collect(message);
  handled.catch((error: unknown) => {
    console.error(error);
    process.exit(1);
  });
});
