/**
 * One SSH connection of the pool: opened with the pinned host key checked during key exchange, ready
 * once authenticated, dead for good after any error or close. Operations in flight register an abort
 * callback so that a dropped connection fails them at once with a TransportError instead of leaving them
 * waiting for answers that will never come.
 */
import { createHash } from "node:crypto";
import { Client, type SFTPWrapper } from "ssh2";
import {
  fingerprintOfBlob,
  hostKeyAlgorithmsFor,
  parsePublicKeyLine,
} from "../../server/crypto/ssh-public-keys";
import {
  AuthenticationError,
  classifySshError,
  HostKeyMismatchError,
  type SshError,
  TransportError,
} from "./errors";

export type SshTarget = {
  /** Pool key, e.g. "<hostId>:<accountId>": connections are shared by operations with the same key. */
  key: string;
  address: string;
  port: number;
  username: string;
  /** OpenSSH PEM private key. */
  privateKey: string;
  /** The host's public key line, "ssh-ed25519 AAAA…": any other key is refused. */
  pinnedHostKey: string;
};

export type ConnectionTimings = {
  keepaliveIntervalMs: number;
  keepaliveCountMax: number;
  readyTimeoutMs: number;
};

/** What identifies the far end and our credentials: a target whose key keeps its name but changes these is a new target. */
export function targetSignature(target: SshTarget): string {
  return createHash("sha256")
    .update(
      [target.address, String(target.port), target.username, target.pinnedHostKey, target.privateKey].join(
        "\0",
      ),
    )
    .digest("hex");
}

let nextConnectionId = 1;

export class PooledConnection {
  readonly id = nextConnectionId++;
  readonly client = new Client();
  readonly ready: Promise<void>;
  state: "connecting" | "ready" | "dead" = "connecting";
  /** Exec channels leased out now. */
  execChannels = 0;
  /** The persistent SFTP channel (opening or open), which holds one channel slot while it exists. */
  sftp: Promise<SFTPWrapper> | null = null;
  /** SFTP operations in flight on that channel. */
  sftpOperations = 0;
  /** Set when the pool stops handing this connection out (its target changed); closed once idle. */
  retiring = false;
  idleTimer: NodeJS.Timeout | null = null;
  deathError: SshError | null = null;
  private readonly aborts = new Set<(error: SshError) => void>();
  private readonly deathListeners: Array<(connection: PooledConnection) => void> = [];
  private hostKeyError: HostKeyMismatchError | null = null;

  constructor(
    readonly target: SshTarget,
    readonly signature: string,
    timings: ConnectionTimings,
  ) {
    const pinned = parsePublicKeyLine(target.pinnedHostKey);
    this.ready = new Promise<void>((resolve, reject) => {
      this.client.once("ready", () => {
        if (this.state === "dead") return;
        this.state = "ready";
        resolve();
      });
      this.onDeath(() => reject(this.deathError));
    });
    // The ready promise may be awaited by nobody (an idle connection that dies): never an unhandled rejection.
    this.ready.catch(() => {});
    // Permanent handlers: ssh2 emits "error" for socket resets and keepalive timeouts; an unhandled
    // "error" event would end the worker process.
    this.client.on("error", (error: Error) => this.die(this.hostKeyError ?? classifySshError(error)));
    this.client.on("close", () =>
      this.die(new TransportError("closed", `connection to ${this.describe()} closed`)),
    );
    this.client.on("end", () =>
      this.die(new TransportError("closed", `connection to ${this.describe()} ended`)),
    );
    try {
      this.client.connect({
        host: target.address,
        port: target.port,
        username: target.username,
        privateKey: target.privateKey,
        readyTimeout: timings.readyTimeoutMs,
        keepaliveInterval: timings.keepaliveIntervalMs,
        keepaliveCountMax: timings.keepaliveCountMax,
        algorithms: { serverHostKey: hostKeyAlgorithmsFor(pinned.type) },
        hostVerifier: (presented: Buffer) => {
          if (presented.equals(pinned.blob)) return true;
          this.hostKeyError = new HostKeyMismatchError(
            fingerprintOfBlob(pinned.blob),
            fingerprintOfBlob(presented),
          );
          return false;
        },
      });
      // Commands are request/response exchanges of small packets: without TCP_NODELAY, Nagle's algorithm
      // holds a write behind the peer's delayed ACK (up to ~40 ms on Linux) on every exec.
      this.client.setNoDelay(true);
    } catch (error) {
      // ssh2 throws synchronously for an unusable private key: a configuration fault, not a network one.
      const message = error instanceof Error ? error.message : String(error);
      queueMicrotask(() => this.die(new AuthenticationError(`cannot use the account key: ${message}`)));
    }
  }

  describe(): string {
    return `${this.target.username}@${this.target.address}:${this.target.port}`;
  }

  get channelsInUse(): number {
    return this.execChannels + (this.sftp ? 1 : 0);
  }

  get busy(): boolean {
    return this.execChannels > 0 || this.sftpOperations > 0;
  }

  /**
   * Registers an operation's abort; returns the function that unregisters it. If the connection is
   * already dead the abort runs at once.
   */
  track(abort: (error: SshError) => void): () => void {
    if (this.state === "dead") {
      abort(this.deathError ?? new TransportError("closed", `connection to ${this.describe()} is closed`));
      return () => {};
    }
    this.aborts.add(abort);
    return () => this.aborts.delete(abort);
  }

  onDeath(listener: (connection: PooledConnection) => void): void {
    if (this.state === "dead") listener(this);
    else this.deathListeners.push(listener);
  }

  die(error: SshError): void {
    if (this.state === "dead") return;
    this.state = "dead";
    this.deathError = error;
    if (this.idleTimer) clearTimeout(this.idleTimer);
    this.idleTimer = null;
    for (const abort of [...this.aborts]) abort(error);
    this.aborts.clear();
    for (const listener of this.deathListeners.splice(0)) listener(this);
    this.client.destroy();
  }

  close(): void {
    this.die(new TransportError("closed", `connection to ${this.describe()} closed by the pool`));
  }
}
