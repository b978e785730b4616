/**
 * Server configuration from environment variables, parsed once at start. A wrong value stops the start
 * with a message naming the variable. DEVELOPERS.md lists every variable.
 */
import { z } from "zod";

const port = z.coerce.number().int().min(1).max(65535);

const envSchema = z.object({
  NODE_ENV: z.enum(["development", "test", "production"]).default("development"),
  SIGMAFLOW_HOST: z.string().default("127.0.0.1"),
  SIGMAFLOW_PORT: port.default(5180),
  /** The URL people open; links in e-mails and the sign-in callback are built from it. */
  SIGMAFLOW_PUBLIC_URL: z.url().optional(),
  DATABASE_URL: z.string().min(1),
  SESSION_SECRET: z.string().min(32, { error: "SESSION_SECRET needs at least 32 characters" }),
  /** Encrypts host private keys at rest (AES-256-GCM with a key derived by HKDF-SHA256). */
  SIGMAFLOW_SECRETS_KEY: z.string().min(32, { error: "SIGMAFLOW_SECRETS_KEY needs at least 32 characters" }),
  SESSION_MAX_AGE_HOURS: z.coerce.number().positive().default(12),
  /** Number of reverse proxies in front of the server whose X-Forwarded-* headers are trusted. */
  TRUST_PROXY_HOPS: z.coerce.number().int().min(0).default(0),
  OIDC_ISSUER: z.string().min(1),
  /** Endpoint overrides; unset ones come from the issuer's discovery document. */
  OIDC_AUTHORIZATION_URL: z.url().optional(),
  OIDC_TOKEN_URL: z.url().optional(),
  OIDC_USERINFO_URL: z.url().optional(),
  OIDC_CLIENT_ID: z.string().min(1),
  OIDC_CLIENT_SECRET: z.string().min(1),
  OIDC_SCOPE: z.string().default("openid email profile"),
  /** Sign-in attempts allowed per client address per minute. */
  AUTH_RATE_LIMIT_PER_MINUTE: z.coerce.number().int().positive().default(30),
  SMTP_HOST: z.string().default("127.0.0.1"),
  SMTP_PORT: port.default(5182),
  SMTP_SECURE: z.stringbool().default(false),
  SMTP_USER: z.string().optional(),
  SMTP_PASSWORD: z.string().optional(),
  MAIL_FROM: z.string().default("Sigmaflow <no-reply@sigmaflow.local>"),
  INVITATION_TTL_DAYS: z.coerce.number().int().positive().default(14),
  /** Folder of the built client (vite build); served with a single-page fallback when present. */
  CLIENT_DIST_DIR: z.string().default("dist/client"),
  LOG_LEVEL: z.enum(["fatal", "error", "warn", "info", "debug", "trace", "silent"]).default("info"),
});

export type ServerConfig = ReturnType<typeof loadConfig>;

/** The requested scopes, each once, `openid` first (an OpenID Connect request must carry it). */
export function oidcScope(value: string): string[] {
  return [...new Set(["openid", ...value.split(/\s+/).filter(Boolean)])];
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env) {
  const parsed = envSchema.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((issue) => `  ${issue.path.join(".")}: ${issue.message}`);
    throw new Error(`Invalid Sigmaflow server configuration:\n${lines.join("\n")}`);
  }
  const e = parsed.data;
  const publicUrl = (e.SIGMAFLOW_PUBLIC_URL ?? `http://${e.SIGMAFLOW_HOST}:${e.SIGMAFLOW_PORT}`).replace(
    /\/$/,
    "",
  );
  const issuer = e.OIDC_ISSUER.replace(/\/$/, "");
  return {
    env: e.NODE_ENV,
    host: e.SIGMAFLOW_HOST,
    port: e.SIGMAFLOW_PORT,
    publicUrl,
    secureCookies: publicUrl.startsWith("https://"),
    trustProxyHops: e.TRUST_PROXY_HOPS,
    databaseUrl: e.DATABASE_URL,
    secretsKey: e.SIGMAFLOW_SECRETS_KEY,
    session: { secret: e.SESSION_SECRET, maxAgeMs: e.SESSION_MAX_AGE_HOURS * 3_600_000 },
    oidc: {
      issuer,
      endpointOverrides: {
        authorizationURL: e.OIDC_AUTHORIZATION_URL,
        tokenURL: e.OIDC_TOKEN_URL,
        userInfoURL: e.OIDC_USERINFO_URL,
      },
      clientID: e.OIDC_CLIENT_ID,
      clientSecret: e.OIDC_CLIENT_SECRET,
      callbackURL: `${publicUrl}/api/auth/callback`,
      scope: oidcScope(e.OIDC_SCOPE),
    },
    authRateLimitPerMinute: e.AUTH_RATE_LIMIT_PER_MINUTE,
    smtp: {
      host: e.SMTP_HOST,
      port: e.SMTP_PORT,
      secure: e.SMTP_SECURE,
      auth: e.SMTP_USER ? { user: e.SMTP_USER, pass: e.SMTP_PASSWORD ?? "" } : undefined,
      from: e.MAIL_FROM,
    },
    invitationTtlDays: e.INVITATION_TTL_DAYS,
    clientDistDir: e.CLIENT_DIST_DIR,
    logLevel: e.LOG_LEVEL,
  };
}
