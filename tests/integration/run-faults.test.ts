/**
 * The engine under faults, on the development host with the direct scheduler: a worker SIGKILLed at an
 * exact point of each state, the SSH server restarted, the host unreachable, a changed host key,
 * PostgreSQL restarted, hostile input at the API. What must hold is Sigmaflow's run contract
 * (server/execution/run-transitions.ts, worker/failures.ts): a run reaches `done` by itself once the
 * fault is gone, exactly one scheduler job is ever started for it, its log is neither lost nor doubled,
 * it is settled once, and a changed host key stops everything until an admin confirms the new key.
 *
 * A worker is frozen at a precise point with a database gate (a trigger that waits on an advisory lock
 * the test holds), so "killed in submitted" means exactly that, not "killed whenever the test looked".
 */
import type { ChildProcess } from "node:child_process";
import { existsSync } from "node:fs";
import { readdir } from "node:fs/promises";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { type FakeSmtp, startFakeSmtp } from "../../deploy/fake-smtp/sink";
import { shellCode } from "./support/code-fixtures";
import {
  apiLogText,
  createDatabaseAt,
  hostFile,
  installGate,
  killHard,
  occurrences,
  type PrivatePostgres,
  type RekeyableHost,
  runDirOnHost,
  startPrivatePostgres,
  startRekeyableHost,
} from "./support/fault-helpers";
import { freePort } from "./support/http-browser";
import {
  type FakeHost,
  registerDevHost,
  registerHost,
  registerShellRecipe,
  runSpec,
  type Sigmaflow,
  startFakeHost,
  startSigmaflow,
  waitForState,
} from "./support/lifecycle-harness";
import { tokenFor } from "./support/people";
import { createTestDatabase, type TestDatabase } from "./support/test-database";
import { waitFor } from "./support/wait-for";

type RunEvent = { toState: string; fromState: string | null; message: string | null };

const PREPARE_START = "[sigmaflow] stage 1/2 prepare: start";

/** The two-stage recipe whose job records each start on the host and whose log grows while it runs. */
const COUNTED = { countStarts: true, tick: true };

let database: TestDatabase;
let sf: Sigmaflow;
let host: RekeyableHost;
let hostId: string;
let recipeId: string;
let smtp: FakeSmtp;
let inboxUrl: string;
let worker: ChildProcess;

beforeAll(async () => {
  const [smtpPort, httpPort] = [await freePort(), await freePort()];
  smtp = await startFakeSmtp({ smtpPort, httpPort });
  inboxUrl = `http://127.0.0.1:${httpPort}/api/messages`;
  database = await createTestDatabase("faults");
  sf = await startSigmaflow(database, { inProcessWorker: false });
  // The worker process mails the group's admins through the development sink.
  Object.assign(sf.workerEnv, { SMTP_HOST: "127.0.0.1", SMTP_PORT: String(smtpPort) });
  host = await startRekeyableHost();
  hostId = await registerDevHost(sf, host, { name: "fault-host" });
  recipeId = await registerShellRecipe(sf, "counted", COUNTED);
  worker = sf.spawnWorker();
}, 60_000);

afterAll(async () => {
  await sf?.close();
  await host?.stop();
  await host?.cleanup();
  await smtp?.close();
  await database?.drop();
});

async function submit(label: string, sleepSeconds: number) {
  const created = await sf.api(
    "POST",
    `/api/groups/${sf.groupId}/runs`,
    runSpec(recipeId, hostId, { prepare: { label, sleepSeconds } }, label),
  );
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  return created.body.id as string;
}

async function stateInDatabase(runId: string): Promise<string> {
  const { rows } = await database.pool.query("select state from runs where id = $1", [runId]);
  return rows[0].state;
}

async function ledgerEntries(runId: string) {
  const { rows } = await database.pool.query(
    "select kind, core_seconds::bigint as s from ledger_entries where run_id = $1 order by id",
    [runId],
  );
  return rows.map((r) => `${r.kind}:${r.kind === "charge" ? "n" : Number(r.s)}`);
}

/**
 * The run's contract after any fault: done, one scheduler job, one submission, the host's job.log
 * equal byte for byte to the log the API serves, both declared results, and a ledger settled once
 * (reserve 1 core × 10 min = 600 core-seconds, then one charge and one release of those 600).
 */
