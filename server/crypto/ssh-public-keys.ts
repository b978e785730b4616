/**
 * SSH public keys as Sigmaflow stores and compares them: the host key pinned at registration (read by the
 * server's probe, checked by the worker's connections) and account keys. A key is stored as an OpenSSH
 * public key line, "<type> <base64 blob>", the form `ssh-keyscan` and `*.pub` files use, and shown as the
 * SHA-256 fingerprint people compare by eye. Pure functions: no connection is made here.
 */
import { createHash } from "node:crypto";
import type { ServerHostKeyAlgorithm } from "ssh2";

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

/** The pinned form and fingerprint of a key blob as a host presents it during key exchange. */
export function hostKeyOfBlob(blob: Buffer): HostKey {
  return { publicKey: publicKeyLineOf(blob), fingerprint: fingerprintOfBlob(blob) };
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

/** Every host-key algorithm Sigmaflow accepts, ed25519 first: the order a probe offers them in. */
export const ACCEPTED_HOST_KEY_ALGORITHMS: readonly ServerHostKeyAlgorithm[] = [
  ...SIGNING_ALGORITHMS,
  ...hostKeyAlgorithmsFor("ssh-rsa"),
];
