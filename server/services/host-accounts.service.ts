/**
 * The accounts Sigmaflow logs in with on a host: one group account (set up by an admin) and personal
 * accounts (each researcher their own). Private keys are generated here or pasted once, stored only
 * encrypted (AES-256-GCM, bound to the account id) and never returned: the API shows the public key to
 * install in ~/.ssh/authorized_keys. Sealing and decrypting live in server/credentials/.
 *
 * Runs point at the account they used, so an account runs have used is never deleted: its owner or an
 * admin disables it (new runs then skip it: a member's runs fall back to the group account) or replaces
 * it with a new one, and may enable it again. At most one enabled account per owner and host.
 */
import { randomUUID } from "node:crypto";
import { and, asc, eq, isNull, or, sql } from "drizzle-orm";
import type {
  CreateHostAccountRequest,
  HostAccount,
  HostAccountKind,
  ReplaceHostAccountRequest,
} from "../../shared/schemas/host-accounts";
import { recordAudit } from "../audit/record-audit";
import type { Principal } from "../auth/principal";
import { type SecretsConfig, sealAccountKey } from "../credentials/account-credentials";
import { generateSshKeyPair, parsePrivateKey, SshKeyError, type SshKeyPair } from "../crypto/ssh-keys";
import { fingerprintOf } from "../crypto/ssh-public-keys";
import type { Database, DbExecutor } from "../db/client";
import { pgErrorCode } from "../db/pg-errors";
import { hostAccounts, hosts, runs } from "../db/schema";
import { AppError, conflict, forbidden, notFound } from "../http/errors";
import { requireRoleFor } from "./access";
import { type HostRow, hostForCaller } from "./hosts.service";

export type HostAccountDeps = { db: Database; config: SecretsConfig };
type AccountRow = typeof hostAccounts.$inferSelect;

function toHostAccount(row: AccountRow): HostAccount {
  return {
    id: row.id,
    hostId: row.hostId,
    kind: row.ownerUserId === null ? "group" : "personal",
    ownerUserId: row.ownerUserId,
    username: row.username,
    publicKey: row.publicKey,
    disabledAt: row.disabledAt?.toISOString() ?? null,
    createdAt: row.createdAt.toISOString(),
  };
}

const kindOf = (row: Pick<AccountRow, "ownerUserId">) => (row.ownerUserId === null ? "group" : "personal");

