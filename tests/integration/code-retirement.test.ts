/**
 * Retiring a code version and bringing it back (PATCH /api/codes/:codeId): while retired, no new recipe
 * may use it (422 naming `stages.N.codeId`) and no run, preview or resubmission of a recipe using it is
 * accepted (422 naming the stage); runs made before keep their records; bringing it back lifts all of it.
 * Another group's code is 404, a collaborator is refused (403), and each change is in the group's activity.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { type Api, apiClient } from "./support/api-client";
import {
  type EngineScenario,
  registerShellRecipe,
  runSpec,
  type Sigmaflow,
  startEngineScenario,
} from "./support/lifecycle-harness";
import { addMember, createGroup, createUser, tokenFor } from "./support/people";
import type { TestDatabase } from "./support/test-database";
import { waitFor } from "./support/wait-for";

let scenario: EngineScenario;
let database: TestDatabase;
let sf: Sigmaflow;
let hostId = "";
let recipeId = "";
let prepareCode = { id: "", name: "", version: "" };
let scatterCodeId = "";
let earlierRunId = "";
const as: { member: Api; collaborator: Api; otherAdmin: Api } = {} as never;

beforeAll(async () => {
  scenario = await startEngineScenario("code_retirement", {
    sigmaflow: { inProcessWorker: false },
    host: { name: "retirement-host" },
  });
  ({ database, sf, hostId } = scenario);
  recipeId = await registerShellRecipe(sf, "retiring");
  const recipe = await sf.api("GET", `/api/recipes/${recipeId}`);
  expect(recipe.status, JSON.stringify(recipe.body)).toBe(200);
  const [prepare, scatter] = recipe.body.stages;
  prepareCode = { id: prepare.codeId, name: prepare.codeName, version: prepare.codeVersion };
  scatterCodeId = scatter.codeId;

  const db = database.db;
  const member = await createUser(db, "retire-member");
  const collaborator = await createUser(db, "retire-collaborator");
  const otherAdmin = await createUser(db, "retire-other-admin");
  const otherGroup = await createGroup(db, "retire-elsewhere");
  await addMember(db, member.id, sf.groupId, "member");
  await addMember(db, collaborator.id, sf.groupId, "collaborator");
  await addMember(db, otherAdmin.id, otherGroup.id, "admin");
  as.member = apiClient(sf.app.baseUrl, await tokenFor(db, member));
  as.collaborator = apiClient(sf.app.baseUrl, await tokenFor(db, collaborator));
  as.otherAdmin = apiClient(sf.app.baseUrl, await tokenFor(db, otherAdmin));

  // A run made before the code is retired: it stays queued (no worker) and must stay untouched.
  const earlier = await sf.api(
    "POST",
    `/api/groups/${sf.groupId}/runs`,
    runSpec(recipeId, hostId, { prepare: { label: "before" } }, "before retirement"),
  );
  expect(earlier.status, JSON.stringify(earlier.body)).toBe(201);
  earlierRunId = earlier.body.id;
}, 60_000);

afterAll(async () => {
  await scenario?.close();
});

const retire = (api: Api, codeId: string, retired: unknown) =>
  api("PATCH", `/api/codes/${codeId}`, { retired });
const newRecipe = (name: string) =>
  sf.api("POST", `/api/groups/${sf.groupId}/recipes`, {
    name,
    stages: [
      { name: "prepare", codeId: prepareCode.id },
      { name: "scatter", codeId: scatterCodeId },
    ],
  });
const spec = (name: string) => runSpec(recipeId, hostId, { prepare: { label: "after" } }, name);

describe("retiring a code version", () => {
  it("refuses bad bodies, naming the field, and keeps the code active", async () => {
    const notBoolean = await retire(sf.api, prepareCode.id, "yes");
    expect(notBoolean.status).toBe(422);
    expect(JSON.stringify(notBoolean.body.error)).toContain("retired");
    const extra = await sf.api("PATCH", `/api/codes/${prepareCode.id}`, { retired: true, name: "x" });
    expect(extra.status).toBe(422);
    expect(JSON.stringify(extra.body.error)).toContain("name");
    const badId = await retire(sf.api, "not-a-uuid", true);
    expect(badId.status).toBe(422);
    expect(JSON.stringify(badId.body.error)).toContain("codeId");
    expect((await sf.api("GET", `/api/codes/${prepareCode.id}`)).body.retiredAt).toBeNull();
  });

  it("answers 404 for another group's code and 403 for a collaborator, changing nothing", async () => {
    expect((await retire(as.otherAdmin, prepareCode.id, true)).status).toBe(404);
    const refused = await retire(as.collaborator, prepareCode.id, true);
    expect(refused.status).toBe(403);
    expect(refused.body.error.message).toMatch(/members and admins/);
    expect((await sf.api("GET", `/api/codes/${prepareCode.id}`)).body.retiredAt).toBeNull();
  });

  it("lets a member retire it; new recipes, runs, previews and resubmissions are refused", async () => {
    const retired = await retire(as.member, prepareCode.id, true);
    expect(retired.status, JSON.stringify(retired.body)).toBe(200);
    expect(Date.parse(retired.body.retiredAt)).toBeGreaterThan(Date.now() - 60_000);
    // The list shows the flag too; the other stage's code is still active.
    const list = await sf.api("GET", `/api/groups/${sf.groupId}/codes`);
    const byId = new Map(list.body.codes.map((c: { id: string; retiredAt: string | null }) => [c.id, c]));
    expect((byId.get(prepareCode.id) as { retiredAt: string }).retiredAt).toBe(retired.body.retiredAt);
    expect((byId.get(scatterCodeId) as { retiredAt: null }).retiredAt).toBeNull();

    const label = `${prepareCode.name} ${prepareCode.version}`;
    const recipe = await newRecipe("with-retired");
    expect(recipe.status).toBe(422);
    expect(recipe.body.error.details).toEqual([
      {
        path: "stages.0.codeId",
        message: `${label} is retired; use a newer version or bring it back.`,
      },
    ]);

    const stageProblem = {
      path: "spec.parameters.prepare",
      message: `Stage prepare: ${label} is retired; use a newer version or bring it back.`,
    };
    const submitted = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, spec("after retirement"));
    expect(submitted.status).toBe(422);
    expect(submitted.body.error.details).toEqual([stageProblem]);
    const previewed = await sf.api("POST", `/api/groups/${sf.groupId}/runs/preview`, {
      spec: spec("after retirement").spec,
    });
    expect(previewed.status).toBe(422);
    expect(previewed.body.error).toEqual(submitted.body.error);
    const resubmitted = await sf.api("POST", `/api/runs/${earlierRunId}/resubmit`, {});
    expect(resubmitted.status).toBe(422);
    expect(resubmitted.body.error.details).toEqual([stageProblem]);

    // The run made before is untouched and still listed with the recipe.
    const earlier = await sf.api("GET", `/api/runs/${earlierRunId}`);
    expect(earlier.status).toBe(200);
    expect(earlier.body.state).toBe("queued");
    const { rows } = await database.pool.query("select count(*)::int as n from runs where recipe_id = $1", [
      recipeId,
    ]);
    expect(rows[0].n).toBe(1);
  });

  it("retiring twice changes nothing and writes one audit entry", async () => {
    const again = await retire(sf.api, prepareCode.id, true);
    expect(again.status).toBe(200);
    const { rows } = await database.pool.query(
      "select count(*)::int as n from audit_log where action = 'code.retire' and target_id = $1",
      [prepareCode.id],
    );
    expect(rows[0].n).toBe(1);
  });

  it("brings it back: recipes, previews and runs with it are accepted again", async () => {
    const back = await retire(sf.api, prepareCode.id, false);
    expect(back.status, JSON.stringify(back.body)).toBe(200);
    expect(back.body.retiredAt).toBeNull();
    const recipe = await newRecipe("brought-back");
    expect(recipe.status, JSON.stringify(recipe.body)).toBe(201);
    const previewed = await sf.api("POST", `/api/groups/${sf.groupId}/runs/preview`, {
      spec: spec("after return").spec,
    });
    expect(previewed.status, JSON.stringify(previewed.body)).toBe(200);
    const submitted = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, spec("after return"));
    expect(submitted.status, JSON.stringify(submitted.body)).toBe(201);
  });

  it("records both changes in the group's activity, naming the code version", async () => {
    const activity = await sf.api("GET", `/api/groups/${sf.groupId}/audit`);
    expect(activity.status).toBe(200);
    const entries = activity.body.entries.filter(
      (entry: { targetId: string; action: string }) =>
        entry.targetId === prepareCode.id && entry.action !== "code.create",
    );
    const label = `${prepareCode.name} ${prepareCode.version}`;
    expect(entries).toEqual([
      expect.objectContaining({ action: "code.restore", targetName: label, targetExists: true }),
      expect.objectContaining({ action: "code.retire", targetName: label, targetExists: true }),
    ]);
  });

  it("refuses a run whose code is retired while the run is being stored", async () => {
    const runsBefore = await runCount();
    // The retirement, caught between its row lock and its commit: as PATCH does it, FOR UPDATE first.
    const retiring = await database.pool.connect();
    try {
      await retiring.query("begin");
      await retiring.query("select 1 from codes where id = $1 for update", [prepareCode.id]);
      await retiring.query("update codes set retired_at = now() where id = $1", [prepareCode.id]);
      let answered = false;
      const submitted = sf.api("POST", `/api/groups/${sf.groupId}/runs`, spec("retired meanwhile"));
      void submitted.finally(() => {
        answered = true;
      });
      // The submission read the code as active; storing the run must wait for the retirement's outcome.
      const waiting = await waitFor(
        "the submission to wait on the code's row lock, or to answer",
        async () => {
          if (answered) return "answered";
          const { rows } = await database.pool.query(
            "select count(*)::int as n from pg_stat_activity where datname = current_database() and wait_event_type = 'Lock'",
          );
          return rows[0].n > 0 ? "waiting" : "neither";
        },
        (state) => state !== "neither",
        { timeoutMs: 15_000 },
      );
      expect(waiting, JSON.stringify(answered ? (await submitted).body : null)).toBe("waiting");
      await retiring.query("commit");
      const response = await submitted;
      expect(response.status, JSON.stringify(response.body)).toBe(422);
      expect(response.body.error.code).toBe("retired_code");
      expect(await runCount()).toBe(runsBefore);
    } finally {
      await retiring.query("rollback").catch(() => {});
      retiring.release();
      await database.pool.query("update codes set retired_at = null where id = $1", [prepareCode.id]);
    }
  });
});

async function runCount(): Promise<number> {
  const { rows } = await database.pool.query("select count(*)::int as n from runs");
  return rows[0].n;
}
