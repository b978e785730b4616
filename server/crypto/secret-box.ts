/**
 * Encrypts secrets at rest (host private keys) with AES-256-GCM. The 256-bit key is derived from
 * SIGMAFLOW_SECRETS_KEY with HKDF-SHA256 and a fixed info string, so the configured secret is never used
 * as a key directly and the same secret can later serve other purposes under other info strings.
 *
 * Sealed layout, stored in a bytea column: iv (12 bytes) ‖ tag (16 bytes) ‖ ciphertext.
 * The optional associated data (e.g. the row id) is authenticated but not stored: a ciphertext copied
 * into another row then fails to open instead of silently lending its key to that row.
 */
import { createCipheriv, createDecipheriv, hkdfSync, randomBytes } from "node:crypto";

const IV_BYTES = 12;
const TAG_BYTES = 16;
const KEY_BYTES = 32;
const HKDF_INFO = "sigmaflow/secret-box/aes-256-gcm/v1";
// RFC 5869 §2.2: the salt is optional; a fixed one keeps the derivation reproducible from the secret alone.
const HKDF_SALT = Buffer.alloc(0);
const MIN_SECRET_LENGTH = 32;

export class SecretBoxError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "SecretBoxError";
  }
}

export function deriveSecretBoxKey(secretsKey: string): Buffer {
  if (secretsKey.length < MIN_SECRET_LENGTH) {
    throw new SecretBoxError(`SIGMAFLOW_SECRETS_KEY needs at least ${MIN_SECRET_LENGTH} characters.`);
  }
  return Buffer.from(hkdfSync("sha256", Buffer.from(secretsKey, "utf8"), HKDF_SALT, HKDF_INFO, KEY_BYTES));
}

export type SecretBox = {
  seal(plaintext: string | Buffer, associatedData?: string): Buffer;
  open(sealed: Buffer, associatedData?: string): Buffer;
};

export function createSecretBox(secretsKey: string): SecretBox {
  const key = deriveSecretBoxKey(secretsKey);
  return {
    seal(plaintext, associatedData) {
      const iv = randomBytes(IV_BYTES);
      const cipher = createCipheriv("aes-256-gcm", key, iv, { authTagLength: TAG_BYTES });
      if (associatedData !== undefined) cipher.setAAD(Buffer.from(associatedData, "utf8"));
      const data = typeof plaintext === "string" ? Buffer.from(plaintext, "utf8") : plaintext;
      const ciphertext = Buffer.concat([cipher.update(data), cipher.final()]);
      return Buffer.concat([iv, cipher.getAuthTag(), ciphertext]);
    },
    open(sealed, associatedData) {
      if (sealed.length < IV_BYTES + TAG_BYTES) {
        throw new SecretBoxError("The stored secret is too short to be a sealed value.");
      }
      const iv = sealed.subarray(0, IV_BYTES);
      const tag = sealed.subarray(IV_BYTES, IV_BYTES + TAG_BYTES);
      const decipher = createDecipheriv("aes-256-gcm", key, iv, { authTagLength: TAG_BYTES });
      decipher.setAuthTag(tag);
      if (associatedData !== undefined) decipher.setAAD(Buffer.from(associatedData, "utf8"));
      try {
        return Buffer.concat([decipher.update(sealed.subarray(IV_BYTES + TAG_BYTES)), decipher.final()]);
      } catch {
        throw new SecretBoxError(
          "A stored secret could not be decrypted: SIGMAFLOW_SECRETS_KEY differs from the one it was sealed with, or the stored value was altered.",
        );
      }
    },
  };
}