function keyPairFor(input: { privateKey?: string }, comment: string): SshKeyPair {
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

const alreadyThere = (kind: HostAccountKind, mine: boolean) =>
  conflict(
    kind === "group"
      ? "This host already has an enabled group account: disable or replace it before setting up another."
      : mine
        ? "You already have an enabled personal account on this host: disable or replace it before setting up another."
        : "This member already has an enabled personal account on this host: disable or replace it first.",
  );

/** Inside a transaction that locked the host row: refuses a second enabled account of the same owner. */
async function requireNoEnabledAccount(
  tx: DbExecutor,
  hostId: string,
  ownerUserId: string | null,
  mine: boolean,
): Promise<void> {
  const [existing] = await tx
    .select({ id: hostAccounts.id })
    .from(hostAccounts)
    .where(
      and(
        eq(hostAccounts.hostId, hostId),
        isNull(hostAccounts.disabledAt),
        ownerUserId === null ? isNull(hostAccounts.ownerUserId) : eq(hostAccounts.ownerUserId, ownerUserId),
      ),
    );
  if (existing) throw alreadyThere(ownerUserId === null ? "group" : "personal", mine);
}

/** Serialises account changes per host; the unique index alone would answer a race with a bare 23505. */
async function lockHostRow(tx: DbExecutor, hostId: string): Promise<void> {
  await tx.select({ id: hosts.id }).from(hosts).where(eq(hosts.id, hostId)).for("update");
}

type NewAccount = {
  id: string;
  publicKey: string;
  sealed: Buffer;
  keyType: string;
  key: "generated" | "imported";
};

function newAccount(
  deps: HostAccountDeps,
  input: { username: string; privateKey?: string },
  host: HostRow,
): NewAccount {
  const pair = keyPairFor(input, `sigmaflow-${input.username}@${host.name}`);
  const id = randomUUID();
  const sealed = sealAccountKey(deps.config, id, pair.privateKey);
  return {
    id,
    publicKey: pair.publicKey,
    sealed,
    keyType: pair.type,
    key: input.privateKey === undefined ? "generated" : "imported",
  };
}

/** What the audit log records of a new account's key (never the key itself). */
function keyAuditDetails(account: NewAccount) {
  return {
    key: account.key,
    keyType: account.keyType,
    publicKeyFingerprint: fingerprintOf(account.publicKey),
  };
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
  const account = newAccount(deps, input, host);
  try {
    return await db.transaction(async (tx) => {
      await lockHostRow(tx, hostId);
      await requireNoEnabledAccount(tx, hostId, ownerUserId, true);
      const [row] = await tx
        .insert(hostAccounts)
        .values({
          id: account.id,
          hostId,
          ownerUserId,
          username: input.username,
          publicKey: account.publicKey,
          privateKeyEncrypted: account.sealed,
        })
        .returning();
      await recordAudit(tx, {
        actorUserId: principal.userId,
        groupId: host.groupId,
        action: "host_account.create",
        targetType: "host_account",
        targetId: account.id,
        details: {
          hostId,
          kind: input.kind,
          username: input.username,
          ...keyAuditDetails(account),
        },
        ip,
      });
      return toHostAccount(row!);
    });
  } catch (error) {
    if (pgErrorCode(error) === "23505") throw alreadyThere(input.kind, true);
    throw error;
  }
}

/** Admins see every account of the host; others the group account and their own. Enabled ones first. */
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
    .orderBy(
      sql`${hostAccounts.disabledAt} is not null`,
      sql`${hostAccounts.ownerUserId} is not null`,
      asc(hostAccounts.createdAt),
    );
  return rows.map(toHostAccount);
}

/**
 * An account and its host, for a change only its owner or an admin may make: the group account is the
 * admins' alone. Callers outside the group get 404, like the account itself were missing.
 */
async function accountForChange(db: DbExecutor, principal: Principal, accountId: string, what: string) {
  const [found] = await db
    .select({ account: hostAccounts, host: hosts })
    .from(hostAccounts)
    .innerJoin(hosts, eq(hosts.id, hostAccounts.hostId))
    .where(eq(hostAccounts.id, accountId));
  if (!found) throw notFound("Host account");
  const role = await requireRoleFor(db, principal, found.host.groupId, "collaborator", "Host account");
  const isOwner = found.account.ownerUserId !== null && found.account.ownerUserId === principal.userId;
  if (!isOwner && !principal.isSiteAdmin && role !== "admin") {
    throw forbidden(
      found.account.ownerUserId === null
        ? `Only a group admin can ${what} the group account.`
        : `Only the account's owner or a group admin can ${what} it.`,
    );
  }
  return found;
}

const usedByRuns = () =>
  conflict(
    "Runs have used this account, and their records point at it, so it cannot be deleted: disable it (new runs then skip it) or replace it.",
  );

