/**
 * A remote command whose output is wanted as it comes (a followed log), on an exec channel of its own.
 * Its slot is taken only when it is spare (SshPool.tryLeaseChannel), so followed logs never keep run
 * steps waiting for a channel. Ending our side of the channel closes the command's standard input; the
 * command is expected to exit on that (see worker/logs/log-follower.ts).
 */
import type { ClientChannel } from "ssh2";
import type { SshTarget } from "./connection";
import { classifySshError, TransportError } from "./errors";
import type { SshPool } from "./pool";

export type RemoteStreamEnd = { code: number | null; error: Error | null; stderr: string };

export type RemoteStreamHandlers = {
  onData: (bytes: Buffer) => void;
  /** Called once, when the channel has closed (the command exited, was ended, or the connection died). */
  onEnd: (end: RemoteStreamEnd) => void;
};

export interface RemoteStream {
  /** Stops reading: the SSH window fills and the remote command blocks on its writes (flow control). */
  pause(): void;
  resume(): void;
  /** Ends our side of the channel (EOF on the command's stdin), then closes the channel. */
  close(): void;
}

/** The first bytes of stderr kept for the end report; the rest is dropped. */
const MAX_STDERR_BYTES = 4096;
/** A command that neither exits nor closes after its stdin ended is cut off after this long. */
const CLOSE_GRACE_MS = 5_000;

export async function openRemoteStream(
  pool: SshPool,
  target: SshTarget,
  command: string,
  handlers: RemoteStreamHandlers,
  spareSlots: number,
): Promise<RemoteStream | null> {
  const leased = await pool.tryLeaseChannel(target, spareSlots);
  if (!leased) return null;
  const lease = leased;
  const { connection } = lease;
  const channel = await new Promise<ClientChannel>((resolve, reject) => {
    try {
      connection.client.exec(command, (error, stream) => {
        if (error) reject(classifySshError(error));
        else resolve(stream);
      });
    } catch (error) {
      // ssh2 throws "Not connected" synchronously when the connection died a moment ago.
      reject(classifySshError(error));
    }
  }).catch((error: unknown) => {
    lease.release();
    throw error;
  });

  let ended = false;
  let exitCode: number | null = null;
  let failure: Error | null = null;
  let stderr = "";
  let closeTimer: NodeJS.Timeout | null = null;
  const untrack = connection.track((error) => {
    failure = error;
    finish();
  });
  function finish() {
    if (ended) return;
    ended = true;
    if (closeTimer) clearTimeout(closeTimer);
    untrack();
    lease.release();
    handlers.onEnd({ code: exitCode, error: failure, stderr });
  }
  channel.on("data", (bytes: Buffer) => {
    if (!ended) handlers.onData(bytes);
  });
  channel.stderr.on("data", (bytes: Buffer) => {
    if (stderr.length < MAX_STDERR_BYTES) stderr += bytes.toString("utf8").slice(0, MAX_STDERR_BYTES);
  });
  channel.on("exit", (code: number | null) => {
    exitCode = code;
  });
  channel.on("error", (error: Error) => {
    failure = classifySshError(error);
  });
  channel.stderr.on("error", () => {});
  channel.on("close", finish);

  return {
    pause: () => channel.pause(),
    resume: () => channel.resume(),
    close: () => {
      if (ended || closeTimer) return;
      channel.resume();
      channel.end();
      closeTimer = setTimeout(() => {
        failure ??= new TransportError("closed", `did not exit after its input ended: ${command}`);
        channel.close();
        finish();
      }, CLOSE_GRACE_MS);
      closeTimer.unref();
    },
  };
}
