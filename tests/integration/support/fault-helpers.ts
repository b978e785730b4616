/**
 * Fault injection for the engine tests: a development host that can come back with another host key,
 * database "gates" that freeze a worker at an exact point of a step (so it can be killed there), a
 * worker process to SIGKILL, a private PostgreSQL that can be restarted, and readers for what the host
 * and the API hold about a run.
 */
import type { ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { appendFile, mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import pg from "pg";
import { expect } from "vitest";
import { type FakeCluster, startFakeCluster } from "../../../deploy/fake-cluster/server";
import { createDatabase } from "../../../server/db/client";
import { applyMigrations } from "../../../server/db/migrate";
import { loadWorkerConfig } from "../../../worker/config";
import { startWorker } from "../../../worker/index";
import type { Api, Sigmaflow } from "./lifecycle-harness";
import { waitFor } from "./wait-for";

export { type PrivatePostgres, startPrivatePostgres } from "./private-postgres";

/** A development host like the harness's, which can also come back on its port with a new host key. */
export async function startRekeyableHost(port = 0) {
  const dir = await mkdtemp(path.join(tmpdir(), "sf-fault-host-"));
  const rootDir = path.join(dir, "home");
  const authorizedKeysPath = path.join(dir, "authorized_keys");
  await writeFile(authorizedKeysPath, "");
  let hostKeyPath = path.join(dir, "host_key");
  let generation = 0;
  const options = () => ({ rootDir, authorizedKeysPath, hostKeyPath });
  let cluster: FakeCluster = await startFakeCluster({ ...options(), port });
  let stopped = false;
  return {
    dir,
    rootDir,
    get port() {
      return cluster.port;
    },
    get fingerprint() {
      return cluster.hostKeyFingerprint;
    },
    authorize: (publicKey: string) => appendFile(authorizedKeysPath, `${publicKey}\n`),
    async stop() {
      stopped = true;
      await cluster.close();
    },
    async restart() {
      if (!stopped) await cluster.close();
      cluster = await startFakeCluster({ ...options(), port: cluster.port });
      stopped = false;
    },
    /** The same host (files, accounts, port) presenting a freshly generated host key. */
    async restartWithNewHostKey(): Promise<string> {
      if (!stopped) await cluster.close();
      generation += 1;
      hostKeyPath = path.join(dir, `host_key_${generation}`);
      cluster = await startFakeCluster({ ...options(), port: cluster.port });
      stopped = false;
      return cluster.hostKeyFingerprint;
    },
    cleanup: () => rm(dir, { recursive: true, force: true }),
  };
}
export type RekeyableHost = Awaited<ReturnType<typeof startRekeyableHost>>;

let nextGateKey = 7_300_000 + Math.floor(Math.random() * 100_000);

/**
 * A trigger that makes matching inserts wait while the gate is closed: the worker's transaction stops
 * right there, holding everything it did so far uncommitted, and can be killed at that exact point. The
 * trigger takes a shared advisory lock that conflicts with the exclusive one the closed gate holds.
 */
export async function installGate(databaseUrl: string, table: string, when: string) {
  const key = nextGateKey++;
  const name = `sf_fault_gate_${key}`;
  const admin = new pg.Client({ connectionString: databaseUrl });
  await admin.connect();
  await admin.query(`create or replace function sf_fault_gate() returns trigger language plpgsql as $$
    begin perform pg_advisory_xact_lock_shared(tg_argv[0]::bigint); return new; end $$`);
  await admin.query(
    `create trigger ${name} before insert on ${table} for each row when (${when}) execute function sf_fault_gate('${key}')`,
  );
  let holder: pg.Client | null = null;
  let removed = false;
  const gate = {
    async close() {
      holder = new pg.Client({ connectionString: databaseUrl });
      await holder.connect();
      await holder.query("select pg_advisory_lock($1)", [key]);
    },
    /** Waits until a transaction is stopped at the gate. */
    async waitForWaiter(timeoutMs = 20_000) {
      await waitFor(
        `a transaction waiting at gate ${name}`,
        async () => {
          const { rows } = await admin.query(
            "select count(*)::int as n from pg_locks where locktype = 'advisory' and not granted and objid = $1",
            [key],
          );
          return rows[0].n as number;
        },
        (n) => n > 0,
        { timeoutMs },
      );
    },
    async open() {
      const client = holder;
      holder = null;
      if (!client) return;
      await client.query("select pg_advisory_unlock($1)", [key]).catch(() => {});
      await client.end().catch(() => {});
    },
    /** Opens the gate and drops its trigger; safe to call more than once. */
    async remove() {
      await gate.open();
      if (removed) return;
      removed = true;
      await admin.query(`drop trigger if exists ${name} on ${table}`);
      await admin.end();
    },
  };
  return gate;
}
export type Gate = Awaited<ReturnType<typeof installGate>>;

/** SIGKILLs a worker process and waits until it is gone. */
export async function killHard(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return;
  const gone = new Promise<void>((resolve) => child.once("exit", () => resolve()));
  child.kill("SIGKILL");
  await gone;
}

/** A worker in this process with extra settings (mail relay, intervals). */
export async function startInProcessWorker(sf: Sigmaflow, extraEnv: Record<string, string> = {}) {
  return startWorker(loadWorkerConfig({ ...sf.workerEnv, ...extraEnv } as never));
}

/** Every log chunk of a run through the API, in order, paging by sequence number, joined as bytes. */
export async function apiLogBytes(api: Api, runId: string): Promise<Buffer> {
  let afterSeq = 0;
  const parts: Buffer[] = [];
  for (;;) {
    const page = await api("GET", `/api/runs/${runId}/log?afterSeq=${afterSeq}`);
    expect(page.status).toBe(200);
    const chunks = page.body.chunks as { seq: number; dataBase64: string }[];
    if (chunks.length === 0) return Buffer.concat(parts);
    for (const chunk of chunks) parts.push(Buffer.from(chunk.dataBase64, "base64"));
    afterSeq = page.body.lastSeq;
  }
}

/** The whole log of a run through the API, decoded as UTF-8. */
export async function apiLogText(api: Api, runId: string): Promise<string> {
  return (await apiLogBytes(api, runId)).toString("utf8");
}

export const runDirOnHost = (rootDir: string, runId: string) => path.join(rootDir, "runs", `sf-run-${runId}`);

export const hostFile = (rootDir: string, runId: string, name: string) =>
  readFile(path.join(runDirOnHost(rootDir, runId), name), "utf8");

export function occurrences(text: string, needle: string): number {
  return text.split(needle).length - 1;
}

/** createTestDatabase against any PostgreSQL: a fresh database with the migrations applied. */
export async function createDatabaseAt(adminUrl: string, label: string) {
  const name = `sf_${label.replace(/[^a-z0-9]/gi, "_").toLowerCase()}_${randomBytes(4).toString("hex")}`;
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  await admin.query(`create database ${name}`);
  await admin.end();
  const url = new URL(adminUrl);
  url.pathname = `/${name}`;
  await applyMigrations(url.toString());
  const { db, pool } = createDatabase(url.toString());
  return {
    db,
    pool,
    url: url.toString(),
    async drop() {
      await pool.end();
      const client = new pg.Client({ connectionString: adminUrl });
      await client.connect();
      await client.query(`drop database if exists ${name} with (force)`);
      await client.end();
    },
  };
}