async function expectDoneExactlyOnce(runId: string, label: string, timeoutMs = 40_000) {
  const run = await waitForState(sf, runId, ["done", "failed", "cancelled"], timeoutMs);
  expect(run.state, run.stateMessage).toBe("done");
  const events = run.events as RunEvent[];
  expect(events.filter((e) => e.toState === "submitted")).toHaveLength(1);
  const jobLog = await hostFile(host.rootDir, runId, "job.log");
  expect(occurrences(jobLog, PREPARE_START)).toBe(1);
  const starts = await hostFile(host.rootDir, runId, "prepare.starts");
  expect(starts.trim().split("\n")).toHaveLength(1);
  expect((await hostFile(host.rootDir, runId, "job.pid")).trim()).toBe(run.schedulerJobId);
  expect(jobLog).toContain(`target label: ${label}`);
  expect(jobLog).toContain("[sigmaflow] all stages finished");
  expect(await apiLogText(sf.api, runId)).toBe(jobLog);
  expect(run.artifacts.map((a: { name: string }) => a.name).sort()).toEqual(["kmatrix.dat", "orbitals.dat"]);
  expect(await ledgerEntries(runId)).toEqual(["reserve:600", "charge:n", "release:600"]);
  return run;
}

describe("a worker killed with SIGKILL, and restarted", () => {
  it("killed in staging, after the host started the job and before the worker recorded it: no second job", async () => {
    const gate = await installGate(database.url, "run_events", "new.to_state = 'submitted'");
    try {
      await gate.close();
      const runId = await submit("kill-staging", 1);
      await gate.waitForWaiter();
      // The scheduler has the job (its pid file is written by the job itself); the database does not.
      await waitFor(
        "the job to start on the host",
        async () => existsSync(path.join(runDirOnHost(host.rootDir, runId), "job.pid")),
        Boolean,
        { timeoutMs: 10_000 },
      );
      await killHard(worker);
      expect(await stateInDatabase(runId)).toBe("staging");
      await gate.remove();
      worker = sf.spawnWorker();
      const run = await expectDoneExactlyOnce(runId, "kill-staging");
      const submitted = (run.events as RunEvent[]).find((e) => e.toState === "submitted");
      expect(submitted?.message).toMatch(/submitted earlier/);
    } finally {
      await gate.remove();
    }
  });

  it("killed in submitted, while the poller was recording that the job started", async () => {
    const gate = await installGate(database.url, "run_events", "new.to_state = 'running'");
    try {
      await gate.close();
      const runId = await submit("kill-submitted", 2);
      await gate.waitForWaiter();
      await killHard(worker);
      expect(await stateInDatabase(runId)).toBe("submitted");
      await gate.remove();
      worker = sf.spawnWorker();
      await expectDoneExactlyOnce(runId, "kill-submitted");
    } finally {
      await gate.remove();
    }
  });

  it("killed in running, with part of the log already stored", async () => {
    const runId = await submit("kill-running", 3);
    await waitFor(
      "the first ticks of the log to be stored",
      () => apiLogText(sf.api, runId),
      (text) => text.includes("tick 3"),
      { timeoutMs: 15_000 },
    );
    await killHard(worker);
    expect(await stateInDatabase(runId)).toBe("running");
    expect(existsSync(path.join(runDirOnHost(host.rootDir, runId), "job.exit"))).toBe(false);
    worker = sf.spawnWorker();
    await expectDoneExactlyOnce(runId, "kill-running");
  });

  it("killed in collecting, inside the transaction that settles the run", async () => {
    const gate = await installGate(
      database.url,
      "run_events",
      "new.to_state in ('done', 'failed', 'cancelled')",
    );
    try {
      await gate.close();
      const runId = await submit("kill-collecting", 0);
      await gate.waitForWaiter();
      await killHard(worker);
      expect(await stateInDatabase(runId)).toBe("collecting");
      await gate.remove();
      worker = sf.spawnWorker();
      await expectDoneExactlyOnce(runId, "kill-collecting");
    } finally {
      await gate.remove();
    }
  });
});

