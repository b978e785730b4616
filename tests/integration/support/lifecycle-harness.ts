/**
 * A whole Sigmaflow on one test database: the API server, a worker in the same process (or as a child
 * process for kill tests), a development cluster host, and a researcher who is admin of a group with an
 * allocation, a host, an account on it and a code. Everything goes through the public API, as a script
 * of a researcher would.
 */
import { type ChildProcess, spawn } from "node:child_process";
import { appendFile, mkdtemp, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { createInterface } from "node:readline";
import { expect } from "vitest";
import { type FakeCluster, startFakeCluster } from "../../../deploy/fake-cluster/server";
import type { CodeDefinitionInput } from "../../../shared/schemas";
import { loadWorkerConfig } from "../../../worker/config";
import { startWorker } from "../../../worker/index";
import { apiClient } from "./api-client";
import { type TwoStageOptions, twoStageCodes } from "./code-fixtures";
import { addMember, createGroup, createUser, tokenFor } from "./people";
import { startTestApp } from "./test-app";
import { createTestDatabase, type TestDatabase } from "./test-database";
import { waitFor } from "./wait-for";

export { type Api, apiClient } from "./api-client";

export const WORKER_TEST_ENV = {
  SIGMAFLOW_SECRETS_KEY: "integration-test-secrets-key-0123456789abcdef",
  WORKER_POLL_INTERVAL_MS: "200",
  WORKER_QUEUE_POLL_SECONDS: "0.5",
  WORKER_BACKOFF_BASE_MS: "100",
  WORKER_BACKOFF_MAX_MS: "800",
  WORKER_TRANSPORT_MAX_ATTEMPTS: "4",
  WORKER_HOST_UNREACHABLE_HOLD_MS: "1500",
  WORKER_HOLD_PROBE_INTERVAL_MS: "300",
  LOG_LEVEL: process.env.SF_TEST_WORKER_LOG ?? "silent",
};

/** One line a worker process logged (pino JSON: `time` in ms since the epoch, `msg`, fields). */
export type WorkerLogLine = { time: number; msg: string; [field: string]: unknown };

export async function startFakeHost(port = 0) {
  const dir = await mkdtemp(path.join(tmpdir(), "sf-fake-host-"));
  const rootDir = path.join(dir, "home");
  const authorizedKeysPath = path.join(dir, "authorized_keys");
  await writeFile(authorizedKeysPath, "");
  const options = { port, rootDir, hostKeyPath: path.join(dir, "host_key"), authorizedKeysPath };
  let cluster: FakeCluster = await startFakeCluster(options);
  return {
    dir,
    rootDir,
    get port() {
      return cluster.port;
    },
    authorize: (publicKey: string) => appendFile(authorizedKeysPath, `${publicKey}\n`),
    stop: () => cluster.close(),
    async restart() {
      cluster = await startFakeCluster({ ...options, port: cluster.port });
    },
  };
}
export type FakeHost = Awaited<ReturnType<typeof startFakeHost>>;

/** A group with an admin researcher, an allocation and the API client to act as them. */
export async function startSigmaflow(
  database: TestDatabase,
  options: { coreHours?: number; inProcessWorker?: boolean } = {},
) {
  const app = await startTestApp(database);
  const group = await createGroup(database.db, "lifecycle");
  const researcher = await createUser(database.db, "researcher");
  await addMember(database.db, researcher.id, group.id, "admin");
  const api = apiClient(app.baseUrl, await tokenFor(database.db, researcher));
  const now = Date.now();
  const allocation = await api("POST", `/api/groups/${group.id}/allocations`, {
    name: "Test quarter",
    coreHours: options.coreHours ?? 1000,
    startsAt: new Date(now - 86_400_000).toISOString(),
    endsAt: new Date(now + 30 * 86_400_000).toISOString(),
  });
  expect(allocation.status, JSON.stringify(allocation.body)).toBe(201);
  const workerEnv = { ...WORKER_TEST_ENV, DATABASE_URL: database.url };
  let worker =
    options.inProcessWorker === false ? null : await startWorker(loadWorkerConfig(workerEnv as never));
  let child: ChildProcess | null = null;
  const workerLog: WorkerLogLine[] = [];
  return {
    app,
    api,
    groupId: group.id,
    researcher,
    allocationId: allocation.body.id as string,
    workerEnv,
    /**
     * Starts the worker as its own process (so a test can SIGKILL it). It logs at debug level into
     * `workerLog()`, where a test finds evidence that a pass of the worker ran (SF_TEST_WORKER_LOG=1
     * shows the lines too).
     */
    spawnWorker() {
      child = spawn(process.execPath, ["--import", "tsx", "worker/index.ts"], {
        env: { ...process.env, ...workerEnv, LOG_LEVEL: "debug" },
        stdio: ["ignore", "pipe", "inherit"],
      });
      createInterface({ input: child.stdout! }).on("line", (line) => {
        if (process.env.SF_TEST_WORKER_LOG) process.stdout.write(`${line}\n`);
        try {
          workerLog.push(JSON.parse(line));
        } catch {}
      });
      return child;
    },
    /** Every line the worker processes started by `spawnWorker` logged so far, in order. */
    workerLog: (): readonly WorkerLogLine[] => workerLog,
    killWorkerHard() {
      child?.kill("SIGKILL");
      child = null;
    },
    async stopInProcessWorker() {
      await worker?.stop();
      worker = null;
    },
    async close() {
      child?.kill("SIGKILL");
      await worker?.stop();
      await app.close();
    },
  };
}
export type Sigmaflow = Awaited<ReturnType<typeof startSigmaflow>>;

/** Registers a host through the API, confirms its key and installs a generated group account key. */
export async function registerHost(
  sf: Sigmaflow,
  host: {
    name: string;
    address: string;
    port: number;
    scheduler: "direct" | "slurm";
    remoteBaseDir: string;
    maxConcurrentRuns?: number;
  },
  account: { username: string; privateKey?: string; authorize?: (publicKey: string) => Promise<void> },
) {
  const created = await sf.api("POST", `/api/groups/${sf.groupId}/hosts`, host);
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  const hostId = created.body.id as string;
  const confirmed = await sf.api("POST", `/api/hosts/${hostId}/host-key/confirm`, {
    fingerprint: created.body.hostKeyFingerprint,
  });
  expect(confirmed.status, JSON.stringify(confirmed.body)).toBe(200);
  const acc = await sf.api("POST", `/api/hosts/${hostId}/accounts`, {
    kind: "group",
    username: account.username,
    ...(account.privateKey ? { privateKey: account.privateKey } : {}),
  });
  expect(acc.status, JSON.stringify(acc.body)).toBe(201);
  await account.authorize?.(acc.body.publicKey);
  return hostId;
}

/** The development host as the engine tests register it: direct scheduler, runs in ~/runs, a group account. */
export function registerDevHost(
  sf: Sigmaflow,
  host: FakeHost,
  overrides: { name?: string; maxConcurrentRuns?: number } = {},
) {
  return registerHost(
    sf,
    {
      name: "dev-host",
      address: "127.0.0.1",
      port: host.port,
      scheduler: "direct",
      remoteBaseDir: "runs",
      ...overrides,
    },
    { username: "sigmaflow", authorize: host.authorize },
  );
}

/**
 * One test file's engine: a database of its own, Sigmaflow (API and an in-process worker) and the
 * development host, registered with a group account. `close` stops them in reverse order.
 */
export async function startEngineScenario(
  label: string,
  options: {
    host?: Parameters<typeof registerDevHost>[2];
    sigmaflow?: Parameters<typeof startSigmaflow>[1];
  } = {},
) {
  const database = await createTestDatabase(label);
  const sf = await startSigmaflow(database, options.sigmaflow);
  const host = await startFakeHost();
  const hostId = await registerDevHost(sf, host, options.host);
  return {
    database,
    sf,
    host,
    hostId,
    async close() {
      await sf.close();
      await host.stop();
      await database.drop();
    },
  };
}

export type EngineScenario = Awaited<ReturnType<typeof startEngineScenario>>;

/** Registers each stage's code through the API, then a recipe of those stages in order; returns its id. */
export async function registerRecipe(
  sf: Sigmaflow,
  name: string,
  stages: { name: string; code: CodeDefinitionInput }[],
): Promise<string> {
  const codeIds: string[] = [];
  for (const stage of stages) {
    const code = await sf.api("POST", `/api/groups/${sf.groupId}/codes`, stage.code);
    expect(code.status, JSON.stringify(code.body)).toBe(201);
    codeIds.push(code.body.id);
  }
  const recipe = await sf.api("POST", `/api/groups/${sf.groupId}/recipes`, {
    name,
    stages: stages.map((stage, i) => ({ name: stage.name, codeId: codeIds[i] })),
  });
  expect(recipe.status, JSON.stringify(recipe.body)).toBe(201);
  return recipe.body.id as string;
}

/** The engine tests' two-stage recipe of shell codes, `prepare` then `scatter` (code-fixtures.ts). */
export async function registerShellRecipe(sf: Sigmaflow, name = "two-stage", options: TwoStageOptions = {}) {
  const { prepare, scatter } = twoStageCodes(name, options);
  return registerRecipe(sf, name, [
    { name: "prepare", code: prepare },
    { name: "scatter", code: scatter },
  ]);
}

export function runSpec(
  recipeId: string,
  hostId: string,
  parameters: Record<string, Record<string, unknown>>,
  name = "test run",
) {
  return {
    spec: { name, recipeId, hostId, parameters, resources: { cores: 1, wallTimeMinutes: 10 } },
    onDuplicate: "run",
  };
}

export async function waitForState(sf: Sigmaflow, runId: string, states: string[], timeoutMs = 25_000) {
  const result = await waitFor(
    `run ${runId} to reach ${states.join("/")}`,
    () => sf.api("GET", `/api/runs/${runId}`),
    (r) => states.includes(r.body?.state),
    { timeoutMs },
  );
  return result.body;
}
