/**
 * Regression: a personal host account, once used, locked its owner out. A member's personal account
 * takes priority over the group account; when the host refused it, every run of that member on that host
 * was held, and the account could not be deleted because runs had used it. Now its owner (or an admin)
 * disables it — new runs then use the group account — or replaces it, runs keep the record of the
 * account they used, and the held reason names the refused account (user name @ host, personal or
 * group). The development host accepts only the user `sigmaflow` with an authorized key.
 */
import { readFile, writeFile } from "node:fs/promises";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import {
  type Api,
  apiClient,
  type EngineScenario,
  type FakeHost,
  registerShellRecipe,
  runSpec,
  type Sigmaflow,
  startEngineScenario,
  waitForState,
} from "./support/lifecycle-harness";
import { addMember, createUser, tokenFor } from "./support/people";
import type { TestDatabase } from "./support/test-database";

let scenario: EngineScenario;
let database: TestDatabase;
let sf: Sigmaflow;
let host: FakeHost;
let hostId: string;
let recipeId: string;
let member: Api;

beforeAll(async () => {
  scenario = await startEngineScenario("host_accounts");
  ({ database, sf, host, hostId } = scenario);
  recipeId = await registerShellRecipe(sf);
  const user = await createUser(database.db, "member");
  await addMember(database.db, user.id, sf.groupId, "member");
  member = apiClient(sf.app.baseUrl, await tokenFor(database.db, user));
}, 60_000);

afterAll(async () => {
  await scenario?.close();
});

async function submit(api: Api, label: string, sleepSeconds = 0): Promise<string> {
  const created = await api(
    "POST",
    `/api/groups/${sf.groupId}/runs`,
    runSpec(recipeId, hostId, { prepare: { label, sleepSeconds } }, label),
  );
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  return created.body.id;
}

async function accountOfRun(runId: string): Promise<string> {
  const { rows } = await database.pool.query("select host_account_id from runs where id = $1", [runId]);
  return rows[0].host_account_id;
}

let replacementPublicKey: string;

