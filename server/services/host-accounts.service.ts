/**
 * The accounts Sigmaflow logs in with on a host: one group account (set up by an admin) and personal
 * accounts (each researcher their own). Private keys are generated here or pasted once, stored only
 * encrypted (AES-256-GCM, bound to the account id) and never returned: the API shows the public key to
 * install in ~/.ssh/authorized_keys. The worker decrypts them through `loadAccountCredentials`.
 */
import { randomUUID } from "node:crypto";
import { and, asc, eq, isNull, or, sql } from "drizzle-orm";
import type { CreateHostAccountRequest, HostAccount } from "../../shared/schemas/execution/hosts";
import { fingerprintOf } from "../../worker/ssh/host-key";
import type { Principal } from "../auth/principal";
import { createSecretBox } from "../crypto/secret-box";
import { generateSshKeyPair, parsePrivateKey, SshKeyError, type SshKeyPair } from "../crypto/ssh-keys";
import type { Database, DbExecutor } from "../db/client";
import { hostAccounts, hosts, runs } from "../db/schema";
import { AppError, conflict, forbidden, notFound } from "../http/errors";
import { recordAudit } from "./audit.service";
import { hostForCaller, pgErrorCode, requireRoleFor } from "./hosts.service";

export type SecretsConfig = { secretsKey: string };
export type HostAccountDeps = { db: Database; config: SecretsConfig };
type AccountRow = typeof hostAccounts.$inferSelect;

/** Ties a ciphertext to its row: a sealed key copied into another account fails to decrypt. */
const associatedData = (accountId: string) => `host_accounts:${accountId}`;

function toHostAccount(row: AccountRow): HostAccount {
  return {
    id: row.id,
    hostId: row.hostId,
    kind: row.ownerUserId === null ? "group" : "personal",
    ownerUserId: row.ownerUserId,
    username: row.username,
    publicKey: row.publicKey,
    createdAt: row.createdAt.toISOString(),
  };
}

function keyPairFor(input: CreateHostAccountRequest, comment: string): SshKeyPair {
  if (input.privateKey === undefined) return generateSshKeyPair(comment);
  try {
    return parsePrivateKey(input.privateKey, comment);
  } catch (error) {
    if (error instanceof SshKeyError) {
      throw new AppError(422, "invalid_private_key", error.message, [
        { path: "privateKey", message: error.message },
      ]);
    }
    throw error;
  }
}

export async function createHostAccount(
  deps: HostAccountDeps,
  principal: Principal,
  hostId: string,
  input: CreateHostAccountRequest,
  ip: string | null,
): Promise<HostAccount> {
  const { db } = deps;
  const { host } = await hostForCaller(db, principal, hostId, input.kind === "group" ? "admin" : "member");
  const ownerUserId = input.kind === "group" ? null : principal.userId;
  const pair = keyPairFor(input, `sigmaflow-${input.username}@${host.name}`);
  const id = randomUUID();
  const sealed = createSecretBox(deps.config.secretsKey).seal(pair.privateKey, associatedData(id));
  const alreadyThere = () =>
    conflict(
      input.kind === "group"
        ? "This host already has a group account: delete it before setting up another."
        : "You already have a personal account on this host: delete it before setting up another.",
    );
  try {
    return await db.transaction(async (tx) => {
      // Serialises account creation per host; the unique index cannot see two NULL owners as equal.
      await tx.select({ id: hosts.id }).from(hosts).where(eq(hosts.id, hostId)).for("update");
      const [existing] = await tx
        .select({ id: hostAccounts.id })
        .from(hostAccounts)
        .where(
          and(
            eq(hostAccounts.hostId, hostId),
            ownerUserId === null
              ? isNull(hostAccounts.ownerUserId)
              : eq(hostAccounts.ownerUserId, ownerUserId),
          ),
        );
      if (existing) throw alreadyThere();
      const [row] = await tx
        .insert(hostAccounts)
        .values({
          id,
          hostId,
          ownerUserId,
          username: input.username,
          publicKey: pair.publicKey,
          privateKeyEncrypted: sealed,
        })
        .returning();
      await recordAudit(tx, {
        actorUserId: principal.userId,
        groupId: host.groupId,
        action: "host_account.create",
        targetType: "host_account",
        targetId: id,
        details: {
          hostId,
          kind: input.kind,
          username: input.username,
          key: input.privateKey === undefined ? "generated" : "imported",
          keyType: pair.type,
          publicKeyFingerprint: fingerprintOf(pair.publicKey),
        },
        ip,
      });
      return toHostAccount(row!);
    });
  } catch (error) {
    if (pgErrorCode(error) === "23505") throw alreadyThere();
    throw error;
  }
}

