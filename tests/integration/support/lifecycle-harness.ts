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
import { expect } from "vitest";
import { type FakeCluster, startFakeCluster } from "../../../deploy/fake-cluster/server";
import { loadWorkerConfig } from "../../../worker/config";
import { startWorker } from "../../../worker/index";
import { apiClient, waitFor } from "./api-client";
import { addMember, createGroup, createUser, tokenFor } from "./people";
import { startTestApp } from "./test-app";
import type { TestDatabase } from "./test-database";

export { type Api, apiClient, waitFor } from "./api-client";

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
  return {
    app,
    api,
    groupId: group.id,
    researcher,
    allocationId: allocation.body.id as string,
    workerEnv,
    /** Starts the worker as its own process (so a test can SIGKILL it). */
    spawnWorker() {
      child = spawn(process.execPath, ["--import", "tsx", "worker/index.ts"], {
        env: { ...process.env, ...workerEnv },
        stdio: ["ignore", "ignore", "inherit"],
      });
      return child;
    },
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

/**
 * A two-stage recipe of shell codes: `prepare` writes orbitals.dat and per-symmetry timing lines from a
 * template; `scatter` reads it and writes kmatrix.dat. `sleepSeconds` keeps a stage running for the
 * fault tests.
 */
export async function registerShellRecipe(sf: Sigmaflow, name = "two-stage") {
  const prepare = await sf.api("POST", `/api/groups/${sf.groupId}/codes`, {
    name: `${name}-prepare`,
    version: "1.0",
    executable: "/bin/sh",
    arguments: ["prepare.sh"],
    inputTemplates: [
      {
        fileName: "prepare.sh",
        format: "shell",
        template: [
          "label={{ label }}",
          'echo "target label: $label"',
          'for sym in A1 B1 B2 A2; do echo "symmetry $sym done in 0.25 s"; done',
          "sleep {{ sleepSeconds }}",
          'printf "%s\\n" "$label" > orbitals.dat',
          "echo progress 1/1",
        ].join("\n"),
      },
      { fileName: "notes.txt", format: "text", template: "label: {{ label }}\n" },
    ],
    parameters: {
      type: "object",
      properties: {
        label: { type: "string", maxLength: 5000 },
        sleepSeconds: { type: "number", minimum: 0, maximum: 60, default: 0 },
      },
      required: ["label"],
      additionalProperties: false,
    },
    outputFiles: ["orbitals.dat"],
    outputRules: {
      timings: ["^symmetry (?<symmetry>\\S+) done in (?<seconds>[0-9.]+) s$"],
      progress: ["^progress (?<done>\\d+)/(?<total>\\d+)$"],
    },
  });
  expect(prepare.status, JSON.stringify(prepare.body)).toBe(201);
  const scatter = await sf.api("POST", `/api/groups/${sf.groupId}/codes`, {
    name: `${name}-scatter`,
    version: "1.0",
    executable: "/bin/sh",
    arguments: ["scatter.sh"],
    inputTemplates: [
      {
        fileName: "scatter.sh",
        format: "shell",
        template: 'echo "K-matrix from $(cat orbitals.dat)" > kmatrix.dat\nexit {{ exitCode }}\n',
      },
    ],
    parameters: {
      type: "object",
      properties: { exitCode: { type: "integer", minimum: 0, maximum: 255, default: 0 } },
      additionalProperties: false,
    },
    outputFiles: ["kmatrix.dat"],
  });
  expect(scatter.status, JSON.stringify(scatter.body)).toBe(201);
  const recipe = await sf.api("POST", `/api/groups/${sf.groupId}/recipes`, {
    name,
    stages: [
      { name: "prepare", codeId: prepare.body.id },
      { name: "scatter", codeId: scatter.body.id },
    ],
  });
  expect(recipe.status, JSON.stringify(recipe.body)).toBe(201);
  return recipe.body.id as string;
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
    () => sf.api("GET", `/api/runs/${runId}`),
    (r) => states.includes(r.body?.state),
    timeoutMs,
    `run ${runId} to reach ${states.join("/")}`,
  );
  return result.body;
}
