/**
 * The real Express app on an ephemeral port, backed by a test database. Mail goes to an in-memory
 * recording transport (the relay is the one external part faked here); the identity provider settings
 * point at `oidcIssuer` so sign-in tests can start the development provider beside it.
 */

import { createServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { createApp } from "../../../server/app";
import { loadConfig } from "../../../server/config";
import { createLogger, type Logger } from "../../../server/logger";
import type { Mailer, OutgoingMail } from "../../../server/mail/mailer";
import { createBoss, createRunQueues } from "../../../server/queue/queues";
import { attachLiveFeed, type LiveFeedOptions } from "../../../server/realtime/live-server";
import type { TestDatabase } from "./test-database";

export type RecordingMailer = Mailer & { sent: OutgoingMail[]; failNext: boolean };

export function recordingMailer(): RecordingMailer {
  const mailer: RecordingMailer = {
    sent: [],
    failNext: false,
    async send(mail) {
      if (mailer.failNext) {
        mailer.failNext = false;
        throw new Error("relay refused the message");
      }
      mailer.sent.push(mail);
    },
    close() {},
  };
  return mailer;
}

export async function startTestApp(
  database: TestDatabase,
  options: {
    oidcIssuer?: string;
    port?: number;
    env?: Record<string, string>;
    log?: Logger;
    /** Settings of the live feed (socket.io at /api/live), e.g. a small send budget. */
    live?: LiveFeedOptions;
  } = {},
) {
  const server: Server = createServer();
  await new Promise<void>((resolve) => server.listen(options.port ?? 0, "127.0.0.1", resolve));
  const port = (server.address() as AddressInfo).port;
  const config = loadConfig({
    NODE_ENV: "test",
    SIGMAFLOW_PORT: String(port),
    DATABASE_URL: database.url,
    SESSION_SECRET: "integration-test-session-secret-0123456789abcdef",
    SIGMAFLOW_SECRETS_KEY: "integration-test-secrets-key-0123456789abcdef",
    OIDC_ISSUER: options.oidcIssuer ?? "http://127.0.0.1:9",
    OIDC_CLIENT_ID: "sigmaflow-test",
    OIDC_CLIENT_SECRET: "sigmaflow-test-secret",
    AUTH_RATE_LIMIT_PER_MINUTE: "1000",
    CLIENT_DIST_DIR: "/nonexistent",
    LOG_LEVEL: "silent",
    ...options.env,
  });
  const mailer = recordingMailer();
  const boss = createBoss(database.url, { maintenance: false });
  await boss.start();
  await createRunQueues(boss);
  const log = options.log ?? createLogger("silent");
  const app = createApp({ db: database.db, pool: database.pool, boss, config, mailer, log });
  server.on("request", app);
  // After the app, as in server/index.ts; tests start once the feed listens, so no notice is missed.
  const live = attachLiveFeed(server, { db: database.db, pool: database.pool, config, log }, options.live);
  await live.ready;
  return {
    baseUrl: `http://127.0.0.1:${port}`,
    config,
    mailer,
    boss,
    live,
    close: async () => {
      await live.close();
      await new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      });
      await boss.stop({ graceful: false, wait: true });
    },
  };
}
