/**
 * Cluster hosts of a group. Group admins register and change them; every member and collaborator may
 * read them. The host key is read once at registration (and on request) and pinned unconfirmed: the
 * worker connects only after an admin has compared the fingerprint and confirmed it.
 */
import { and, asc, eq, sql } from "drizzle-orm";
import type { z } from "zod";
import type { GroupRole } from "../../shared/schemas/groups";
import type { createHostRequestSchema, Host, PatchHostRequest } from "../../shared/schemas/hosts";
import { recordAudit } from "../audit/record-audit";
import type { Principal } from "../auth/principal";
import type { HostKey } from "../crypto/ssh-public-keys";
import type { Database, DbExecutor } from "../db/client";
import { pgErrorCode } from "../db/pg-errors";
import { hosts, runs } from "../db/schema";
import { AppError, conflict, notFound } from "../http/errors";
import { requireGroupRole, requireRoleFor } from "./access";

export type HostKeyFetcher = (address: string, port: number, timeoutMs: number) => Promise<HostKey>;
export type HostDeps = { db: Database; fetchHostKey: HostKeyFetcher; hostKeyTimeoutMs?: number };
export type HostRow = typeof hosts.$inferSelect;
export type CreateHostInput = z.output<typeof createHostRequestSchema>;

export const HOST_KEY_TIMEOUT_MS = 10_000;
const UNCONFIRMED_MESSAGE = "Compare the host key fingerprint with the host's own and confirm it.";

export function toHost(row: HostRow): Host {
  return {
    id: row.id,
    groupId: row.groupId,
    name: row.name,
    address: row.address,
    port: row.port,
    scheduler: row.scheduler,
    remoteBaseDir: row.remoteBaseDir,
    maxConcurrentRuns: row.maxConcurrentRuns,
    hostKeyFingerprint: row.hostKeyFingerprint,
    hostKeyConfirmed: row.hostKeyConfirmedAt !== null,
    status: row.status,
    statusMessage: row.statusMessage,
    createdAt: row.createdAt.toISOString(),
  };
}

/** The host row and the caller's role in its group; 404 when either is out of reach. */
export async function hostForCaller(
  db: DbExecutor,
  principal: Principal,
  hostId: string,
  minimum: GroupRole,
): Promise<{ host: HostRow; role: GroupRole | null }> {
  const [host] = await db.select().from(hosts).where(eq(hosts.id, hostId));
  if (!host) throw notFound("Host");
  const role = await requireRoleFor(db, principal, host.groupId, minimum, "Host");
  return { host, role };
}

/**
 * Reads a host's key for registration. Every failure gives the same answer, whatever the port did
 * (refused, closed, timed out, answered with something other than SSH): a different message for a
 * closed and an open port would make host registration a port scanner.
 */
async function readHostKey(deps: HostDeps, address: string, port: number): Promise<HostKey> {
  try {
    return await deps.fetchHostKey(address, port, deps.hostKeyTimeoutMs ?? HOST_KEY_TIMEOUT_MS);
  } catch {
    throw new AppError(
      502,
      "host_unreachable",
      `Could not reach an SSH server at ${address}:${port}. Check the address and port and that the host accepts SSH connections from the Sigmaflow server; nothing was saved.`,
    );
  }
}

async function lockHost(tx: DbExecutor, hostId: string): Promise<HostRow> {
  const [host] = await tx.select().from(hosts).where(eq(hosts.id, hostId)).for("update");
  if (!host) throw notFound("Host");
  return host;
}

export async function listHosts(db: Database, principal: Principal, groupId: string): Promise<Host[]> {
  await requireGroupRole(db, principal, groupId, "collaborator");
  const rows = await db.select().from(hosts).where(eq(hosts.groupId, groupId)).orderBy(asc(hosts.name));
  return rows.map(toHost);
}

export async function getHost(db: Database, principal: Principal, hostId: string): Promise<Host> {
  return toHost((await hostForCaller(db, principal, hostId, "collaborator")).host);
}

export async function createHost(
  deps: HostDeps,
  principal: Principal,
  groupId: string,
  input: CreateHostInput,
  ip: string | null,
): Promise<Host> {
  const { db } = deps;
  await requireGroupRole(db, principal, groupId, "admin");
  const duplicate = () => conflict(`This group already has a host named "${input.name}".`, { path: "name" });
  const [existing] = await db
    .select({ id: hosts.id })
    .from(hosts)
    .where(and(eq(hosts.groupId, groupId), eq(hosts.name, input.name)));
  // Checked before the network round trip so a doomed request does not wait for SSH.
  if (existing) throw duplicate();
  const key = await readHostKey(deps, input.address, input.port);
  return db.transaction(async (tx) => {
    const now = new Date();
    const [row] = await tx
      .insert(hosts)
      .values({
        groupId,
        ...input,
        hostKey: key.publicKey,
        hostKeyFingerprint: key.fingerprint,
        status: "unverified",
        statusMessage: UNCONFIRMED_MESSAGE,
        statusChangedAt: now,
        createdBy: principal.userId,
      })
      .onConflictDoNothing({ target: [hosts.groupId, hosts.name] })
      .returning();
    if (!row) throw duplicate();
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId,
      action: "host.create",
      targetType: "host",
      targetId: row.id,
      details: { name: row.name, address: row.address, port: row.port, fingerprint: key.fingerprint },
      ip,
    });
    return toHost(row);
  });
}

