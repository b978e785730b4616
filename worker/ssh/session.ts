/**
 * The operations a run step performs on one target: exec of a fixed, quoted argv, and file transfer over
 * the connection's persistent SFTP channel. A session is a cheap handle; connections belong to the pool.
 */
import { constants as osConstants } from "node:os";
import type { ClientChannel, SFTPWrapper } from "ssh2";
import { retryChannelOpen } from "./channel-retry";
import type { SshTarget } from "./connection";
import { classifySshError, RemoteCommandError, TransportError } from "./errors";
import type { SshPool } from "./pool";
import { commandLine } from "./quote";
import { openRemoteStream, type RemoteStream, type RemoteStreamHandlers } from "./remote-stream";
import {
  chmodPath,
  fastPut,
  mkdirPath,
  type RemoteStat,
  readRange,
  readWhole,
  realPath,
  statPath,
  type WriteOptions,
  writeWhole,
} from "./sftp-ops";

export type ExecOptions = {
  stdin?: Buffer | string;
  /** Gives up (TransportError "command-timeout") and closes the channel; the remote process may outlive it. */
  timeoutMs?: number;
  /** Output beyond this (stdout + stderr) aborts the command: a runaway command must not fill the worker's memory. */
  maxOutputBytes?: number;
};

export type ExecResult = {
  /** Exit status; for a command killed by a signal, 128 + the signal's number, as a shell reports it. */
  code: number;
  signal: string | null;
  stdout: Buffer;
  stderr: Buffer;
};

export type PutOptions = { concurrency?: number; chunkSizeBytes?: number; mode?: number };

export interface RemoteSession {
  readonly target: SshTarget;
  /** Runs argv (quoted into one command line); never throws for a non-zero exit, only for transport loss. */
  exec(argv: string[], options?: ExecOptions): Promise<ExecResult>;
  /**
   * Starts argv with its output handed to `handlers` as it comes, on a channel slot that is spare beyond
   * `spareSlots`; null when none is free now (the caller falls back to something cheaper).
   */
  openStream(
    argv: string[],
    handlers: RemoteStreamHandlers,
    options: { spareSlots: number },
  ): Promise<RemoteStream | null>;
  /** Runs argv and returns stdout as UTF-8; a non-zero exit throws RemoteCommandError. */
  run(argv: string[], options?: ExecOptions): Promise<string>;
  writeFile(remotePath: string, content: Buffer, options?: WriteOptions): Promise<void>;
  putFile(localPath: string, remotePath: string, options?: PutOptions): Promise<void>;
  /** Reads a whole file; RemoteFileError("too-large") when it exceeds maxBytes, ("missing") when absent. */
  readFile(remotePath: string, maxBytes: number): Promise<Buffer>;
  /** Up to maxBytes from byte offsetBytes on (fewer at the end); null when the file does not exist. */
  readRange(remotePath: string, offsetBytes: number, maxBytes: number): Promise<Buffer | null>;
  /** Follows links; null when nothing is at the path. */
  stat(remotePath: string): Promise<RemoteStat | null>;
  /** Does not follow a final link; null when nothing is at the path. */
  lstat(remotePath: string): Promise<RemoteStat | null>;
  /** Creates one folder with `mode`; false when something already exists at the path. */
  mkdir(remotePath: string, mode: number): Promise<boolean>;
  chmod(remotePath: string, mode: number): Promise<void>;
  /** The canonical absolute path with every symbolic link resolved; relative paths start at the login folder. */
  realpath(remotePath: string): Promise<string>;
}

const DEFAULT_MAX_OUTPUT_BYTES = 64 * 1024 * 1024;

/**
 * SFTP fastPut tuning, measured with bench/ssh/staging.bench.ts on loopback: WRITE requests as large as
 * the server accepts (OpenSSH announces 261120 bytes through limits@openssh.com; ssh2 assumes ~32 KB for
 * others) with about 2 MiB in flight, ssh2's channel window. ssh2's own defaults (32 KiB × 64) spend
 * noticeably more CPU per byte on request framing against OpenSSH.
 */
export const PUT_DEFAULTS = { chunkSizeBytes: 261_120, bytesInFlight: 2 * 1024 * 1024 } as const;

/** ssh2 keeps the negotiated WRITE limit in a private field (pinned ssh2 1.17.0); 32 KB if it is absent. */
function maxWriteBytes(sftp: SFTPWrapper): number {
  const limit = (sftp as unknown as { _maxWriteLen?: unknown })._maxWriteLen;
  return typeof limit === "number" && limit > 0 ? limit : 32 * 1024;
}

function exitCodeOf(code: number | null | undefined, signal: string | null): number {
  if (typeof code === "number") return code;
  const signalNumber = signal
    ? (osConstants.signals as Record<string, number | undefined>)[`SIG${signal}`]
    : undefined;
  return 128 + (signalNumber ?? 127);
}

export class RemoteSessionImpl implements RemoteSession {
  constructor(
    private readonly pool: SshPool,
    readonly target: SshTarget,
  ) {}

  async exec(argv: string[], options: ExecOptions = {}): Promise<ExecResult> {
    const command = commandLine(argv);
    return retryChannelOpen(() => this.execOnce(command, options));
  }

  openStream(
    argv: string[],
    handlers: RemoteStreamHandlers,
    options: { spareSlots: number },
  ): Promise<RemoteStream | null> {
    return openRemoteStream(this.pool, this.target, commandLine(argv), handlers, options.spareSlots);
  }