describe("a personal account the host refuses", () => {
  let personalId: string;
  let heldRunId: string;

  it("holds the member's run with a reason naming the account", async () => {
    const personal = await member("POST", `/api/hosts/${hostId}/accounts`, {
      kind: "personal",
      username: "ada",
    });
    expect(personal.status, JSON.stringify(personal.body)).toBe(201);
    expect(personal.body.disabledAt).toBeNull();
    personalId = personal.body.id;

    heldRunId = await submit(member, "refused");
    const run = await waitForState(sf, heldRunId, ["held", "done", "failed"]);
    expect(run.state).toBe("held");
    expect(run.stateMessage).toMatch(/^Held: the host refused the personal account ada@dev-host \(/);
    expect(await accountOfRun(heldRunId)).toBe(personalId);
  });

  it("cannot be deleted once used, but its owner can disable it, and the next run uses the group account", async () => {
    const deleted = await member("DELETE", `/api/host-accounts/${personalId}`);
    expect(deleted.status).toBe(409);
    expect(deleted.body.error.message).toMatch(/disable it/);

    const disabled = await member("PATCH", `/api/host-accounts/${personalId}`, { disabled: true });
    expect(disabled.status, JSON.stringify(disabled.body)).toBe(200);
    expect(disabled.body.disabledAt).toEqual(expect.any(String));

    const runId = await submit(member, "falls-back");
    const run = await waitForState(sf, runId, ["held", "done", "failed"]);
    expect(run.state, run.stateMessage).toBe("done");
    const groupAccount = (await sf.api("GET", `/api/hosts/${hostId}/accounts`)).body.accounts.find(
      (a: { kind: string }) => a.kind === "group",
    );
    expect(await accountOfRun(runId)).toBe(groupAccount.id);
    // The held run keeps the record of the account it used.
    expect(await accountOfRun(heldRunId)).toBe(personalId);

    const listed = await member("GET", `/api/hosts/${hostId}/accounts`);
    expect(listed.body.accounts.map((a: { username: string }) => a.username)).toEqual(["sigmaflow", "ada"]);
    const audit = await database.pool.query("select action from audit_log where target_id = $1 order by id", [
      personalId,
    ]);
    expect(audit.rows.map((r) => r.action)).toEqual(["host_account.create", "host_account.disable"]);
  });

  it("can be enabled again, and then blocks a second personal account", async () => {
    const enabled = await member("PATCH", `/api/host-accounts/${personalId}`, { disabled: false });
    expect(enabled.status, JSON.stringify(enabled.body)).toBe(200);
    expect(enabled.body.disabledAt).toBeNull();
    const second = await member("POST", `/api/hosts/${hostId}/accounts`, {
      kind: "personal",
      username: "ada2",
    });
    expect(second.status).toBe(409);
  });

  it("can be replaced by its owner: the old one is disabled and new runs use the replacement", async () => {
    const replaced = await member("POST", `/api/host-accounts/${personalId}/replacement`, {
      username: "sigmaflow",
    });
    expect(replaced.status, JSON.stringify(replaced.body)).toBe(201);
    expect(replaced.body).toMatchObject({ kind: "personal", username: "sigmaflow", disabledAt: null });
    replacementPublicKey = replaced.body.publicKey;
    await host.authorize(replaced.body.publicKey);
    const accounts = (await member("GET", `/api/hosts/${hostId}/accounts`)).body.accounts;
    expect(accounts.find((a: { id: string }) => a.id === personalId).disabledAt).toEqual(expect.any(String));

    const runId = await submit(member, "replacement");
    const run = await waitForState(sf, runId, ["held", "done", "failed"]);
    expect(run.state, run.stateMessage).toBe("done");
    expect(await accountOfRun(runId)).toBe(replaced.body.id);
  });

  // A held run of the refused account must neither keep other accounts' held runs from resuming when
  // their host answers again, nor be resumed along with them (only to be held again, over and over).
  it("stays held while another account's runs on the host resume", async () => {
    const runId = await submit(member, "comes-back", 4);
    await waitForState(sf, runId, ["running"]);
    await host.stop();
    const held = await waitForState(sf, runId, ["held"]);
    expect(held.stateMessage).toMatch(/unreachable/);
    await host.restart();
    const run = await waitForState(sf, runId, ["done", "failed"], 40_000);
    expect(run.state, run.stateMessage).toBe("done");

    const refused = (await sf.api("GET", `/api/runs/${heldRunId}`)).body;
    expect(refused.state).toBe("held");
    const moves = refused.events.map((e: { toState: string }) => e.toState);
    expect(moves.filter((state: string) => state === "held")).toHaveLength(1);
  }, 60_000);
});

// Regression: an account the host refused while its runs were already running failed the whole poll
// of the host, so no run there (any account's) was followed any more, and the refused runs stayed
// "running" with nothing said.
describe("a personal account refused while its run is running", () => {
  it("holds that account's run with a reason naming it, while the group account's run finishes", async () => {
    const memberRun = await submit(member, "revoked", 6);
    const groupRun = await submit(sf.api, "group-carries-on", 6);
    await waitForState(sf, memberRun, ["running"]);
    await waitForState(sf, groupRun, ["running"]);
    // The host stops accepting the member's key; its restart drops the open connections.
    const keysPath = path.join(host.dir, "authorized_keys");
    const keys = (await readFile(keysPath, "utf8")).split("\n");
    await writeFile(keysPath, keys.filter((line) => line.trim() !== replacementPublicKey.trim()).join("\n"));
    await host.stop();
    await host.restart();

    const held = await waitForState(sf, memberRun, ["held", "done", "failed"], 40_000);
    expect(held.state, held.stateMessage).toBe("held");
    expect(held.stateMessage).toMatch(/^Held: the host refused the personal account sigmaflow@dev-host \(/);
    const finished = await waitForState(sf, groupRun, ["held", "done", "failed"], 40_000);
    expect(finished.state, finished.stateMessage).toBe("done");
  }, 90_000);
});

describe("a group account the host refuses", () => {
  it("holds the run with a reason naming the group account", async () => {
    const accounts = (await sf.api("GET", `/api/hosts/${hostId}/accounts`)).body.accounts;
    const group = accounts.find((a: { kind: string }) => a.kind === "group");
    const replaced = await sf.api("POST", `/api/host-accounts/${group.id}/replacement`, {
      username: "nobody",
    });
    expect(replaced.status, JSON.stringify(replaced.body)).toBe(201);
    // The admin has no personal account, so the run goes out with the (refused) group account.
    const runId = await submit(sf.api, "group-refused");
    const run = await waitForState(sf, runId, ["held", "done", "failed"]);
    expect(run.state).toBe("held");
    expect(run.stateMessage).toMatch(/^Held: the host refused the group account nobody@dev-host \(/);
  });
});
