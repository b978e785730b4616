/**
 * Where a code version is installed (PATCH /api/codes/:codeId { hostIds }): a version pinned to no host
 * runs anywhere in its group; a pinned one only on its hosts, so a run or preview naming another host is
 * refused with 422 at `spec.hostId`, naming the stage, the code and where it is installed. Bad lists are
 * refused naming the entry, collaborators get 403, another group's code 404, and a change is in the
 * group's activity.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { type Api, apiClient } from "./support/api-client";
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
let installedHostId = "";
let otherHostId = "";
let foreignHostId = "";
let recipeId = "";
let prepareCodeId = "";
let prepareLabel = "";
const as: { collaborator: Api; otherAdmin: Api } = {} as never;

beforeAll(async () => {
  scenario = await startEngineScenario("code_hosts", {
    sigmaflow: { inProcessWorker: false },
    host: { name: "orbital-node" },
  });
  ({ database, sf, host, hostId: installedHostId } = scenario);
  otherHostId = await registerDevHost(sf, host, { name: "spare-node" });
  recipeId = await registerShellRecipe(sf, "pinned");
  const recipe = await sf.api("GET", `/api/recipes/${recipeId}`);
  expect(recipe.status, JSON.stringify(recipe.body)).toBe(200);
  prepareCodeId = recipe.body.stages[0].codeId;
  prepareLabel = `${recipe.body.stages[0].codeName} ${recipe.body.stages[0].codeVersion}`;

  const db = database.db;
  const collaborator = await createUser(db, "hosts-collaborator");
  const otherAdmin = await createUser(db, "hosts-other-admin");
  const otherGroup = await createGroup(db, "hosts-elsewhere");
  await addMember(db, collaborator.id, sf.groupId, "collaborator");
  await addMember(db, otherAdmin.id, otherGroup.id, "admin");
  as.collaborator = apiClient(sf.app.baseUrl, await tokenFor(db, collaborator));
  as.otherAdmin = apiClient(sf.app.baseUrl, await tokenFor(db, otherAdmin));
  const foreign = await as.otherAdmin("POST", `/api/groups/${otherGroup.id}/hosts`, {
    name: "elsewhere-node",
    address: "127.0.0.1",
    port: host.port,
    scheduler: "direct",
    remoteBaseDir: "runs",
  });
  expect(foreign.status, JSON.stringify(foreign.body)).toBe(201);
  foreignHostId = foreign.body.id;
}, 60_000);

afterAll(async () => {
  await scenario?.close();
});

const pin = (api: Api, hostIds: unknown) => api("PATCH", `/api/codes/${prepareCodeId}`, { hostIds });
const spec = (hostId: string, name: string) => runSpec(recipeId, hostId, { prepare: { label: name } }, name);

describe("pinning a code version to hosts", () => {
  it("starts unpinned, and a run may go to any of the group's hosts", async () => {
    const code = await sf.api("GET", `/api/codes/${prepareCodeId}`);
    expect(code.body.hostIds).toEqual([]);
    const run = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, spec(otherHostId, "unpinned"));
    expect(run.status, JSON.stringify(run.body)).toBe(201);
  });

  it("refuses bad lists naming the entry, and changes nothing", async () => {
    const cases: [unknown, number, string][] = [
      ["orbital-node", 422, "hostIds"],
      [["not-a-uuid"], 422, "hostIds.0"],
      [[installedHostId, installedHostId], 422, "hostIds"],
      [[installedHostId, foreignHostId], 422, "hostIds.1"],
      [[crypto.randomUUID()], 422, "hostIds.0"],
    ];
    for (const [hostIds, status, path] of cases) {
      const response = await pin(sf.api, hostIds);
      expect(response.status, JSON.stringify(response.body)).toBe(status);
      const paths = (response.body.error.details as { path: string }[]).map((d) => d.path);
      expect(
        paths.some((p) => p === path || p === `body.${path}`),
        JSON.stringify(paths),
      ).toBe(true);
    }
    const empty = await sf.api("PATCH", `/api/codes/${prepareCodeId}`, {});
    expect(empty.status).toBe(422);
    expect((await sf.api("GET", `/api/codes/${prepareCodeId}`)).body.hostIds).toEqual([]);
  });

  it("answers 403 to a collaborator and 404 to another group's admin", async () => {
    expect((await pin(as.collaborator, [installedHostId])).status).toBe(403);
    expect((await pin(as.otherAdmin, [foreignHostId])).status).toBe(404);
    expect((await sf.api("GET", `/api/codes/${prepareCodeId}`)).body.hostIds).toEqual([]);
  });

  it("pins it: listed with the code, and runs and previews elsewhere are refused at spec.hostId", async () => {
    const pinned = await pin(sf.api, [installedHostId]);
    expect(pinned.status, JSON.stringify(pinned.body)).toBe(200);
    expect(pinned.body.hostIds).toEqual([installedHostId]);
    const list = await sf.api("GET", `/api/groups/${sf.groupId}/codes`);
    const listed = list.body.codes.find((c: { id: string }) => c.id === prepareCodeId);
    expect(listed.hostIds).toEqual([installedHostId]);

    const problem = {
      path: "spec.hostId",
      message: `Stage prepare: ${prepareLabel} is not installed on spare-node; it is on orbital-node.`,
    };
    const refused = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, spec(otherHostId, "elsewhere"));
    expect(refused.status, JSON.stringify(refused.body)).toBe(422);
    expect(refused.body.error.code).toBe("code_not_on_host");
    expect(refused.body.error.details).toEqual([problem]);
    const previewed = await sf.api("POST", `/api/groups/${sf.groupId}/runs/preview`, {
      spec: spec(otherHostId, "elsewhere").spec,
    });
    expect(previewed.status).toBe(422);
    expect(previewed.body.error.details).toEqual([problem]);
    const { rows } = await database.pool.query(
      "select count(*)::int as n from runs where name = 'elsewhere'",
    );
    expect(rows[0].n).toBe(0);

    const accepted = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      spec(installedHostId, "installed"),
    );
    expect(accepted.status, JSON.stringify(accepted.body)).toBe(201);
  });

  it("unpins it with an empty list, and records each change in the group's activity", async () => {
    const unpinned = await pin(sf.api, []);
    expect(unpinned.status).toBe(200);
    expect(unpinned.body.hostIds).toEqual([]);
    // The same list again is no change and no entry.
    expect((await pin(sf.api, [])).status).toBe(200);
    const run = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, spec(otherHostId, "anywhere again"));
    expect(run.status, JSON.stringify(run.body)).toBe(201);

    const activity = await sf.api("GET", `/api/groups/${sf.groupId}/audit`);
    expect(activity.status).toBe(200);
    const entries = activity.body.entries.filter(
      (entry: { targetId: string; action: string }) =>
        entry.targetId === prepareCodeId && entry.action === "code.hosts",
    );
    expect(entries.map((e: { details: { installedOn: string } }) => e.details.installedOn)).toEqual([
      "any of the group's hosts",
      "orbital-node",
    ]);
  });
});
