/**
 * Reads an OpenSSH authorized_keys file (sshd(8) "AUTHORIZED_KEYS FILE FORMAT"): one key per line,
 * `[options] keytype base64 [comment]`, blank lines and `#` comments ignored. Options (from=,
 * command=, restrict, ...) are skipped over and not enforced: the fake cluster has no use for them.
 */
import { readFile } from "node:fs/promises";
import ssh2, { type ParsedKey } from "ssh2";

/** Key types ssh2 can verify signatures for; FIDO (sk-*) keys are not among them. */
const KEY_TYPES = new Set([
  "ssh-ed25519",
  "ssh-rsa",
  "ssh-dss",
  "ecdsa-sha2-nistp256",
  "ecdsa-sha2-nistp384",
  "ecdsa-sha2-nistp521",
]);

/** Splits on whitespace, keeping double-quoted option values (e.g. command="a b") in one token. */
function tokens(line: string): string[] {
  return line.match(/(?:[^\s"]+|"(?:\\.|[^"\\])*")+/g) ?? [];
}

export function parseAuthorizedKeys(text: string): ParsedKey[] {
  const keys: ParsedKey[] = [];
  for (const rawLine of text.split(/\r?\n/)) {
    const line = rawLine.trim();
    if (line === "" || line.startsWith("#")) continue;
    const parts = tokens(line);
    const typeIndex = parts.findIndex((part) => KEY_TYPES.has(part));
    const base64 = typeIndex >= 0 ? parts[typeIndex + 1] : undefined;
    if (base64 === undefined) continue;
    const parsed = ssh2.utils.parseKey(`${parts[typeIndex]} ${base64}`);
    if (!(parsed instanceof Error)) keys.push(parsed);
  }
  return keys;
}

/** A missing file authorizes nobody, like sshd; other read errors propagate. */
export async function readAuthorizedKeys(filePath: string): Promise<ParsedKey[]> {
  try {
    return parseAuthorizedKeys(await readFile(filePath, "utf8"));
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === "ENOENT") return [];
    throw error;
  }
}
