/**
 * Allocations and their ledger. Balances follow Sigmaflow's ledger rule (server/services/allocations.service.ts):
 * available = granted − Σreserve + Σrelease − Σcharge, reserved = Σreserve − Σrelease, hours = seconds / 3600.
 * Expected figures are worked by hand in each test and compared exactly (all are multiples of 1/3600 h
 * that binary floating point represents after one division).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ledgerEntries } from "../../server/db/schema";
import { activeAllocation, reserveAgainstAllocation } from "../../server/services/allocations.service";
import { callApi } from "./support/host-test-app";
import { addMember, createGroup, createUser, tokenFor } from "./support/people";
import { startTestApp } from "./support/test-app";
import { createTestDatabase, type TestDatabase } from "./support/test-database";
import { waitFor } from "./support/wait-for";

let database: TestDatabase;
let app: Awaited<ReturnType<typeof startTestApp>>;
let groupId = "";
const tokens = { admin: "", member: "", collaborator: "" };

const call = (who: keyof typeof tokens, method: string, path: string, body?: unknown) =>
  callApi(app.baseUrl, tokens[who], method, path, body);

const allocationCount = async () =>
  (await database.pool.query("select count(*)::int as n from allocations")).rows[0].n as number;

beforeAll(async () => {
  database = await createTestDatabase("allocations");
  app = await startTestApp(database);
  const db = database.db;
  groupId = (await createGroup(db, "alloc")).id;
  const admin = await createUser(db, "admin");
  const member = await createUser(db, "member");
  const collaborator = await createUser(db, "collaborator");
  await addMember(db, admin.id, groupId, "admin");
  await addMember(db, member.id, groupId, "member");
  await addMember(db, collaborator.id, groupId, "collaborator");
  tokens.admin = await tokenFor(db, admin);
  tokens.member = await tokenFor(db, member);
  tokens.collaborator = await tokenFor(db, collaborator);
});

afterAll(async () => {
  await app?.close();
  await database?.drop();
});

const spring = {
  name: "Spring 2031",
  coreHours: 1000,
  startsAt: "2031-03-01T00:00:00Z",
  endsAt: "2031-06-01T00:00:00Z",
};
let springId = "";

describe("creating allocations", () => {
  it("lets an admin grant core-hours for a period", async () => {
    const reply = await call("admin", "POST", `/api/groups/${groupId}/allocations`, spring);
    expect(reply.status, reply.text).toBe(201);
    expect(reply.body).toMatchObject({
      name: "Spring 2031",
      grantedCoreHours: 1000,
      reservedCoreHours: 0,
      chargedCoreHours: 0,
      availableCoreHours: 1000,
      startsAt: "2031-03-01T00:00:00.000Z",
    });
    springId = reply.body.id;
    const row = await database.pool.query("select granted_core_seconds from allocations where id = $1", [
      springId,
    ]);
    expect(Number(row.rows[0].granted_core_seconds)).toBe(3_600_000); // 1000 h × 3600 s/h
  });

  it("refuses a period overlapping another (409) but takes one that starts where the last ends", async () => {
    const before = await allocationCount();
    const overlap = await call("admin", "POST", `/api/groups/${groupId}/allocations`, {
      ...spring,
      name: "Overlap",
      startsAt: "2031-05-31T00:00:00Z",
      endsAt: "2031-07-01T00:00:00Z",
    });
    expect(overlap.status).toBe(409);
    expect(overlap.body.error.message).toContain("Spring 2031");
    expect(await allocationCount()).toBe(before);
    const next = await call("admin", "POST", `/api/groups/${groupId}/allocations`, {
      ...spring,
      name: "Summer 2031",
      coreHours: 0.5,
      startsAt: "2031-06-01T00:00:00Z",
      endsAt: "2031-09-01T00:00:00Z",
    });
    expect(next.status, next.text).toBe(201);
    expect(next.body.grantedCoreHours).toBe(0.5);
  });

  it("refuses bad periods and amounts, writing nothing", async () => {
    const before = await allocationCount();
    for (const body of [
      { ...spring, startsAt: "2031-02-01T00:00:00Z", endsAt: "2031-01-01T00:00:00Z" },
      { ...spring, coreHours: -5 },
      { ...spring, coreHours: 0.0001 }, // 0.36 s rounds to no whole core-second
      { ...spring, startsAt: "yesterday" },
    ]) {
      const reply = await call("admin", "POST", `/api/groups/${groupId}/allocations`, body);
      expect(reply.status, JSON.stringify(body)).toBe(422);
    }
    expect(await allocationCount()).toBe(before);
  });

  it("is for admins only; everyone in the group reads", async () => {
    expect((await call("member", "POST", `/api/groups/${groupId}/allocations`, spring)).status).toBe(403);
    const listed = await call("collaborator", "GET", `/api/groups/${groupId}/allocations`);
    expect(listed.body.allocations.map((a: { name: string }) => a.name)).toEqual([
      "Spring 2031",
      "Summer 2031",
    ]);
  });
});

describe("balances from the ledger", () => {
  it("computes reserved, charged and available core-hours", async () => {
    await database.db.insert(ledgerEntries).values([
      { allocationId: springId, kind: "reserve", coreSeconds: 7200, note: "run A" },
      { allocationId: springId, kind: "reserve", coreSeconds: 3600, note: "run B" },
      { allocationId: springId, kind: "release", coreSeconds: 3600, note: "run B finished" },
      { allocationId: springId, kind: "charge", coreSeconds: 1800, note: "run B used" },
    ]);
    // reserved = (7200 + 3600 − 3600) s = 2 h; charged = 1800 s = 0.5 h;
    // available = 1000 h − 3 h + 1 h − 0.5 h = 997.5 h
    const listed = await call("member", "GET", `/api/groups/${groupId}/allocations`);
    expect(listed.body.allocations[0]).toMatchObject({
      reservedCoreHours: 2,
      chargedCoreHours: 0.5,
      availableCoreHours: 997.5,
    });
    expect(
      (await database.db.transaction((tx) => reserveAgainstAllocation(tx, springId, null, 0)))
        .availableCoreSeconds,
    ).toBe(3_600_000 - 10_800 + 3600 - 1800);
    const ledger = await call("collaborator", "GET", `/api/allocations/${springId}/ledger`);
    expect(
      ledger.body.entries.map((e: { kind: string; coreHours: number }) => [e.kind, e.coreHours]),
    ).toEqual([
      ["reserve", 2],
      ["reserve", 1],
      ["release", 1],
      ["charge", 0.5],
    ]);
  });
});

describe("the active allocation", () => {
  it("is the one whose period contains the moment, end excluded", async () => {
    const db = database.db;
    const inside = await db.transaction((tx) =>
      activeAllocation(tx, groupId, new Date("2031-04-15T12:00:00Z")),
    );
    expect(inside?.id).toBe(springId);
    const boundary = await db.transaction((tx) =>
      activeAllocation(tx, groupId, new Date("2031-06-01T00:00:00Z")),
    );
    expect(boundary?.name).toBe("Summer 2031");
    expect(
      await db.transaction((tx) => activeAllocation(tx, groupId, new Date("2030-01-01T00:00:00Z"))),
    ).toBeNull();
  });

  it("is locked for the reservation, so a second one waits for the first and sees its entry", async () => {
    const db = database.db;
    const at = new Date("2031-04-15T12:00:00Z");
    let letFirstCommit!: () => void;
    const firstMayCommit = new Promise<void>((resolve) => {
      letFirstCommit = resolve;
    });
    let firstHoldsLock!: () => void;
    const firstLocked = new Promise<void>((resolve) => {
      firstHoldsLock = resolve;
    });
    const first = db.transaction(async (tx) => {
      const allocation = await activeAllocation(tx, groupId, at);
      expect((await reserveAgainstAllocation(tx, allocation!.id, null, 36_000)).reserved).toBe(true);
      firstHoldsLock();
      await firstMayCommit;
    });
    await firstLocked;
    const second = db.transaction(async (tx) => {
      const allocation = await activeAllocation(tx, groupId, at);
      return (await reserveAgainstAllocation(tx, allocation!.id, null, 0)).availableCoreSeconds;
    });
    // The second transaction is blocked on the row lock until the first commits.
    await waitFor(
      "the second reservation to wait for the allocation's row lock",
      async () => {
        const waiting = await database.pool.query(
          "select count(*)::int as n from pg_stat_activity where datname = current_database() and wait_event_type = 'Lock' and query ilike '%sigmaflow_reserve_core_seconds%'",
        );
        return waiting.rows[0].n as number;
      },
      (n) => n === 1,
      { timeoutMs: 10_000, intervalMs: 20 },
    );
    letFirstCommit();
    await first;
    // 3 600 000 − 10 800 + 3600 − 1800 (earlier entries) − 36 000 (the first reservation) core-seconds
    expect(await second).toBe(3_555_000);
  });
});
