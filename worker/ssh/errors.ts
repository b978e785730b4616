/**
 * The worker's SSH failures, split by what a run step should do next: a `TransportError` means "hold the
 * run and retry with backoff" (the host or the network may come back); everything else needs a person or
 * marks the run failed, because repeating the same request would meet the same answer.
 */

/** Base of every error this layer raises; `retryable` is what the step's retry policy reads. */
export abstract class SshError extends Error {
  abstract readonly retryable: boolean;
}

export type TransportFailure =
  | "refused"
  | "timeout"
  | "reset"
  | "dns"
  | "handshake"
  | "keepalive"
  | "channel"
  | "closed"
  | "command-timeout"
  | "unknown";

/** The connection could not be made, or was lost: refused, timed out, reset, handshake, keepalive, channel open. */
export class TransportError extends SshError {
  readonly retryable = true;
  override readonly name = "TransportError";
  constructor(
    readonly failure: TransportFailure,
    message: string,
    options?: { cause?: unknown },
  ) {
    super(message, options);
  }
}

/** The host presented a key other than the pinned one: possibly an impostor, never retried automatically. */
export class HostKeyMismatchError extends SshError {
  readonly retryable = false;
  override readonly name = "HostKeyMismatchError";
  constructor(
    readonly expectedFingerprint: string,
    readonly actualFingerprint: string,
  ) {
    super(`host key mismatch: expected ${expectedFingerprint}, host presented ${actualFingerprint}`);
  }
}

/**
 * The pinned host key was replaced (refreshed) but no admin has confirmed it yet: Sigmaflow does not
 * connect with a key nobody vouched for, so the run waits for a person.
 */
export class HostKeyUnconfirmedError extends SshError {
  readonly retryable = false;
  override readonly name = "HostKeyUnconfirmedError";
  constructor(readonly hostName: string) {
    super(`the host key of ${hostName} waits for an admin's confirmation`);
  }
}

/** The host refused our key (wrong account key, locked account): needs a person, not a retry. */
export class AuthenticationError extends SshError {
  readonly retryable = false;
  override readonly name = "AuthenticationError";
}

/** Longest stderr excerpt kept in an error: enough for a message, bounded for logs and database rows. */
export const STDERR_EXCERPT_BYTES = 2000;

export function excerpt(output: Buffer | string, maxBytes = STDERR_EXCERPT_BYTES): string {
  const text = Buffer.isBuffer(output) ? output.toString("utf8") : output;
  const trimmed = text.trim();
  return trimmed.length > maxBytes ? `${trimmed.slice(0, maxBytes)}…` : trimmed;
}

/** A remote command ran and exited non-zero. */
export class RemoteCommandError extends SshError {
  readonly retryable = false;
  override readonly name = "RemoteCommandError";
  readonly stderrExcerpt: string;
  constructor(
    readonly command: string,
    readonly exitCode: number,
    stderr: Buffer | string,
    message?: string,
  ) {
    const stderrExcerpt = excerpt(stderr);
    super(
      message ?? `remote command exited ${exitCode}: ${command}${stderrExcerpt ? ` — ${stderrExcerpt}` : ""}`,
    );
    this.stderrExcerpt = stderrExcerpt;
  }
}

/** A path that would leave the run folder, or a run folder reached through a planted symbolic link. */
export class RemotePathError extends SshError {
  readonly retryable = false;
  override readonly name = "RemotePathError";
  constructor(
    readonly path: string,
    readonly reason: string,
  ) {
    super(`${path}: ${reason}`);
  }
}

/**
 * An SFTP request answered with a status (no such file, permission denied…), a file over its size limit,
 * or a staged file whose sha256 on the host differs from what was sent.
 */
export class RemoteFileError extends SshError {
  readonly retryable = false;
  override readonly name = "RemoteFileError";
  constructor(
    readonly path: string,
    readonly reason: "missing" | "permission" | "too-large" | "mismatch" | "failure",
    message: string,
    options?: { cause?: unknown },
  ) {
    super(`${path}: ${message}`, options);
  }
}

type SshLikeError = Error & { code?: unknown; level?: unknown; reason?: unknown };

const REFUSED_CODES = new Set(["ECONNREFUSED", "EHOSTUNREACH", "ENETUNREACH", "EHOSTDOWN", "EADDRNOTAVAIL"]);
const RESET_CODES = new Set(["ECONNRESET", "EPIPE", "ECONNABORTED", "ERR_STREAM_DESTROYED"]);

/**
 * Maps an error from ssh2 or the socket under it onto this layer's classes. Errors already classified
 * pass through; anything unrecognised from the connection is a TransportError("unknown"), since retrying a
 * connection-level fault is the safe default. Host-key mismatches are detected where the key is seen
 * (the pool's hostVerifier), not from ssh2's generic "Host denied" message.
 */
export function classifySshError(err: unknown): SshError {
  if (err instanceof SshError) return err;
  const error: SshLikeError = err instanceof Error ? err : new Error(String(err));
  const code = typeof error.code === "string" ? error.code : "";
  const level = typeof error.level === "string" ? error.level : "";
  const message = error.message;
  const cause = { cause: error };

  if (level === "client-authentication" || message.includes("authentication methods failed")) {
    return new AuthenticationError(`authentication refused: ${message}`, cause);
  }
  if (REFUSED_CODES.has(code)) return new TransportError("refused", `connection refused: ${message}`, cause);
  if (code === "ETIMEDOUT") return new TransportError("timeout", `connection timed out: ${message}`, cause);
  if (code === "ENOTFOUND" || code === "EAI_AGAIN" || level === "client-dns") {
    return new TransportError("dns", `host name lookup failed: ${message}`, cause);
  }
  if (RESET_CODES.has(code)) return new TransportError("reset", `connection reset: ${message}`, cause);
  if (message.includes("Keepalive timeout")) return new TransportError("keepalive", message, cause);
  if (message.includes("waiting for handshake")) return new TransportError("timeout", message, cause);
  if (message.includes("Channel open failure") || message.includes("No free channels")) {
    return new TransportError("channel", message, cause);
  }
  if (level === "handshake" || level === "protocol") {
    return new TransportError("handshake", `SSH handshake failed: ${message}`, cause);
  }
  if (
    message.includes("No response from server") ||
    message.includes("Not connected") ||
    message.includes("Channel is not open")
  ) {
    return new TransportError("closed", `connection closed: ${message}`, cause);
  }
  return new TransportError("unknown", message, cause);
}
