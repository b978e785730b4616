/**
 * The server's host-key probe for host registration: one SSH key exchange that reads the key a host
 * presents, so an admin can compare its fingerprint and pin it. The worker's own connections check the
 * pinned key with the same functions (server/crypto/ssh-public-keys.ts).
 */
import { Client } from "ssh2";
import { ACCEPTED_HOST_KEY_ALGORITHMS, type HostKey, hostKeyOfBlob } from "../crypto/ssh-public-keys";

/** How the probe ended without a key; for logs only, never shown to the person registering the host. */
export type HostKeyProbeFailure = "timeout" | "closed" | "error";

export class HostKeyProbeError extends Error {
  override readonly name = "HostKeyProbeError";
  constructor(
    readonly failure: HostKeyProbeFailure,
    message: string,
    options?: { cause?: unknown },
  ) {
    super(message, options);
  }
}

/**
 * Connects, captures the host key during key exchange and aborts before authenticating. ed25519 is
 * asked for first, the type most hosts have and the one Sigmaflow pins by preference.
 *
 * Every way of not getting a key (refused, timed out, closed, something other than SSH answering)
 * fails with the same message: the probe runs for whoever may register a host, and distinct messages
 * would tell them which ports of a machine are open. The kind and the underlying error stay on the
 * error (`failure`, `cause`) for logs.
 */
export function fetchHostKey(address: string, port: number, timeoutMs: number): Promise<HostKey> {
  const unreachable = (failure: HostKeyProbeFailure, cause?: unknown) =>
    new HostKeyProbeError(failure, `could not reach an SSH server at ${address}:${port}`, { cause });
  return new Promise<HostKey>((resolve, reject) => {
    const client = new Client();
    let settled = false;
    const timer = setTimeout(() => {
      settle(() => reject(unreachable("timeout")));
    }, timeoutMs);
    function settle(action: () => void): void {
      if (settled) return;
      settled = true;
      clearTimeout(timer);
      action();
      // Deferred: this may run inside ssh2's own key-exchange callback.
      setImmediate(() => client.destroy());
    }
    // Errors after the key was captured are the abort itself ("Host denied"); keep a handler for good.
    client.on("error", (error) => settle(() => reject(unreachable("error", error))));
    client.on("close", () => settle(() => reject(unreachable("closed"))));
    client.connect({
      host: address,
      port,
      username: "sigmaflow-host-key-probe",
      readyTimeout: timeoutMs,
      algorithms: { serverHostKey: [...ACCEPTED_HOST_KEY_ALGORITHMS] },
      hostVerifier: (key: Buffer) => {
        settle(() => {
          try {
            resolve(hostKeyOfBlob(key));
          } catch (error) {
            reject(error);
          }
        });
        return false;
      },
    });
  });
}
