/**
 * Assembles the Express application: security headers, body limits, sessions, sign-in, CSRF, the API
 * routers under /api, one error shape, and the built client with a single-page fallback.
 */
import { existsSync } from "node:fs";
import path from "node:path";
import express from "express";
import helmet from "helmet";
import type pg from "pg";
import type PgBoss from "pg-boss";
import { pinoHttp } from "pino-http";
import { bearerAuth } from "./auth/bearer";
import { csrfProtection } from "./auth/csrf";
import { redactRequest } from "./auth/log-redaction";
import { configureSignIn } from "./auth/oidc";
import { sessionMiddleware } from "./auth/session";
import type { ServerConfig } from "./config";
import type { Database } from "./db/client";
import { errorHandler, notFoundRoute } from "./http/errors";
import type { Logger } from "./logger";
import type { Mailer } from "./mail/mailer";
import { allocationRoutes } from "./routes/allocations.routes";
import { auditRoutes } from "./routes/audit.routes";
import { authRoutes } from "./routes/auth.routes";
import { codeRoutes } from "./routes/codes.routes";
import type { RouteContext } from "./routes/context";
import { groupRoutes } from "./routes/groups.routes";
import { healthRoutes } from "./routes/health.routes";
import { hostAccountRoutes } from "./routes/host-accounts.routes";
import { hostRoutes } from "./routes/hosts.routes";
import { invitationRoutes } from "./routes/invitations.routes";
import { memberRoutes } from "./routes/members.routes";
import { recipeRoutes } from "./routes/recipes.routes";
import { resultRoutes } from "./routes/results.routes";
import { runPreviewRoutes } from "./routes/run-preview.routes";
import { runRoutes } from "./routes/runs.routes";
import { TARGET_WRITE_PATHS, targetRoutes } from "./routes/targets.routes";
import { tokenRoutes } from "./routes/tokens.routes";
import { userRoutes } from "./routes/users.routes";

export type AppDeps = {
  db: Database;
  pool: pg.Pool;
  boss: PgBoss;
  config: ServerConfig;
  mailer: Mailer;
  log: Logger;
};

/** Request bodies are small JSON documents; anything bigger is refused before parsing. */
export const JSON_BODY_LIMIT = "100kb";
/**
 * Target bodies may carry an XYZ file's text (at most MAX_XYZ_BYTES = 256 KiB, shared/schemas/targets.ts),
 * which grows when escaped in JSON (a newline is two bytes); larger XYZ text within this limit gets a 422
 * naming the limit, a larger body a 413.
 */
export const TARGET_JSON_BODY_LIMIT = "640kb";

/**
 * Run submissions, previews and resubmissions may carry extra input files (at most 384 KiB decoded,
 * shared/schemas/run-extra-files.ts), which base64 makes 512 KiB of JSON text; a larger body is a 413.
 */
export const RUN_JSON_BODY_LIMIT = "640kb";
const RUN_WRITE_PATHS = ["/groups/:groupId/runs", "/groups/:groupId/runs/preview", "/runs/:runId/resubmit"];

const utf8 = new TextDecoder("utf-8", { fatal: true });

/** body-parser would decode invalid UTF-8 into U+FFFD and store it; refuse such bodies instead. */
function requireUtf8(_req: unknown, _res: unknown, buffer: Buffer): void {
  try {
    utf8.decode(buffer);
  } catch {
    throw Object.assign(new Error("The request body is not valid UTF-8."), {
      type: "encoding.invalid",
      status: 400,
    });
  }
}

export function createApp(deps: AppDeps) {
  const { config, log } = deps;
  const app = express();
  app.disable("x-powered-by");
  app.set("trust proxy", config.trustProxyHops);

  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          "default-src": ["'self'"],
          "connect-src": ["'self'", "ws:", "wss:"],
          "img-src": ["'self'", "data:"],
          "font-src": ["'self'", "data:"],
          "style-src": ["'self'", "'unsafe-inline'"],
          "form-action": ["'self'", config.oidc.issuer],
          "upgrade-insecure-requests": config.secureCookies ? [] : null,
        },
      },
      strictTransportSecurity: config.secureCookies,
    }),
  );
  app.use(
    pinoHttp({
      logger: log,
      serializers: { req: redactRequest },
      autoLogging: { ignore: (req) => req.url === "/api/health" },
    }),
  );

  const signIn = configureSignIn(deps.db, config.oidc, log);
  const api = express.Router();
  // Parsed first: the general parser below skips a body that is already parsed.
  api.use(
    TARGET_WRITE_PATHS,
    express.json({ limit: TARGET_JSON_BODY_LIMIT, strict: true, verify: requireUtf8 }),
  );
  api.use(RUN_WRITE_PATHS, express.json({ limit: RUN_JSON_BODY_LIMIT, strict: true, verify: requireUtf8 }));
  api.use(express.json({ limit: JSON_BODY_LIMIT, strict: true, verify: requireUtf8 }));
  api.use(sessionMiddleware(deps.pool, config));
  api.use(signIn.passport.session());
  api.use(bearerAuth(deps.db));
  api.use(csrfProtection);

  const ctx: RouteContext = {
    db: deps.db,
    pool: deps.pool,
    boss: deps.boss,
    config,
    mailer: deps.mailer,
    log,
  };
  api.use(healthRoutes(ctx));
  api.use(authRoutes(ctx, signIn));
  api.use(groupRoutes(ctx));
  api.use(memberRoutes(ctx));
  api.use(invitationRoutes(ctx));
  api.use(auditRoutes(ctx));
  api.use(tokenRoutes(ctx));
  api.use(userRoutes(ctx));
  api.use(hostRoutes(ctx));
  api.use(hostAccountRoutes(ctx));
  api.use(codeRoutes(ctx));
  api.use(recipeRoutes(ctx));
  api.use(targetRoutes(ctx));
  api.use(allocationRoutes(ctx));
  api.use(runPreviewRoutes(ctx));
  api.use(runRoutes(ctx));
  api.use(resultRoutes(ctx));
  api.use(notFoundRoute);
  api.use(errorHandler(log));
  app.use("/api", api);

  const clientDir = path.resolve(config.clientDistDir);
  if (existsSync(path.join(clientDir, "index.html"))) {
    app.use(express.static(clientDir, { index: false, maxAge: "1h" }));
    app.get("/{*path}", (_req, res) => res.sendFile(path.join(clientDir, "index.html")));
  }
  app.use(errorHandler(log));
  return app;
}
