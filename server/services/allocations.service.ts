/**
 * Core-hour allocations of a group and their ledger. Amounts are whole core-seconds in the database;
 * the API speaks core-hours (shared/core-hours.ts). Balances come from the ledger:
 *   reserved  = Σreserve − Σrelease
 *   charged   = Σcharge
 *   available = granted − Σreserve + Σrelease − Σcharge
 * A run reserves its worst case when created and, when it ends, is charged what it used and has its
 * reservation released. Periods of one group do not overlap, so at any moment at most one is active.
 */
import { and, asc, eq, gt, inArray, lt, lte, sql } from "drizzle-orm";
import type { z } from "zod";
import { coreHoursFromSeconds, coreSecondsFromHours } from "../../shared/core-hours";
import type {
  Allocation,
  createAllocationRequestSchema,
  LedgerEntry,
} from "../../shared/schemas/allocations";
import { recordAudit } from "../audit/record-audit";
import type { Principal } from "../auth/principal";
import type { Database, DbExecutor } from "../db/client";
import { allocations, groups, ledgerEntries } from "../db/schema";
import { AppError, conflict, notFound } from "../http/errors";
import { requireGroupRole, requireRoleFor } from "./access";

export type AllocationRow = typeof allocations.$inferSelect;
export type LedgerTotals = { reserveSeconds: number; releaseSeconds: number; chargeSeconds: number };
export type CreateAllocationInput = z.output<typeof createAllocationRequestSchema>;

const ZERO: LedgerTotals = { reserveSeconds: 0, releaseSeconds: 0, chargeSeconds: 0 };

export function balanceOf(grantedCoreSeconds: number, totals: LedgerTotals) {
  return {
    reservedCoreSeconds: totals.reserveSeconds - totals.releaseSeconds,
    chargedCoreSeconds: totals.chargeSeconds,
    availableCoreSeconds:
      grantedCoreSeconds - totals.reserveSeconds + totals.releaseSeconds - totals.chargeSeconds,
  };
}

/** Sums are cast to bigint then read as numbers: exact up to 2^53 core-seconds (~2.5e12 core-hours). */
const sumOf = (kind: "reserve" | "release" | "charge") =>
  sql<string>`coalesce(sum(${ledgerEntries.coreSeconds}) filter (where ${ledgerEntries.kind} = ${kind}), 0)::bigint`;

async function ledgerTotals(db: DbExecutor, allocationIds: string[]): Promise<Map<string, LedgerTotals>> {
  if (allocationIds.length === 0) return new Map();
  const rows = await db
    .select({
      allocationId: ledgerEntries.allocationId,
      reserve: sumOf("reserve"),
      release: sumOf("release"),
      charge: sumOf("charge"),
    })
    .from(ledgerEntries)
    .where(inArray(ledgerEntries.allocationId, allocationIds))
    .groupBy(ledgerEntries.allocationId);
  return new Map(
    rows.map((row) => [
      row.allocationId,
      {
        reserveSeconds: Number(row.reserve),
        releaseSeconds: Number(row.release),
        chargeSeconds: Number(row.charge),
      },
    ]),
  );
}

function toAllocation(row: AllocationRow, totals: LedgerTotals): Allocation {
  const balance = balanceOf(row.grantedCoreSeconds, totals);
  return {
    id: row.id,
    groupId: row.groupId,
    name: row.name,
    grantedCoreHours: coreHoursFromSeconds(row.grantedCoreSeconds),
    reservedCoreHours: coreHoursFromSeconds(balance.reservedCoreSeconds),
    chargedCoreHours: coreHoursFromSeconds(balance.chargedCoreSeconds),
    availableCoreHours: coreHoursFromSeconds(balance.availableCoreSeconds),
    startsAt: row.startsAt.toISOString(),
    endsAt: row.endsAt.toISOString(),
  };
}

export async function listAllocations(
  db: Database,
  principal: Principal,
  groupId: string,
): Promise<Allocation[]> {
  await requireGroupRole(db, principal, groupId, "collaborator");
  const rows = await db
    .select()
    .from(allocations)
    .where(eq(allocations.groupId, groupId))
    .orderBy(asc(allocations.startsAt));
  const totals = await ledgerTotals(
    db,
    rows.map((row) => row.id),
  );
  return rows.map((row) => toAllocation(row, totals.get(row.id) ?? ZERO));
}