  private async execOnce(command: string, options: ExecOptions): Promise<ExecResult> {
    const lease = await this.pool.leaseChannel(this.target);
    const { connection } = lease;
    const maxOutputBytes = options.maxOutputBytes ?? DEFAULT_MAX_OUTPUT_BYTES;

    return new Promise<ExecResult>((resolve, reject) => {
      const stdout: Buffer[] = [];
      const stderr: Buffer[] = [];
      let outputBytes = 0;
      let exitCode: number | null | undefined;
      let exitSignal: string | null = null;
      let sawExit = false;
      let channel: ClientChannel | null = null;
      let settled = false;
      let timer: NodeJS.Timeout | null = null;
      let untrack = () => {};

      const settle = (action: () => void) => {
        if (settled) return;
        settled = true;
        if (timer) clearTimeout(timer);
        untrack();
        action();
      };
      const abandon = (error: Error) => {
        settle(() => reject(error));
        // The slot is free once the channel is closed on both sides ("close" below releases it).
        if (channel) channel.close();
        else lease.release();
      };
      untrack = connection.track((error) => {
        settle(() => reject(error));
        lease.release();
      });
      if (options.timeoutMs !== undefined) {
        timer = setTimeout(
          () =>
            abandon(
              new TransportError("command-timeout", `no exit within ${options.timeoutMs} ms: ${command}`),
            ),
          options.timeoutMs,
        );
      }
      const collect = (into: Buffer[]) => (chunk: Buffer) => {
        outputBytes += chunk.length;
        if (outputBytes > maxOutputBytes) {
          abandon(
            new RemoteCommandError(command, -1, "", `output exceeded ${maxOutputBytes} bytes: ${command}`),
          );
          return;
        }
        into.push(chunk);
      };

      try {
        connection.client.exec(command, (error, stream) => {
          if (error) {
            settle(() => reject(classifySshError(error)));
            lease.release();
            return;
          }
          channel = stream;
          stream.on("data", collect(stdout));
          stream.stderr.on("data", collect(stderr));
          stream.on("error", (streamError: Error) => abandon(classifySshError(streamError)));
          stream.stderr.on("error", () => {});
          stream.on("exit", (code: number | null, signal?: string) => {
            sawExit = true;
            exitCode = code;
            exitSignal = signal ?? null;
          });
          stream.on("close", () => {
            lease.release();
            settle(() => {
              if (!sawExit) {
                reject(new TransportError("closed", `channel closed without an exit status: ${command}`));
                return;
              }
              resolve({
                code: exitCodeOf(exitCode, exitSignal),
                signal: exitSignal,
                stdout: Buffer.concat(stdout),
                stderr: Buffer.concat(stderr),
              });
            });
          });
          if (settled) {
            stream.close();
            return;
          }
          if (options.stdin !== undefined) stream.end(options.stdin);
          else stream.end();
        });
      } catch (error) {
        // ssh2 throws "Not connected" synchronously when the connection died a moment ago.
        settle(() => reject(classifySshError(error)));
        lease.release();
      }
    });
  }

  async run(argv: string[], options?: ExecOptions): Promise<string> {
    const result = await this.exec(argv, options);
    if (result.code !== 0) throw new RemoteCommandError(commandLine(argv), result.code, result.stderr);
    return result.stdout.toString("utf8");
  }

  writeFile(remotePath: string, content: Buffer, options?: WriteOptions): Promise<void> {
    return this.pool.withSftp(this.target, (sftp) => writeWhole(sftp, remotePath, content, options));
  }

  putFile(localPath: string, remotePath: string, options: PutOptions = {}): Promise<void> {
    return this.pool.withSftp(this.target, (sftp) => {
      // A chunk above the server's limit would be split by ssh2 into pieces sent one after another.
      const chunkSize = Math.min(options.chunkSizeBytes ?? PUT_DEFAULTS.chunkSizeBytes, maxWriteBytes(sftp));
      const concurrency =
        options.concurrency ?? Math.max(1, Math.ceil(PUT_DEFAULTS.bytesInFlight / chunkSize));
      return fastPut(sftp, localPath, remotePath, { concurrency, chunkSize, mode: options.mode ?? 0o600 });
    });
  }

  readFile(remotePath: string, maxBytes: number): Promise<Buffer> {
    return this.pool.withSftp(this.target, (sftp) => readWhole(sftp, remotePath, maxBytes));
  }

  readRange(remotePath: string, offsetBytes: number, maxBytes: number): Promise<Buffer | null> {
    return this.pool.withSftp(this.target, (sftp) => readRange(sftp, remotePath, offsetBytes, maxBytes));
  }

  stat(remotePath: string): Promise<RemoteStat | null> {
    return this.pool.withSftp(this.target, (sftp) => statPath(sftp, remotePath, true));
  }

  lstat(remotePath: string): Promise<RemoteStat | null> {
    return this.pool.withSftp(this.target, (sftp) => statPath(sftp, remotePath, false));
  }

  mkdir(remotePath: string, mode: number): Promise<boolean> {
    return this.pool.withSftp(this.target, (sftp) => mkdirPath(sftp, remotePath, mode));
  }

  chmod(remotePath: string, mode: number): Promise<void> {
    return this.pool.withSftp(this.target, (sftp) => chmodPath(sftp, remotePath, mode));
  }

  realpath(remotePath: string): Promise<string> {
    return this.pool.withSftp(this.target, (sftp) => realPath(sftp, remotePath));
  }
}
