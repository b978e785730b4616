/**
 * Host keys: reading the key a host presents (to pin it when an administrator registers the host) and the
 * SHA-256 fingerprint people compare by eye. A pinned key is stored as an OpenSSH public key line,
 * "<type> <base64 blob>", the form `ssh-keyscan` and `*.pub` files use.
 */
import { createHash } from "node:crypto";
import { Client, type ServerHostKeyAlgorithm } from "ssh2";
import { classifySshError, TransportError } from "./errors";

export type HostKey = { publicKey: string; fingerprint: string };

/** The algorithm name inside an SSH public key blob (RFC 4253 §6.6: the blob opens with it as an SSH string). */
export function keyTypeOfBlob(blob: Buffer): string {
  if (blob.length < 4) throw new Error("SSH public key blob too short");
  const length = blob.readUInt32BE(0);
  if (length === 0 || length > 64 || blob.length < 4 + length)
    throw new Error("malformed SSH public key blob");
  return blob.toString("latin1", 4, 4 + length);
}

/** Parses "<type> <base64> [comment]" into the type and the raw blob; the type must match the blob's own. */
export function parsePublicKeyLine(line: string): { type: string; blob: Buffer } {
  const fields = line.trim().split(/\s+/);
  const [type, base64] = fields;
  if (!type || !base64 || !/^[A-Za-z0-9+/]+=*$/.test(base64)) {
    throw new Error(`not an OpenSSH public key line: ${line.slice(0, 60)}`);
  }
  const blob = Buffer.from(base64, "base64");
  const blobType = keyTypeOfBlob(blob);
  if (blobType !== type) throw new Error(`public key line says ${type} but its key is ${blobType}`);
  return { type, blob };
}

export function publicKeyLineOf(blob: Buffer): string {
  return `${keyTypeOfBlob(blob)} ${blob.toString("base64")}`;
}

/** "SHA256:<base64 without padding>" of the key blob: the format `ssh-keygen -l` prints (OpenSSH ≥ 6.8). */
export function fingerprintOfBlob(blob: Buffer): string {
  return `SHA256:${createHash("sha256").update(blob).digest("base64").replace(/=+$/, "")}`;
}

export function fingerprintOf(publicKeyLine: string): string {
  return fingerprintOfBlob(parsePublicKeyLine(publicKeyLine).blob);
}

/**
 * The host-key algorithms to offer when a key of `keyType` is pinned, so the server presents that key and
 * not another of its keys. An RSA key is signed with the SHA-2 variants (RFC 8332) before plain ssh-rsa.
 */
export function hostKeyAlgorithmsFor(keyType: string): ServerHostKeyAlgorithm[] {
  if (keyType === "ssh-rsa") return ["rsa-sha2-512", "rsa-sha2-256", "ssh-rsa"];
  if (!(SIGNING_ALGORITHMS as readonly string[]).includes(keyType)) {
    throw new Error(`unsupported host key type ${keyType}`);
  }
  return [keyType as ServerHostKeyAlgorithm];
}

const SIGNING_ALGORITHMS = [
  "ssh-ed25519",
  "ecdsa-sha2-nistp256",
  "ecdsa-sha2-nistp384",
  "ecdsa-sha2-nistp521",
] as const satisfies readonly ServerHostKeyAlgorithm[];

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
  const unreachable = (failure: TransportError["failure"], cause?: unknown) =>
    new TransportError(failure, `could not reach an SSH server at ${address}:${port}`, { cause });
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
    client.on("error", (error) => {
      const classified = classifySshError(error);
      const failure = classified instanceof TransportError ? classified.failure : "unknown";
      settle(() => reject(unreachable(failure, classified)));
    });
    client.on("close", () => settle(() => reject(unreachable("closed"))));
    client.connect({
      host: address,
      port,
      username: "sigmaflow-host-key-probe",
      readyTimeout: timeoutMs,
      algorithms: {
        serverHostKey: [...SIGNING_ALGORITHMS, ...hostKeyAlgorithmsFor("ssh-rsa")],
      },
      hostVerifier: (key: Buffer) => {
        settle(() => {
          try {
            resolve({ publicKey: publicKeyLineOf(key), fingerprint: fingerprintOfBlob(key) });
          } catch (error) {
            reject(error);
          }
        });
        return false;
      },
    });
  });
}
