/**
 * Public-key authentication only (password, keyboard-interactive and "none" are refused), against
 * authorized_keys re-read at every attempt so keys added while the server runs take effect at the
 * next login, as with sshd.
 */
import { timingSafeEqual } from "node:crypto";
import type { AuthContext, AuthenticationType, ParsedKey, PublicKeyAuthContext } from "ssh2";
import { readAuthorizedKeys } from "./authorized-keys";

export type AuthOptions = { username: string; authorizedKeysPath: string; log: (message: string) => void };

const METHODS_LEFT: AuthenticationType[] = ["publickey"];

/** Compares in time that depends on the lengths only, never on where the first difference is. */
export function constantTimeEqual(input: Buffer, expected: Buffer): boolean {
  const sameLength = input.length === expected.length;
  // Comparing the input with itself keeps the work the same when the lengths differ.
  const matches = timingSafeEqual(input, sameLength ? expected : input);
  return sameLength && matches;
}

/** The authorized key with this public blob; every entry is compared, so the timing says nothing. */
function findKey(keys: ParsedKey[], blob: Buffer): ParsedKey | undefined {
  let found: ParsedKey | undefined;
  for (const key of keys) {
    if (constantTimeEqual(blob, key.getPublicSSH()) && !found) found = key;
  }
  return found;
}

async function publicKeyAccepted(ctx: PublicKeyAuthContext, options: AuthOptions): Promise<boolean> {
  const userMatches = constantTimeEqual(Buffer.from(ctx.username), Buffer.from(options.username));
  const key = findKey(await readAuthorizedKeys(options.authorizedKeysPath), ctx.key.data);
  if (!userMatches || !key) return false;
  // Without a signature the client only asks whether this key would do (RFC 4252 §7); the real
  // attempt follows with a signature over the session identifier.
  if (!ctx.signature || !ctx.blob) return true;
  return key.verify(ctx.blob, ctx.signature, ctx.hashAlgo);
}

export function authenticate(ctx: AuthContext, options: AuthOptions): void {
  if (ctx.method !== "publickey") {
    ctx.reject(METHODS_LEFT);
    return;
  }
  publicKeyAccepted(ctx, options)
    .then((accepted) => {
      if (accepted) ctx.accept();
      else ctx.reject(METHODS_LEFT);
    })
    .catch((error: unknown) => {
      options.log(`auth: ${String(error)}`);
      ctx.reject(METHODS_LEFT);
    });
}
