/**
 * POST /api/groups/:groupId/runs/preview: the checks of a submission (same 422s naming the field), the
 * cost and the allocation's balance before and after, the rendered files and batch script, the finished
 * run with the same fingerprint — and nothing stored (row counts and the queue unchanged).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiClient } from "./support/api-client";
import { type Caller, createMatrixCallers, describeMatrix, groupWrite } from "./support/authorization-matrix";
import {
  type EngineScenario,
  type FakeHost,
  registerDevHost,
  registerShellRecipe,
  runSpec,
  type Sigmaflow,
  startEngineScenario,
} from "./support/lifecycle-harness";
import { addMember, createGroup, createUser, tokenFor } from "./support/people";
import type { TestDatabase } from "./support/test-database";

let scenario: EngineScenario;
let database: TestDatabase;
let sf: Sigmaflow;
let host: FakeHost;
let hostId: string;
let recipeId: string;

/** The matrix's group, with its own confirmed host, recipe and allocation. */
const matrix = { groupId: "", hostId: "", recipeId: "", tokens: new Map<Caller, string>() };

// 1000 core-hours granted (startSigmaflow); 4 cores × 90 min = 6 core-hours.
const GRANTED_CORE_HOURS = 1000;

beforeAll(async () => {
  scenario = await startEngineScenario("run_preview", {
    sigmaflow: { coreHours: GRANTED_CORE_HOURS, inProcessWorker: false },
    host: { name: "preview-host" },
  });
  ({ database, sf, host, hostId } = scenario);
  recipeId = await registerShellRecipe(sf, "preview");

  const callers = await createMatrixCallers(database.db);
  const adminToken = callers.tokens.get("groupAdmin")!;
  const asAdmin = { api: apiClient(sf.app.baseUrl, adminToken), groupId: callers.groupId } as Sigmaflow;
  const now = Date.now();
  const allocation = await asAdmin.api("POST", `/api/groups/${callers.groupId}/allocations`, {
    name: "Matrix quarter",
    coreHours: 100,
    startsAt: new Date(now - 86_400_000).toISOString(),
    endsAt: new Date(now + 30 * 86_400_000).toISOString(),
  });
  expect(allocation.status, JSON.stringify(allocation.body)).toBe(201);
  Object.assign(matrix, {
    groupId: callers.groupId,
    hostId: await registerDevHost(asAdmin, host, { name: "matrix-host" }),
    recipeId: await registerShellRecipe(asAdmin, "matrix"),
    tokens: callers.tokens,
  });
}, 60_000);

afterAll(async () => {
  await scenario?.close();
});

const preview = (spec: unknown) => sf.api("POST", `/api/groups/${sf.groupId}/runs/preview`, { spec });

function spec(parameters: Record<string, Record<string, unknown>>, resources?: object) {
  const { spec: base } = runSpec(recipeId, hostId, parameters, "preview run");
  return resources ? { ...base, resources } : base;
}

/** Rows a submission would write, and the queue items it would send. */
async function counts() {
  const { rows } = await database.pool.query(
    `select (select count(*) from runs)::int as runs,
            (select count(*) from run_events)::int as events,
            (select count(*) from ledger_entries)::int as ledger,
            (select count(*) from audit_log)::int as audit,
            (select count(*) from pgboss.job)::int as queued`,
  );
  return rows[0];
}

