/**
 * 50 submissions at the same moment against an allocation with room for exactly 10: the run-creation
 * transaction locks the allocation row, so exactly 10 are accepted and the ledger never overspends.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import {
  type FakeHost,
  registerDevHost,
  registerShellRecipe,
  runSpec,
  type Sigmaflow,
  startFakeHost,
  startSigmaflow,
} from "./support/lifecycle-harness";
import { createTestDatabase, type TestDatabase } from "./support/test-database";

let database: TestDatabase;
let sf: Sigmaflow;
let host: FakeHost;

beforeAll(async () => {
  database = await createTestDatabase("race");
  // Each run reserves 1 core × 10 min = 600 core-seconds; 10 of them fit in 100 core-minutes.
  sf = await startSigmaflow(database, { coreHours: (10 * 10) / 60, inProcessWorker: false });
  host = await startFakeHost();
}, 60_000);

afterAll(async () => {
  await sf?.close();
  await host?.stop();
  await database?.drop();
});

describe("allocation under concurrent submission", () => {
  it("accepts exactly as many runs as the allocation holds", async () => {
    const hostId = await registerDevHost(sf, host, { name: "race-host" });
    const recipeId = await registerShellRecipe(sf, "race");
    const results = await Promise.all(
      Array.from({ length: 50 }, (_, i) =>
        sf.api(
          "POST",
          `/api/groups/${sf.groupId}/runs`,
          runSpec(recipeId, hostId, { prepare: { label: `r${i}` } }, `race ${i}`),
        ),
      ),
    );
    const accepted = results.filter((r) => r.status === 201);
    const refused = results.filter((r) => r.status !== 201);
    expect(accepted).toHaveLength(10);
    expect(refused).toHaveLength(40);
    for (const r of refused) {
      expect(r.status).toBe(422);
      expect(r.body.error.code).toBe("allocation_exceeded");
      expect(r.body.error.message).toMatch(/has 0 left/);
    }
    const { rows } = await database.pool.query(
      "select coalesce(sum(core_seconds), 0)::bigint as reserved from ledger_entries where allocation_id = $1 and kind = 'reserve'",
      [sf.allocationId],
    );
    expect(Number(rows[0].reserved)).toBe(6000);
    const runs = await database.pool.query("select count(*)::int as n from runs where group_id = $1", [
      sf.groupId,
    ]);
    expect(runs.rows[0].n).toBe(10);
  });
});
