import { createHash, randomBytes } from "node:crypto";

/** sha256 hex of a secret: what the database keeps for API tokens and invitation links. */
export function hashSecret(secret: string): string {
  return createHash("sha256").update(secret, "utf8").digest("hex");
}

/** A new random secret with a recognisable prefix, e.g. `sf_` for API tokens. */
export function newSecret(prefix: string, bytes = 32): string {
  return `${prefix}${randomBytes(bytes).toString("base64url")}`;
}