export async function createAllocation(
  db: Database,
  principal: Principal,
  groupId: string,
  input: CreateAllocationInput,
  ip: string | null,
): Promise<Allocation> {
  await requireGroupRole(db, principal, groupId, "admin");
  const grantedCoreSeconds = coreSecondsFromHours(input.coreHours);
  if (grantedCoreSeconds < 1) {
    throw new AppError(422, "validation_failed", "coreHours: grant at least one core-second.", [
      { path: "coreHours", message: "grant at least one core-second" },
    ]);
  }
  const startsAt = new Date(input.startsAt);
  const endsAt = new Date(input.endsAt);
  return db.transaction(async (tx) => {
    // Serialises allocation changes per group, so two overlapping periods cannot both pass the check.
    await tx.select({ id: groups.id }).from(groups).where(eq(groups.id, groupId)).for("update");
    const [overlapping] = await tx
      .select({ name: allocations.name, startsAt: allocations.startsAt, endsAt: allocations.endsAt })
      .from(allocations)
      .where(
        and(
          eq(allocations.groupId, groupId),
          lt(allocations.startsAt, endsAt),
          gt(allocations.endsAt, startsAt),
        ),
      )
      .limit(1);
    if (overlapping) {
      throw conflict(
        `This period overlaps the allocation "${overlapping.name}" (${overlapping.startsAt.toISOString()} to ${overlapping.endsAt.toISOString()}); a group has one allocation at a time.`,
        { path: "startsAt" },
      );
    }
    const [row] = await tx
      .insert(allocations)
      .values({
        groupId,
        name: input.name,
        grantedCoreSeconds,
        startsAt,
        endsAt,
        createdBy: principal.userId,
      })
      .returning();
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId,
      action: "allocation.create",
      targetType: "allocation",
      targetId: row!.id,
      details: { name: input.name, grantedCoreSeconds, startsAt: input.startsAt, endsAt: input.endsAt },
      ip,
    });
    return toAllocation(row!, ZERO);
  });
}

export async function allocationLedger(
  db: Database,
  principal: Principal,
  allocationId: string,
): Promise<LedgerEntry[]> {
  const [allocation] = await db
    .select({ groupId: allocations.groupId })
    .from(allocations)
    .where(eq(allocations.id, allocationId));
  if (!allocation) throw notFound("Allocation");
  await requireRoleFor(db, principal, allocation.groupId, "collaborator", "Allocation");
  const rows = await db
    .select()
    .from(ledgerEntries)
    .where(eq(ledgerEntries.allocationId, allocationId))
    .orderBy(asc(ledgerEntries.at), asc(ledgerEntries.id));
  return rows.map((row) => ({
    id: row.id,
    runId: row.runId,
    kind: row.kind,
    coreHours: coreHoursFromSeconds(row.coreSeconds),
    note: row.note,
    at: row.at.toISOString(),
  }));
}

/** The allocation covering `at` (the earliest-starting one when several do), or null. */
export async function activeAllocation(
  tx: DbExecutor,
  groupId: string,
  at: Date,
): Promise<AllocationRow | null> {
  const [row] = await tx
    .select()
    .from(allocations)
    .where(and(eq(allocations.groupId, groupId), lte(allocations.startsAt, at), gt(allocations.endsAt, at)))
    .orderBy(asc(allocations.startsAt))
    .limit(1);
  return row ?? null;
}

/**
 * For run creation, inside its transaction and as its last work: reserves `coreSeconds` for the run
 * when the allocation's balance allows, in one call of sigmaflow_reserve_core_seconds (drizzle/0003),
 * which locks the allocation row so concurrent reservations are serialised and reads the balance after
 * the lock is granted. The lock lasts until commit; taking it last, in one round trip, keeps the queue
 * of concurrent submissions short. Returns the balance before the reservation and whether it was made.
 */
export async function reserveAgainstAllocation(
  tx: DbExecutor,
  allocationId: string,
  runId: string | null,
  coreSeconds: number,
): Promise<{ reserved: boolean; availableCoreSeconds: number }> {
  const result = await tx.execute<{ available: string }>(
    sql`select sigmaflow_reserve_core_seconds(${allocationId}, ${runId}, ${coreSeconds}) as available`,
  );
  const available = Number(result.rows[0]!.available);
  return { reserved: available >= coreSeconds, availableCoreSeconds: available };
}
