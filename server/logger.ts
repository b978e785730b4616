import pino from "pino";

/** Structured JSON logs. Secrets in headers never reach the log. */
export function createLogger(level: string) {
  return pino({
    level,
    base: { service: "sigmaflow-server" },
    redact: {
      paths: [
        "req.headers.authorization",
        "req.headers.cookie",
        "req.headers['x-csrf-token']",
        'res.headers["set-cookie"]',
      ],
      censor: "[redacted]",
    },
  });
}
export type Logger = ReturnType<typeof createLogger>;