describe("the host goes away", () => {
  it("finishes a run after the SSH server restarted under it", async () => {
    const runId = await submit("ssh-restart", 3);
    await waitFor(
      "the first ticks of the log to be stored",
      () => apiLogText(sf.api, runId),
      (text) => text.includes("tick 2"),
      { timeoutMs: 15_000 },
    );
    await host.stop();
    await host.restart();
    await expectDoneExactlyOnce(runId, "ssh-restart");
  });

  it("holds the runs of a host unreachable for too long, and resumes them when it answers", async () => {
    const runId = await submit("unreachable", 4);
    await waitForState(sf, runId, ["running"]);
    await host.stop();
    // WORKER_HOST_UNREACHABLE_HOLD_MS is 1.5 s in the test settings.
    const held = await waitForState(sf, runId, ["held"], 15_000);
    expect(held.stateMessage).toMatch(/^Held: fault-host has been unreachable since .+\(connection refused/);
    const hostRow = await sf.api("GET", `/api/hosts/${hostId}`);
    expect(hostRow.body.status).toBe("unreachable");
    await host.restart();
    const run = await expectDoneExactlyOnce(runId, "unreachable");
    const states = (run.events as RunEvent[]).map((e) => e.toState);
    expect(states.slice(states.indexOf("held"), states.indexOf("held") + 2)).toEqual(["held", "running"]);
    expect((await sf.api("GET", `/api/hosts/${hostId}`)).body.status).toBe("ok");
  });

  it("holds everything on a changed host key, tells the admins, and resumes only after an admin confirms", async () => {
    await fetch(inboxUrl, { method: "DELETE" });
    const runId = await submit("rekeyed", 4);
    await waitForState(sf, runId, ["running"]);
    const oldFingerprint = host.fingerprint;
    const newFingerprint = await host.restartWithNewHostKey();
    expect(newFingerprint).not.toBe(oldFingerprint);

    const held = await waitForState(sf, runId, ["held"], 15_000);
    expect(held.stateMessage).toBe(`Held: the host key of fault-host changed (${newFingerprint}).`);
    const hostRow = await sf.api("GET", `/api/hosts/${hostId}`);
    expect(hostRow.body.status).toBe("key_mismatch");
    expect(hostRow.body.statusMessage).toContain(newFingerprint);
    const { rows: audit } = await database.pool.query(
      "select details from audit_log where action = 'host.key_mismatch' and target_id = $1",
      [hostId],
    );
    expect(audit).toEqual([{ details: { expected: oldFingerprint, actual: newFingerprint } }]);
    type InboxMessage = { subject: string; text: string };
    const mail = await waitFor(
      "the host-key mail to the group admin",
      async () =>
        (
          (await (await fetch(`${inboxUrl}?to=${sf.researcher.email}`)).json()) as {
            messages: InboxMessage[];
          }
        ).messages,
      (messages) => messages.length > 0,
      { timeoutMs: 10_000 },
    );
    expect(mail).toHaveLength(1);
    expect(mail[0]!.subject).toBe("Sigmaflow: host key of fault-host changed");
    expect(mail[0]!.text).toContain(newFingerprint);
    const refused = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: "while-mismatched" } }, "while-mismatched"),
    );
    expect(refused.status).toBe(422);
    expect(refused.body.error.code).toBe("host_key_mismatch");

    const refreshed = await sf.api("POST", `/api/hosts/${hostId}/host-key/refresh`);
    expect(refreshed.status, JSON.stringify(refreshed.body)).toBe(200);
    expect(refreshed.body.hostKeyFingerprint).toBe(newFingerprint);
    expect(refreshed.body.status).toBe("unverified");
    // A key that was read but not confirmed is not trusted: a whole pass of the hold probe runs after the
    // refresh and the run is still held. Passes never overlap, so of two passes logged after the refresh
    // the second began after it.
    const refreshedAt = Date.now();
    await waitFor(
      "two hold-probe passes of the worker after the key was refreshed",
      () => sf.workerLog().filter((line) => line.msg === "held runs probed" && line.time > refreshedAt),
      (passes) => passes.length >= 2,
      { timeoutMs: 15_000 },
    );
    expect(await stateInDatabase(runId)).toBe("held");

    const confirmed = await sf.api("POST", `/api/hosts/${hostId}/host-key/confirm`, {
      fingerprint: newFingerprint,
    });
    expect(confirmed.status, JSON.stringify(confirmed.body)).toBe(200);
    expect(confirmed.body.status).toBe("ok");
    await expectDoneExactlyOnce(runId, "rekeyed");
  });
});