export async function deleteHostAccount(
  db: Database,
  principal: Principal,
  accountId: string,
  ip: string | null,
): Promise<void> {
  const found = await accountForChange(db, principal, accountId, "delete");
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
        groupId: found.host.groupId,
        action: "host_account.delete",
        targetType: "host_account",
        targetId: accountId,
        details: {
          hostId: found.account.hostId,
          kind: kindOf(found.account),
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

/**
 * Disables or enables an account. Disabling only changes which account new runs choose; runs that
 * already use it keep it. Enabling is refused while the owner has another enabled account there.
 */
export async function setHostAccountDisabled(
  db: Database,
  principal: Principal,
  accountId: string,
  disabled: boolean,
  ip: string | null,
): Promise<HostAccount> {
  const found = await accountForChange(db, principal, accountId, disabled ? "disable" : "enable");
  const mine = found.account.ownerUserId === principal.userId;
  try {
    return await db.transaction(async (tx) => {
      await lockHostRow(tx, found.host.id);
      const [current] = await tx.select().from(hostAccounts).where(eq(hostAccounts.id, accountId));
      if (!current) throw notFound("Host account");
      if ((current.disabledAt !== null) === disabled) return toHostAccount(current);
      if (!disabled) await requireNoEnabledAccount(tx, current.hostId, current.ownerUserId, mine);
      const [row] = await tx
        .update(hostAccounts)
        .set(
          disabled
            ? { disabledAt: new Date(), disabledBy: principal.userId }
            : { disabledAt: null, disabledBy: null },
        )
        .where(eq(hostAccounts.id, accountId))
        .returning();
      await recordAudit(tx, {
        actorUserId: principal.userId,
        groupId: found.host.groupId,
        action: disabled ? "host_account.disable" : "host_account.enable",
        targetType: "host_account",
        targetId: accountId,
        details: { hostId: current.hostId, kind: kindOf(current), username: current.username },
        ip,
      });
      return toHostAccount(row!);
    });
  } catch (error) {
    if (pgErrorCode(error) === "23505") throw alreadyThere(kindOf(found.account), mine);
    throw error;
  }
}

/**
 * Replaces an account with a new one of the same kind and owner (another user name or key): the old
 * one is disabled, so runs that used it keep their record, and new runs use the replacement.
 */
export async function replaceHostAccount(
  deps: HostAccountDeps,
  principal: Principal,
  accountId: string,
  input: ReplaceHostAccountRequest,
  ip: string | null,
): Promise<HostAccount> {
  const { db } = deps;
  const found = await accountForChange(db, principal, accountId, "replace");
  const { ownerUserId } = found.account;
  const mine = ownerUserId === principal.userId;
  const account = newAccount(deps, input, found.host);
  try {
    return await db.transaction(async (tx) => {
      await lockHostRow(tx, found.host.id);
      const disabled = await tx
        .update(hostAccounts)
        .set({ disabledAt: new Date(), disabledBy: principal.userId })
        .where(and(eq(hostAccounts.id, accountId), isNull(hostAccounts.disabledAt)))
        .returning({ id: hostAccounts.id });
      await requireNoEnabledAccount(tx, found.host.id, ownerUserId, mine);
      const [row] = await tx
        .insert(hostAccounts)
        .values({
          id: account.id,
          hostId: found.host.id,
          ownerUserId,
          username: input.username,
          publicKey: account.publicKey,
          privateKeyEncrypted: account.sealed,
        })
        .returning();
      await recordAudit(tx, {
        actorUserId: principal.userId,
        groupId: found.host.groupId,
        action: "host_account.replace",
        targetType: "host_account",
        targetId: account.id,
        details: {
          hostId: found.host.id,
          kind: kindOf(found.account),
          replaced: { id: accountId, username: found.account.username, disabledNow: disabled.length > 0 },
          username: input.username,
          ...keyAuditDetails(account),
        },
        ip,
      });
      return toHostAccount(row!);
    });
  } catch (error) {
    if (pgErrorCode(error) === "23505") throw alreadyThere(kindOf(found.account), mine);
    throw error;
  }
}

export type ChosenAccount = { id: string; username: string; kind: HostAccountKind };

/**
 * The account a run of this user goes out with: their enabled personal one, else the group's enabled
 * one, else none. A disabled account is skipped, which is how a member whose personal account the host
 * refuses gets back to the group account.
 */
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
        isNull(hostAccounts.disabledAt),
        or(eq(hostAccounts.ownerUserId, userId), isNull(hostAccounts.ownerUserId)),
      ),
    )
    .orderBy(sql`${hostAccounts.ownerUserId} is null`)
    .limit(1);
  if (!row) return null;
  return { id: row.id, username: row.username, kind: kindOf(row) };
}