/** Changes a host; a new address or port means another machine may answer, so its key is read again. */
export async function updateHost(
  deps: HostDeps,
  principal: Principal,
  hostId: string,
  input: PatchHostRequest,
  ip: string | null,
): Promise<Host> {
  const { db } = deps;
  const { host } = await hostForCaller(db, principal, hostId, "admin");
  const changes = Object.fromEntries(
    Object.entries(input).filter(
      ([key, value]) => value !== undefined && value !== host[key as keyof HostRow],
    ),
  ) as PatchHostRequest;
  if (Object.keys(changes).length === 0) return toHost(host);
  const endpointChanged = changes.address !== undefined || changes.port !== undefined;
  const key = endpointChanged
    ? await readHostKey(deps, changes.address ?? host.address, changes.port ?? host.port)
    : null;
  return db.transaction(async (tx) => {
    await lockHost(tx, hostId);
    const keyFields = key
      ? {
          hostKey: key.publicKey,
          hostKeyFingerprint: key.fingerprint,
          hostKeyConfirmedAt: null,
          status: "unverified" as const,
          statusMessage: UNCONFIRMED_MESSAGE,
          statusChangedAt: new Date(),
        }
      : {};
    const [row] = await tx
      .update(hosts)
      .set({ ...changes, ...keyFields })
      .where(eq(hosts.id, hostId))
      .returning();
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId: host.groupId,
      action: "host.update",
      targetType: "host",
      targetId: hostId,
      details: { changes, ...(key ? { fingerprint: key.fingerprint } : {}) },
      ip,
    });
    return toHost(row!);
  });
}

/**
 * Reads the host key again. The same key as the confirmed one changes nothing; a different key replaces
 * the pinned one and waits, unconfirmed, for an admin.
 */
export async function refreshHostKey(
  deps: HostDeps,
  principal: Principal,
  hostId: string,
  ip: string | null,
): Promise<Host> {
  const { db } = deps;
  const { host } = await hostForCaller(db, principal, hostId, "admin");
  const key = await readHostKey(deps, host.address, host.port);
  return db.transaction(async (tx) => {
    const current = await lockHost(tx, hostId);
    const unchanged = current.hostKeyFingerprint === key.fingerprint && current.hostKeyConfirmedAt !== null;
    const row = unchanged
      ? current
      : (
          await tx
            .update(hosts)
            .set({
              hostKey: key.publicKey,
              hostKeyFingerprint: key.fingerprint,
              hostKeyConfirmedAt: null,
              status: "unverified",
              statusMessage: UNCONFIRMED_MESSAGE,
              statusChangedAt: new Date(),
            })
            .where(eq(hosts.id, hostId))
            .returning()
        )[0]!;
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId: host.groupId,
      action: "host.host_key_refresh",
      targetType: "host",
      targetId: hostId,
      details: { previousFingerprint: current.hostKeyFingerprint, fingerprint: key.fingerprint, unchanged },
      ip,
    });
    return toHost(row);
  });
}

export async function confirmHostKey(
  db: Database,
  principal: Principal,
  hostId: string,
  fingerprint: string,
  ip: string | null,
): Promise<Host> {
  const { host } = await hostForCaller(db, principal, hostId, "admin");
  return db.transaction(async (tx) => {
    const current = await lockHost(tx, hostId);
    if (!current.hostKeyFingerprint) {
      throw conflict("Sigmaflow holds no host key for this host yet: refresh the host key first.");
    }
    if (fingerprint.trim() !== current.hostKeyFingerprint) {
      throw conflict(
        "This is not the fingerprint of the host key Sigmaflow holds (it may have been read again since you looked): compare the current fingerprint and confirm again.",
        { path: "fingerprint" },
      );
    }
    const now = new Date();
    const [row] = await tx
      .update(hosts)
      .set({ hostKeyConfirmedAt: now, status: "ok", statusMessage: null, statusChangedAt: now })
      .where(eq(hosts.id, hostId))
      .returning();
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId: host.groupId,
      action: "host.host_key_confirm",
      targetType: "host",
      targetId: hostId,
      details: { fingerprint: current.hostKeyFingerprint },
      ip,
    });
    return toHost(row!);
  });
}

const usedByRuns = () =>
  conflict("Runs have used this host, and their records point at it, so it cannot be deleted.");

export async function deleteHost(db: Database, principal: Principal, hostId: string, ip: string | null) {
  const { host } = await hostForCaller(db, principal, hostId, "admin");
  try {
    await db.transaction(async (tx) => {
      await lockHost(tx, hostId);
      const [used] = await tx.select({ one: sql`1` }).from(runs).where(eq(runs.hostId, hostId)).limit(1);
      if (used) throw usedByRuns();
      await tx.delete(hosts).where(eq(hosts.id, hostId));
      await recordAudit(tx, {
        actorUserId: principal.userId,
        groupId: host.groupId,
        action: "host.delete",
        targetType: "host",
        targetId: hostId,
        details: { name: host.name, address: host.address },
        ip,
      });
    });
  } catch (error) {
    // A run created between the check and the delete still holds the foreign key.
    if (pgErrorCode(error) === "23503") throw usedByRuns();
    throw error;
  }
}
