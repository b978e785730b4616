/**
 * Host account keys at rest: the private key of each account is stored only encrypted (AES-256-GCM with
 * the server's secrets key, bound to the account id) and decrypted in memory when a run connects.
 */
import { eq } from "drizzle-orm";
import { createSecretBox } from "../crypto/secret-box";
import type { DbExecutor } from "../db/client";
import { hostAccounts } from "../db/schema";

export type SecretsConfig = { secretsKey: string };
export type AccountCredentials = { username: string; privateKey: string };

/** Ties a ciphertext to its row: a sealed key copied into another account fails to decrypt. */
const associatedData = (accountId: string) => `host_accounts:${accountId}`;

/** The stored form of an account's OpenSSH private key. */
export function sealAccountKey(config: SecretsConfig, accountId: string, privateKey: string): Buffer {
  return createSecretBox(config.secretsKey).seal(privateKey, associatedData(accountId));
}

/** The login name and the decrypted OpenSSH private key of an account, for a connection to its host. */
export async function loadAccountCredentials(
  db: DbExecutor,
  config: SecretsConfig,
  accountId: string,
): Promise<AccountCredentials> {
  const [row] = await db
    .select({ username: hostAccounts.username, sealed: hostAccounts.privateKeyEncrypted })
    .from(hostAccounts)
    .where(eq(hostAccounts.id, accountId));
  if (!row) throw new Error(`host account ${accountId} not found`);
  const privateKey = createSecretBox(config.secretsKey).open(row.sealed, associatedData(accountId));
  return { username: row.username, privateKey: privateKey.toString("utf8") };
}