describe("run preview", () => {
  it("answers cost, balance before and after, the rendered files and script, and stores nothing", async () => {
    const before = await counts();
    const response = await preview(spec({ prepare: { label: "water" } }, { cores: 4, wallTimeMinutes: 90 }));
    expect(response.status, JSON.stringify(response.body)).toBe(200);
    const body = response.body;
    // Core-hours = cores × wall time (server/services/run-create.service.ts reserves the same): 4 × 1.5 h.
    expect(body.costCoreHours).toBe(6);
    expect(body.resources).toEqual({ cores: 4, wallTimeMinutes: 90 });
    expect(body.allocation.availableCoreHoursBefore).toBe(GRANTED_CORE_HOURS);
    expect(body.allocation.availableCoreHoursAfter).toBe(GRANTED_CORE_HOURS - 6);
    expect(body.refusal).toBeNull();
    expect(body.reusable).toBeNull();
    expect(body.stages.map((s: { name: string }) => s.name)).toEqual(["prepare", "scatter"]);
    // Defaults from the codes' schemas are filled in, as the run would store them.
    expect(body.stages[0].parameters).toEqual({ label: "water", sleepSeconds: 0 });
    expect(body.stages[1].parameters).toEqual({ exitCode: 0 });
    const notes = body.stages[0].files.find((f: { relativePath: string }) =>
      f.relativePath.endsWith("/notes.txt"),
    );
    expect(notes).toMatchObject({ relativePath: "stage-1-prepare/notes.txt", text: "label: water\n" });
    expect(body.script.relativePath).toBe("job.sh");
    expect(body.script.text).toMatch(/^#!\/bin\/sh\n/);
    expect(body.script.text).toContain("stage 2/2 scatter");
    expect(await counts()).toEqual(before);
  });

  it("refuses invalid parameters with the same 422 and field as submission", async () => {
    const bad = spec({ prepare: { label: "x", sleepSeconds: 999 } });
    const previewed = await preview(bad);
    const submitted = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, {
      spec: bad,
      onDuplicate: "run",
    });
    expect(previewed.status).toBe(422);
    expect(submitted.status).toBe(422);
    expect(previewed.body.error).toEqual(submitted.body.error);
    expect(previewed.body.error.details).toContainEqual({
      path: "spec.parameters.prepare.sleepSeconds",
      message: "must be <= 60",
    });
    const missing = await preview(spec({ prepare: {} }));
    expect(missing.status).toBe(422);
    expect(missing.body.error.details).toContainEqual({
      path: "spec.parameters.prepare.label",
      message: "is required",
    });
  });

  it("refuses a body that is not a run spec, naming the field", async () => {
    const response = await preview({ ...spec({ prepare: { label: "x" } }), resources: { cores: 0 } });
    expect(response.status).toBe(422);
    expect(JSON.stringify(response.body.error)).toContain("cores");
  });

  it("says when the allocation would refuse the run, without reserving", async () => {
    const before = await counts();
    // 4096 cores × 43,200 min ≫ 1000 core-hours.
    const response = await preview(
      spec({ prepare: { label: "big" } }, { cores: 4096, wallTimeMinutes: 43_200 }),
    );
    expect(response.status).toBe(200);
    expect(response.body.refusal.code).toBe("allocation_exceeded");
    expect(response.body.refusal.message).toMatch(/needs 2949120 core-hours/);
    expect(response.body.allocation.availableCoreHoursAfter).toBe(GRANTED_CORE_HOURS - 4096 * 720);
    expect(await counts()).toEqual(before);
  });

  it("offers the finished run with the same fingerprint", async () => {
    const same = spec({ prepare: { label: "reused" } });
    const created = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, {
      spec: same,
      onDuplicate: "run",
    });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const notYet = await preview(same);
    expect(notYet.body.reusable).toBeNull();
    // The worker is not running in this file: the run is settled as the collect step would leave it.
    await database.pool.query(
      "update runs set state = 'done', finished_at = now(), results_state = 'derived' where id = $1",
      [created.body.id],
    );
    const response = await preview({
      ...same,
      name: "another name",
      resources: { cores: 2, wallTimeMinutes: 5 },
    });
    expect(response.status).toBe(200);
    expect(response.body.reusable).toMatchObject({
      id: created.body.id,
      name: "preview run",
      resultsState: "derived",
    });
    expect(response.body.fingerprint).toBe(created.body.fingerprint);
    const other = await preview(spec({ prepare: { label: "something else" } }));
    expect(other.body.reusable).toBeNull();
  });

  it("refuses another group's recipe as submission does, and hides the group from outsiders", async () => {
    const outsiderGroup = await createGroup(database.db, "outsider");
    const outsider = await createUser(database.db, "outsider");
    await addMember(database.db, outsider.id, outsiderGroup.id, "admin");
    const asOutsider = {
      api: apiClient(sf.app.baseUrl, await tokenFor(database.db, outsider)),
      groupId: outsiderGroup.id,
    } as Sigmaflow;
    const foreignRecipe = await registerShellRecipe(asOutsider, "foreign");
    const foreign = { ...spec({}), recipeId: foreignRecipe };
    const previewed = await preview(foreign);
    const submitted = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, {
      spec: foreign,
      onDuplicate: "run",
    });
    expect(previewed.status).toBe(422);
    expect(previewed.body.error).toEqual(submitted.body.error);
    expect(previewed.body.error.details).toContainEqual({
      path: "spec.recipeId",
      message: "Unknown recipe.",
    });
    const intoOurs = await asOutsider.api("POST", `/api/groups/${sf.groupId}/runs/preview`, {
      spec: spec({ prepare: { label: "x" } }),
    });
    expect(intoOurs.status).toBe(404);
  });
});

describeMatrix(
  "authorization matrix: run preview",
  [
    {
      name: "preview a run",
      method: "POST",
      path: () => `/api/groups/${matrix.groupId}/runs/preview`,
      body: () => ({
        spec: {
          name: "matrix preview",
          recipeId: matrix.recipeId,
          hostId: matrix.hostId,
          parameters: { prepare: { label: "m" } },
        },
      }),
      expected: groupWrite(200),
    },
  ],
  () => ({ baseUrl: sf.app.baseUrl, tokens: matrix.tokens }),
);
