/** Starts the Sigmaflow server: `node --import tsx server/index.ts` (deploy/start.sh does it for you). */
import { createServer } from "node:http";
import { createApp } from "./app";
import { loadConfig } from "./config";
import { createDatabase } from "./db/client";
import { applyMigrations } from "./db/migrate";
import { createLogger } from "./logger";
import { createMailer } from "./mail/mailer";
import { createBoss, createRunQueues } from "./queue/queues";
import { attachLiveFeed } from "./realtime/live-server";

const config = loadConfig();
const log = createLogger(config.logLevel);
await applyMigrations(config.databaseUrl);
const { db, pool } = createDatabase(config.databaseUrl);
const mailer = createMailer(config.smtp);
// The server only enqueues; maintenance (expiry, archiving) is the worker's job.
const boss = createBoss(config.databaseUrl, { maintenance: false });
boss.on("error", (error) => log.error({ err: error }, "queue error"));
await boss.start();
await createRunQueues(boss);
const app = createApp({ db, pool, boss, config, mailer, log });
const server = createServer(app);
// After the app: socket.io serves its own path and passes every other request to the app.
const live = attachLiveFeed(server, { db, pool, config, log });

server.listen(config.port, config.host, () => {
  log.info({ url: config.publicUrl }, `Sigmaflow server listening on ${config.publicUrl}`);
});

let stopping = false;
async function shutdown(signal: string) {
  if (stopping) return;
  stopping = true;
  log.info({ signal }, "shutting down");
  await live.close();
  server.close();
  server.closeAllConnections();
  mailer.close();
  await boss.stop({ graceful: true, timeout: 5_000 }).catch(() => {});
  await pool.end().catch(() => {});
  process.exit(0);
}
process.on("SIGINT", () => void shutdown("SIGINT"));
process.on("SIGTERM", () => void shutdown("SIGTERM"));