/** Admins see every account of the host; others the group account and their own. */
export async function listHostAccounts(
  db: Database,
  principal: Principal,
  hostId: string,
): Promise<HostAccount[]> {
  const { role } = await hostForCaller(db, principal, hostId, "collaborator");
  const seesAll = principal.isSiteAdmin || role === "admin";
  const visible = seesAll
    ? eq(hostAccounts.hostId, hostId)
    : and(
        eq(hostAccounts.hostId, hostId),
        or(isNull(hostAccounts.ownerUserId), eq(hostAccounts.ownerUserId, principal.userId)),
      );
  const rows = await db
    .select()
    .from(hostAccounts)
    .where(visible)
    .orderBy(sql`${hostAccounts.ownerUserId} is not null`, asc(hostAccounts.createdAt));
  return rows.map(toHostAccount);
}

const usedByRuns = () =>
  conflict("Runs have used this account, and their records point at it, so it cannot be deleted.");

export async function deleteHostAccount(
  db: Database,
  principal: Principal,
  accountId: string,
  ip: string | null,
): Promise<void> {
  const [found] = await db
    .select({ account: hostAccounts, groupId: hosts.groupId })
    .from(hostAccounts)
    .innerJoin(hosts, eq(hosts.id, hostAccounts.hostId))
    .where(eq(hostAccounts.id, accountId));
  if (!found) throw notFound("Host account");
  const role = await requireRoleFor(db, principal, found.groupId, "collaborator", "Host account");
  const isOwner = found.account.ownerUserId === principal.userId;
  if (!isOwner && !principal.isSiteAdmin && role !== "admin") {
    throw forbidden("Only the account's owner or a group admin can delete it.");
  }
  try {
    await db.transaction(async (tx) => {
      const [used] = await tx
        .select({ one: sql`1` })
        .from(runs)
        .where(eq(runs.hostAccountId, accountId))
        .limit(1);
      if (used) throw usedByRuns();
      await tx.delete(hostAccounts).where(eq(hostAccounts.id, accountId));
      await recordAudit(tx, {
        actorUserId: principal.userId,
        groupId: found.groupId,
        action: "host_account.delete",
        targetType: "host_account",
        targetId: accountId,
        details: {
          hostId: found.account.hostId,
          kind: found.account.ownerUserId === null ? "group" : "personal",
          username: found.account.username,
        },
        ip,
      });
    });
  } catch (error) {
    if (pgErrorCode(error) === "23503") throw usedByRuns();
    throw error;
  }
}

/** For the worker: the login name and the decrypted OpenSSH private key of an account. */
export async function loadAccountCredentials(
  db: DbExecutor,
  config: SecretsConfig,
  accountId: string,
): Promise<{ username: string; privateKey: string }> {
  const [row] = await db
    .select({ username: hostAccounts.username, sealed: hostAccounts.privateKeyEncrypted })
    .from(hostAccounts)
    .where(eq(hostAccounts.id, accountId));
  if (!row) throw notFound("Host account");
  const privateKey = createSecretBox(config.secretsKey).open(row.sealed, associatedData(accountId));
  return { username: row.username, privateKey: privateKey.toString("utf8") };
}

export type ChosenAccount = { id: string; username: string; kind: "personal" | "group" };

/** The account a run of this user goes out with: their personal one, else the group's, else none. */
export async function chooseAccount(
  db: DbExecutor,
  hostId: string,
  userId: string,
): Promise<ChosenAccount | null> {
  const [row] = await db
    .select({ id: hostAccounts.id, username: hostAccounts.username, ownerUserId: hostAccounts.ownerUserId })
    .from(hostAccounts)
    .where(
      and(
        eq(hostAccounts.hostId, hostId),
        or(eq(hostAccounts.ownerUserId, userId), isNull(hostAccounts.ownerUserId)),
      ),
    )
    .orderBy(sql`${hostAccounts.ownerUserId} is null`)
    .limit(1);
  if (!row) return null;
  return { id: row.id, username: row.username, kind: row.ownerUserId === null ? "group" : "personal" };
}
