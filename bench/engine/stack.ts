/**
 * A whole Sigmaflow for the engine benchmarks, laid out as deploy/start.sh lays it out: a PostgreSQL
 * cluster of its own, the server, one or more workers and the development cluster host, each in its
 * own process with the production settings (poll interval, queue polling, pool sizes) unless a
 * benchmark says otherwise. A researcher, admin of a group with a large allocation, registers the host
 * and a code through the API, as a script would.
 */
import type { ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { appendFileSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { createDatabase } from "../../server/db/client";
import { type Api, apiClient } from "../../tests/integration/support/api-client";
import { addMember, createGroup, createUser, tokenFor } from "../../tests/integration/support/people";
import { waitFor } from "../../tests/integration/support/wait-for";
import { startBenchDatabase } from "../support/bench-database";
import {
  type FakeClusterProcess,
  freePort,
  postmasterPid,
  processCpuSeconds,
  processCpuSplit,
  processTreeCpuSeconds,
  startFakeClusterProcess,
  startNodeService,
  stopChild,
} from "../support/processes";

export type CodeDefinition = Record<string, unknown>;

export type StackOptions = {
  /** fsync on (a real installation) or off (the test suite's setting). */
  durable?: boolean;
  workers?: number;
  /** Extra worker settings (WORKER_* variables). */
  workerEnv?: Record<string, string>;
  maxConcurrentRuns?: number;
  code: CodeDefinition;
  /** Load pg_stat_statements, so `topStatements()` can say which statements the work cost. */
  statementStatistics?: boolean;
};

const SECRETS_KEY = randomBytes(32).toString("hex");

export async function startEngineStack(options: StackOptions) {
  const work = mkdtempSync(path.join(tmpdir(), "sigmaflow-engine-bench-"));
  const { postgres, url: databaseUrl } = await startBenchDatabase({
    maxConnections: 300,
    durable: options.durable ?? true,
    extraOptions: options.statementStatistics ? "-c shared_preload_libraries=pg_stat_statements" : "",
  });
  const { db, pool } = createDatabase(databaseUrl);
  if (options.statementStatistics) await pool.query("create extension if not exists pg_stat_statements");

  const group = await createGroup(db, "bench");
  const researcher = await createUser(db, "bench-researcher");
  await addMember(db, researcher.id, group.id, "admin");
  const token = await tokenFor(db, researcher);

  const fake: FakeClusterProcess = await startFakeClusterProcess(work);
  const appPort = await freePort();
  const baseUrl = `http://127.0.0.1:${appPort}`;
  const common = { DATABASE_URL: databaseUrl, SIGMAFLOW_SECRETS_KEY: SECRETS_KEY, LOG_LEVEL: "warn" };
  const server = await startNodeService(
    "server/index.ts",
    {
      ...common,
      SIGMAFLOW_PORT: String(appPort),
      SIGMAFLOW_PUBLIC_URL: baseUrl,
      SESSION_SECRET: randomBytes(32).toString("hex"),
      OIDC_ISSUER: "http://127.0.0.1:9/unused",
      OIDC_CLIENT_ID: "bench",
      OIDC_CLIENT_SECRET: "bench",
    },
    null,
  );
  await waitFor(
    "the server to answer /api/health",
    () =>
      fetch(`${baseUrl}/api/health`)
        .then((r) => r.status)
        .catch(() => 0),
    (status) => status === 200,
    { timeoutMs: 30_000 },
  );
  const workers: ChildProcess[] = [];
  for (let i = 0; i < (options.workers ?? 1); i += 1) {
    workers.push(
      await startNodeService(
        "worker/index.ts",
        { ...common, ...options.workerEnv, LOG_LEVEL: "info" },
        "worker started",
      ),
    );
  }

  const api: Api = apiClient(baseUrl, token);
  const expectStatus = (response: { status: number; body: unknown }, status: number, what: string) => {
    if (response.status !== status)
      throw new Error(`${what}: ${response.status} ${JSON.stringify(response.body)}`);
    // biome-ignore lint/suspicious/noExplicitAny: API bodies are read field by field.
    return response.body as Record<string, any>;
  };
  const now = Date.now();
  expectStatus(
    await api("POST", `/api/groups/${group.id}/allocations`, {
      name: "Benchmark quarter",
      coreHours: 1_000_000,
      startsAt: new Date(now - 86_400_000).toISOString(),
      endsAt: new Date(now + 30 * 86_400_000).toISOString(),
    }),
    201,
    "allocation",
  );
  const host = expectStatus(
    await api("POST", `/api/groups/${group.id}/hosts`, {
      name: "bench-host",
      address: "127.0.0.1",
      port: fake.port,
      scheduler: "direct",
      remoteBaseDir: "runs",
      maxConcurrentRuns: options.maxConcurrentRuns ?? 50,
    }),
    201,
    "host",
  );
  const hostId = host.id as string;
  expectStatus(
    await api("POST", `/api/hosts/${hostId}/host-key/confirm`, { fingerprint: host.hostKeyFingerprint }),
    200,
    "host key confirmation",
  );
  const account = expectStatus(
    await api("POST", `/api/hosts/${hostId}/accounts`, { kind: "group", username: "sigmaflow" }),
    201,
    "account",
  );
  appendFileSync(fake.authorizedKeysPath, `${account.publicKey}\n`);
  const code = expectStatus(await api("POST", `/api/groups/${group.id}/codes`, options.code), 201, "code");
  const recipe = expectStatus(
    await api("POST", `/api/groups/${group.id}/recipes`, {
      name: "bench-recipe",
      stages: [{ name: "main", codeId: code.id }],
    }),
    201,
    "recipe",
  );

  /** Submits one run; resolves with its id once the API accepted it. */
  async function submit(name: string, parameters: Record<string, unknown> = {}): Promise<string> {
    const created = await api("POST", `/api/groups/${group.id}/runs`, {
      spec: {
        name,
        recipeId: recipe.id,
        hostId,
        parameters: { main: parameters },
        resources: { cores: 1, wallTimeMinutes: 5 },
      },
      onDuplicate: "run",
    });
    return expectStatus(created, 201, `run ${name}`).id as string;
  }

  /** Run counts by state, for the given runs (all runs when omitted). */
  async function statesOf(runIds?: string[]): Promise<Record<string, number>> {
    const { rows } = runIds
      ? await pool.query("select state, count(*)::int as n from runs where id = any($1) group by state", [
          runIds,
        ])
      : await pool.query("select state, count(*)::int as n from runs group by state");
    return Object.fromEntries(rows.map((row) => [row.state, row.n]));
  }

  const pgPid = postmasterPid(postgres.dataDir);
  /** CPU seconds used so far by each part, to print how a benchmark's work was spread. */
  function cpuSeconds() {
    const driver = process.cpuUsage();
    return {
      postgres: processTreeCpuSeconds(pgPid),
      server: processCpuSeconds(server.pid!),
      workers: workers.reduce((sum, child) => sum + processCpuSeconds(child.pid!), 0),
      "development host": processCpuSplit(fake.child.pid!).self,
      "host commands + jobs": processCpuSplit(fake.child.pid!).children,
      "benchmark driver": (driver.user + driver.system) / 1e6,
    };
  }

  /** The statements that cost PostgreSQL most since `resetStatements()` (needs statementStatistics). */
  async function topStatements(limit = 25, by: "time" | "calls" = "time"): Promise<string> {
    const order = by === "time" ? "total_exec_time" : "calls";
    const { rows } = await pool.query(
      `select calls, round(total_exec_time::numeric, 0) as ms, left(regexp_replace(query, '\\s+', ' ', 'g'), 110) as query
         from pg_stat_statements order by ${order} desc limit $1`,
      [limit],
    );
    return rows
      .map((r) => `${String(r.calls).padStart(7)} calls ${String(r.ms).padStart(7)} ms  ${r.query}`)
      .join("\n");
  }

  return {
    api,
    /** The researcher's API token and the server's address, for clients other than `api` (the live feed). */
    token,
    baseUrl,
    groupId: group.id,
    pool,
    cpuSeconds,
    topStatements,
    resetStatements: () => pool.query("select pg_stat_statements_reset()"),
    hostId,
    fake,
    server,
    workers,
    submit,
    statesOf,
    /** A run folder's file on the development host. */
    hostPath: (runId: string, relative: string) =>
      path.join(fake.rootDir, "runs", `sf-run-${runId}`, relative),
    async stop() {
      await Promise.all(workers.map((child) => stopChild(child)));
      await stopChild(server);
      await stopChild(fake.child);
      await pool.end();
      await postgres.stop();
      rmSync(work, { recursive: true, force: true });
    },
  };
}
export type EngineStack = Awaited<ReturnType<typeof startEngineStack>>;

/** Waits until every run in `runIds` is finished; prints progress every few seconds when asked. */
export async function waitUntilFinished(
  stack: EngineStack,
  runIds: string[],
  timeoutMs: number,
  onProgress?: (states: Record<string, number>) => void,
): Promise<Record<string, number>> {
  const deadline = Date.now() + timeoutMs;
  let lastReport = 0;
  for (;;) {
    const states = await stack.statesOf(runIds);
    const finished = (states.done ?? 0) + (states.failed ?? 0) + (states.cancelled ?? 0);
    if (finished === runIds.length) return states;
    if (Date.now() > deadline) throw new Error(`runs not finished in time: ${JSON.stringify(states)}`);
    if (onProgress && Date.now() - lastReport > 5000) {
      lastReport = Date.now();
      onProgress(states);
    }
    await new Promise((resolve) => setTimeout(resolve, 50));
  }
}

/**
 * Where the runs spent their time: for each state, the median and 95th percentile of how long a run
 * stayed in it (from its recorded state changes), in seconds.
 */
export async function timeInStates(stack: EngineStack, runIds: string[]): Promise<string> {
  const { rows } = await stack.pool.query<{ state: string; p50: number; p95: number; n: number }>(
    `with spans as (
       select coalesce(from_state::text, 'submitting') as state,
              extract(epoch from at - lag(at) over (partition by run_id order by id)) as seconds
         from run_events where run_id = any($1))
     select state, count(*)::int as n,
            percentile_disc(0.5) within group (order by seconds) as p50,
            percentile_disc(0.95) within group (order by seconds) as p95
       from spans where seconds is not null group by state order by min(seconds) is null, state`,
    [runIds],
  );
  return rows
    .map((r) => `${r.state} p50 ${Number(r.p50).toFixed(2)} s / p95 ${Number(r.p95).toFixed(2)} s`)
    .join("; ");
}

/** "name 1.2 s (30%), …" of the CPU used between two `cpuSeconds()` readings. */
export function cpuReport(before: Record<string, number>, after: Record<string, number>): string {
  const used = Object.entries(after).map(([name, seconds]) => [name, seconds - (before[name] ?? 0)] as const);
  const total = used.reduce((sum, [, seconds]) => sum + seconds, 0);
  return used
    .map(([name, seconds]) => `${name} ${seconds.toFixed(1)} s (${((100 * seconds) / total).toFixed(0)}%)`)
    .join(", ");
}

/** Quantile q (0..1) of sorted values, by the nearest-rank method (common practice). */
export function quantile(sorted: number[], q: number): number {
  if (sorted.length === 0) return Number.NaN;
  const rank = Math.max(1, Math.ceil(q * sorted.length));
  return sorted[rank - 1]!;
}
