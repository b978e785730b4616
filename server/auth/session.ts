import connectPgSimple from "connect-pg-simple";
import session from "express-session";
import type pg from "pg";
import type { ServerConfig } from "../config";

/** The session cookie's name; never `_session`, which the identity provider on the same host uses. */
export const SESSION_COOKIE = "sigmaflow.sid";

declare module "express-session" {
  interface SessionData {
    returnTo?: string;
  }
}

/** Sessions stored in PostgreSQL (table `sessions`, created by the migrations). */
export function sessionMiddleware(pool: pg.Pool, config: ServerConfig) {
  const PgStore = connectPgSimple(session);
  return session({
    name: SESSION_COOKIE,
    secret: config.session.secret,
    store: new PgStore({
      pool,
      tableName: "sessions",
      createTableIfMissing: false,
      pruneSessionInterval: 600,
    }),
    resave: false,
    saveUninitialized: false,
    rolling: true,
    proxy: config.trustProxyHops > 0,
    cookie: {
      httpOnly: true,
      sameSite: "lax",
      secure: config.secureCookies,
      maxAge: config.session.maxAgeMs,
      path: "/",
    },
  });
}