describe("hostile input at the API", () => {
  async function rowCounts() {
    const { rows } = await database.pool.query(
      "select (select count(*) from codes)::int as codes, (select count(*) from recipes)::int as recipes, (select count(*) from runs)::int as runs",
    );
    return rows[0];
  }

  /** A valid code with one hostile change. */
  const code = (overrides: Record<string, unknown>) => ({
    ...shellCode({
      name: "hostile",
      script: "echo {{ x }}",
      scriptFormat: "shell",
      parameters: { type: "object", properties: { x: { type: "string" } } },
      outputFiles: ["out.dat"],
    }),
    ...overrides,
  });

  const refusedCodes: [string, Record<string, unknown>, string][] = [
    [
      "a template file name with shell metacharacters",
      { inputTemplates: [{ fileName: "main.sh;touch pwned", format: "shell", template: "x" }] },
      "inputTemplates.0.fileName",
    ],
    [
      "a template file name climbing out with ../",
      { inputTemplates: [{ fileName: "../../main.sh", format: "shell", template: "x" }] },
      "inputTemplates.0.fileName",
    ],
    [
      "an absolute template file name",
      { inputTemplates: [{ fileName: "/etc/profile", format: "shell", template: "x" }] },
      "inputTemplates.0.fileName",
    ],
    [
      "an output file climbing out with ../",
      { outputFiles: ["../../../.ssh/authorized_keys"] },
      "outputFiles.0",
    ],
    ["an absolute output file", { outputFiles: ["/etc/passwd"] }, "outputFiles.0"],
    ["an output file with $(…)", { outputFiles: ["$(touch pwned)"] }, "outputFiles.0"],
    ["a standard-input file climbing out", { stdinFile: "../secret" }, "stdinFile"],
    ["an executable with shell words", { executable: "/bin/sh -c 'touch pwned'" }, "executable"],
    [
      "a malformed template ({% for %})",
      { inputTemplates: [{ fileName: "main.sh", format: "shell", template: "{% for %}\n{% endfor %}" }] },
      "inputTemplates.0.template",
    ],
    [
      "a template that includes another file",
      { inputTemplates: [{ fileName: "main.sh", format: "shell", template: '{% include "/etc/passwd" %}' }] },
      "inputTemplates.0.template",
    ],
    ["a parameter schema with an unknown type", { parameters: { type: "nonsense" } }, "parameters"],
    [
      "a parameter schema with a broken pattern",
      { parameters: { type: "object", properties: { x: { type: "string", pattern: "([a-z" } } } },
      "parameters",
    ],
    ["a parameter schema with a dangling $ref", { parameters: { $ref: "#/$defs/nowhere" } }, "parameters"],
  ];

  for (const [what, overrides, field] of refusedCodes) {
    it(`refuses a code with ${what}, naming ${field}, and stores nothing`, async () => {
      const before = await rowCounts();
      const response = await sf.api("POST", `/api/groups/${sf.groupId}/codes`, code(overrides));
      expect(response.status, JSON.stringify(response.body)).toBe(422);
      expect(["validation_failed", "invalid_code_definition"]).toContain(response.body.error.code);
      expect(response.body.error.message.length).toBeGreaterThan(20);
      const paths = (response.body.error.details as { path: string }[]).map((d) => d.path);
      expect(
        paths.some((p) => p === field || p.startsWith(`${field}.`) || p.endsWith(field)),
        `${field} among ${JSON.stringify(paths)}`,
      ).toBe(true);
      expect(await rowCounts()).toEqual(before);
    });
  }

  it("refuses recipes and runs that name stages or parameters with path tricks", async () => {
    const before = await rowCounts();
    const recipe = await sf.api("POST", `/api/groups/${sf.groupId}/recipes`, {
      name: "hostile-recipe",
      stages: [{ name: "../prepare", codeId: crypto.randomUUID() }],
    });
    expect(recipe.status).toBe(422);
    const stage = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { "../../prepare": { label: "x" } }),
    );
    expect(stage.status).toBe(422);
    const parameter = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: "x", "$(touch pwned)": 1 } }),
    );
    expect(parameter.status).toBe(422);
    expect(await rowCounts()).toEqual(before);
  });

  it("refuses a 1 MB parameter value with 413 before it reaches the service", async () => {
    const before = await rowCounts();
    const response = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/runs`,
      runSpec(recipeId, hostId, { prepare: { label: "x".repeat(1024 * 1024) } }),
    );
    expect(response.status).toBe(413);
    expect(response.body.error.code).toBe("payload_too_large");
    expect(await rowCounts()).toEqual(before);
  });

  it("refuses a JSON body with invalid UTF-8 byte sequences with 400", async () => {
    const before = await rowCounts();
    const token = await tokenFor(database.db, sf.researcher);
    const cases = [
      {
        path: `/api/groups/${sf.groupId}/codes`,
        json: JSON.stringify(code({ name: "utf8-probe", description: "BAD" })),
      },
      {
        path: `/api/groups/${sf.groupId}/runs`,
        json: JSON.stringify(runSpec(recipeId, hostId, { prepare: { label: "utf8" } }, "BAD")),
      },
    ];
    for (const c of cases) {
      const [head, tail] = c.json.split("BAD") as [string, string];
      // 0xC3 0x28 is a lead byte followed by a non-continuation byte; 0xFF never occurs in UTF-8 (RFC 3629 §3).
      const body = Buffer.concat([Buffer.from(head), Buffer.from([0xc3, 0x28, 0xff]), Buffer.from(tail)]);
      const response = await fetch(`${sf.app.baseUrl}${c.path}`, {
        method: "POST",
        headers: { authorization: `Bearer ${token}`, "content-type": "application/json" },
        body,
      });
      const payload = await response.json();
      expect(response.status, JSON.stringify(payload)).toBe(400);
      expect(payload.error.message.length).toBeGreaterThan(10);
    }
    expect(await rowCounts()).toEqual(before);
  });

  it("runs hostile values only as data, and nothing lands outside the run folders", async () => {
    const hostile = `'; touch ../../../pwned; echo '$(touch /tmp/sf-pwned)\`touch pwned\`"../../etc/passwd /abs/path *`;
    const runId = await submit(hostile.slice(0, 100), 0);
    const run = await waitForState(sf, runId, ["done", "failed"]);
    expect(run.state, run.stateMessage).toBe("done");
    expect(await hostFile(host.rootDir, runId, "stage-1-prepare/orbitals.dat")).toBe(
      `${hostile.slice(0, 100)}\n`,
    );
    expect(await readdir(host.rootDir)).toEqual(["runs"]);
    const runDirs = await readdir(path.join(host.rootDir, "runs"));
    for (const name of runDirs) expect(name).toMatch(/^sf-run-[0-9a-f-]{36}$/);
    expect(existsSync("/tmp/sf-pwned")).toBe(false);
  });
});

