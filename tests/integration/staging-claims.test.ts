/**
 * Staging of a run never overlaps itself (worker/run-claims.ts). Regression: duplicate `run-stage`
 * items (start-up reconcile, free-slot wake-ups) staged one run twice at once; one attempt unlinked the
 * files the other was checking ("sha256sum: … No such file or directory") or that the submitted job was
 * reading (the job ended with exit code 2, or its declared results were missing).
 * Expected behaviour: PostgreSQL's session-level advisory locks (PostgreSQL 15 documentation, §9.27.10
 * "Advisory Lock Functions": held until released or the session ends).
 */
import pg from "pg";
import type PgBoss from "pg-boss";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createBoss, RUN_STEP_QUEUES } from "../../server/queue/queues";
import { RunClaims, runLockKey } from "../../worker/run-claims";
import {
  type FakeHost,
  registerDevHost,
  registerShellRecipe,
  runSpec,
  type Sigmaflow,
  startFakeHost,
  startSigmaflow,
  waitForState,
} from "./support/lifecycle-harness";
import { createTestDatabase, type TestDatabase } from "./support/test-database";
import { waitFor } from "./support/wait-for";

let database: TestDatabase;
const RUN_A = "0b7f30e1-4c1a-4d2e-9f00-5a1b2c3d4e5f";
const RUN_B = "9d0412d7-aa10-4bb0-8c11-00112233aabb";

beforeAll(async () => {
  database = await createTestDatabase("staging_claims");
}, 60_000);

afterAll(async () => {
  await database?.drop();
});

describe("staging claims", () => {
  it("let one attempt per run stage, in one process and across processes, until it releases", async () => {
    const first = new RunClaims(database.url, "staging");
    const second = new RunClaims(database.url, "staging");
    try {
      expect(await first.tryClaim(RUN_A)).toBe(true);
      expect(await first.tryClaim(RUN_A)).toBe(false); // same process: the in-process guard
      expect(await second.tryClaim(RUN_A)).toBe(false); // another worker process: the advisory lock
      expect(await second.tryClaim(RUN_B)).toBe(true); // another run is independent
      await first.release(RUN_A);
      expect(await second.tryClaim(RUN_A)).toBe(true);
    } finally {
      await first.close();
      await second.close();
    }
  });

  it("are given up by PostgreSQL when the worker holding them dies", async () => {
    const dying = new RunClaims(database.url, "staging");
    const survivor = new RunClaims(database.url, "staging");
    try {
      expect(await dying.tryClaim(RUN_A)).toBe(true);
      expect(await survivor.tryClaim(RUN_A)).toBe(false);
      // The session of the dying worker ends as it would when its process is killed.
      const admin = new pg.Client({ connectionString: database.url });
      await admin.connect();
      const { rows } = await admin.query(
        `select pg_terminate_backend(pid) as ended from pg_locks
          where locktype = 'advisory' and objid = $1 and granted`,
        [runLockKey(RUN_A)],
      );
      await admin.end();
      expect(rows.map((row) => row.ended)).toEqual([true]);
      await waitFor(
        "the lock of the ended session to be free",
        () => survivor.tryClaim(RUN_A),
        (claimed) => claimed,
      );
    } finally {
      await dying.close();
      await survivor.close();
    }
  });
});

describe("duplicate stage items for one run", () => {
  let sf: Sigmaflow;
  let host: FakeHost;
  let boss: PgBoss;

  beforeAll(async () => {
    sf = await startSigmaflow(database);
    host = await startFakeHost();
    boss = createBoss(database.url, { maintenance: false });
    await boss.start();
  }, 60_000);

  afterAll(async () => {
    await boss?.stop({ graceful: false });
    await sf?.close();
    await host?.stop();
  });

  it("stage and submit the run once, and it runs to done with its outputs", async () => {
    const hostId = await registerDevHost(sf, host, { name: "dup-host" });
    const recipeId = await registerShellRecipe(sf, "duplicates");
    const created = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: "N2-dup" } }),
    );
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const runId = created.body.id as string;
    await Promise.all(Array.from({ length: 6 }, () => boss.send(RUN_STEP_QUEUES.stage, { runId })));
    const run = await waitForState(sf, runId, ["done", "failed", "held"], 60_000);
    expect(run.state, run.stateMessage).toBe("done");
    const submitted = run.events.filter((e: { toState: string }) => e.toState === "submitted");
    expect(submitted).toHaveLength(1);
  }, 90_000);
});
