/** The server's host key: read from its file, or made (ed25519, as ssh-keygen -A would) if missing. */
import { createHash } from "node:crypto";
import { mkdir, readFile, writeFile } from "node:fs/promises";
import path from "node:path";
import ssh2 from "ssh2";
import { generateSshKeyPair } from "../../server/crypto/ssh-keys";

export type HostKey = {
  privateKey: string;
  /** As `ssh-keygen -l` prints it: "SHA256:" and unpadded base64 of the SHA-256 of the public blob. */
  fingerprint: string;
  /** One authorized_keys / known_hosts style line without comment: "ssh-ed25519 AAAA...". */
  publicKey: string;
};

async function readIfPresent(filePath: string): Promise<string | undefined> {
  try {
    return await readFile(filePath, "utf8");
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === "ENOENT") return undefined;
    throw error;
  }
}

async function createHostKey(keyPath: string): Promise<string> {
  // ssh2's own generator drops leading zero bytes about once in 200 keys; Sigmaflow's encoder does not.
  const generated = generateSshKeyPair("sigmaflow-fake-cluster");
  const pair = { private: generated.privateKey, public: generated.publicKey };
  await mkdir(path.dirname(keyPath), { recursive: true });
  try {
    // "wx": if another start made the key meanwhile, keep theirs.
    await writeFile(keyPath, pair.private, { mode: 0o600, flag: "wx" });
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === "EEXIST") return readFile(keyPath, "utf8");
    throw error;
  }
  await writeFile(`${keyPath}.pub`, `${pair.public}\n`, { mode: 0o644 });
  return pair.private;
}

export async function loadHostKey(keyPath: string): Promise<HostKey> {
  const privateKey = (await readIfPresent(keyPath)) ?? (await createHostKey(keyPath));
  const parsed = ssh2.utils.parseKey(privateKey);
  if (parsed instanceof Error) throw new Error(`host key ${keyPath}: ${parsed.message}`);
  if (!parsed.isPrivateKey()) throw new Error(`host key ${keyPath}: not a private key`);
  const blob = parsed.getPublicSSH();
  const digest = createHash("sha256").update(blob).digest("base64").replace(/=+$/, "");
  return {
    privateKey,
    fingerprint: `SHA256:${digest}`,
    publicKey: `${parsed.type} ${blob.toString("base64")}`,
  };
}