describe("PostgreSQL restarted under a running engine", () => {
  let privatePg: PrivatePostgres;
  let pgDatabase: Awaited<ReturnType<typeof createDatabaseAt>>;
  let pgSf: Sigmaflow;
  let pgHost: FakeHost;
  let pgHostId: string;
  let pgRecipeId: string;

  beforeAll(async () => {
    privatePg = await startPrivatePostgres();
    pgDatabase = await createDatabaseAt(privatePg.adminUrl, "pgrestart");
    pgSf = await startSigmaflow(pgDatabase);
    // The server's own start (server/index.ts) listens for queue errors; the test app does not, and an
    // idle queue connection cut by the restart would otherwise be an unhandled "error" event.
    pgSf.app.boss.on("error", () => {});
    pgHost = await startFakeHost();
    pgHostId = await registerHost(
      pgSf,
      {
        name: "pg-host",
        address: "127.0.0.1",
        port: pgHost.port,
        scheduler: "direct",
        remoteBaseDir: "runs",
      },
      { username: "sigmaflow", authorize: pgHost.authorize },
    );
    pgRecipeId = await registerShellRecipe(pgSf, "pg-counted", COUNTED);
  }, 90_000);

  afterAll(async () => {
    await pgSf?.close();
    await pgHost?.stop();
    await pgDatabase?.pool.end().catch(() => {});
    await privatePg?.stop();
  });

  it("server and worker recover by themselves and the run finishes", async () => {
    const created = await pgSf.api(
      "POST",
      `/api/groups/${pgSf.groupId}/runs`,
      runSpec(pgRecipeId, pgHostId, { prepare: { label: "pg-restart", sleepSeconds: 4 } }, "pg-restart"),
    );
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    await waitForState(pgSf, created.body.id, ["running"]);
    await privatePg.restart();
    await waitFor(
      "GET /api/health to answer 200 again",
      async () => (await fetch(`${pgSf.app.baseUrl}/api/health`)).status,
      (status) => status === 200,
      { timeoutMs: 20_000 },
    );
    const run = await waitForState(pgSf, created.body.id, ["done", "failed", "cancelled"], 45_000);
    expect(run.state, run.stateMessage).toBe("done");
    const jobLog = await hostFile(pgHost.rootDir, run.id, "job.log");
    expect(occurrences(jobLog, PREPARE_START)).toBe(1);
    expect(await apiLogText(pgSf.api, run.id)).toBe(jobLog);
  });
});
