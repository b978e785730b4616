/**
 * What an end-to-end run needs beyond the server `deploy/test.sh` starts: the development cluster host
 * (deploy/fake-cluster, a real SSH server running jobs with /bin/sh) registered for a group through the
 * API by one of its admins, with a group account and an allocation, and a worker process on the same
 * database (DATABASE_URL and SIGMAFLOW_SECRETS_KEY as deploy/test.sh exports them).
 */
import { type ChildProcess, spawn } from "node:child_process";
import { appendFile, mkdtemp, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { expect } from "vitest";
import { startFakeCluster } from "../../../deploy/fake-cluster/server";
import type { SessionApi } from "./session";

/** The development host in this process, its files in a folder of its own. */
export async function startDevHost() {
  const dir = await mkdtemp(path.join(tmpdir(), "sf-e2e-host-"));
  const authorizedKeysPath = path.join(dir, "authorized_keys");
  await writeFile(authorizedKeysPath, "");
  const cluster = await startFakeCluster({
    port: 0,
    rootDir: path.join(dir, "home"),
    hostKeyPath: path.join(dir, "host_key"),
    authorizedKeysPath,
  });
  return {
    port: cluster.port,
    authorize: (publicKey: string) => appendFile(authorizedKeysPath, `${publicKey}\n`),
    async stop() {
      await cluster.close();
      await rm(dir, { recursive: true, force: true });
    },
  };
}
export type DevHost = Awaited<ReturnType<typeof startDevHost>>;

/**
 * As a group admin: registers `host` under `name` (direct scheduler, runs in ~/runs), confirms the key
 * it showed, sets up a generated group account whose key the host accepts, and makes sure the group has
 * an allocation covering today. Returns the host's id.
 */
export async function registerDevHostAsAdmin(
  admin: SessionApi,
  groupId: string,
  host: DevHost,
  name: string,
): Promise<string> {
  const created = await admin("POST", `/api/groups/${groupId}/hosts`, {
    name,
    address: "127.0.0.1",
    port: host.port,
    scheduler: "direct",
    remoteBaseDir: "runs",
    maxConcurrentRuns: 10,
  });
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  const hostId = created.body.id as string;
  const confirmed = await admin("POST", `/api/hosts/${hostId}/host-key/confirm`, {
    fingerprint: created.body.hostKeyFingerprint,
  });
  expect(confirmed.status, JSON.stringify(confirmed.body)).toBe(200);
  const account = await admin("POST", `/api/hosts/${hostId}/accounts`, {
    kind: "group",
    username: "sigmaflow",
  });
  expect(account.status, JSON.stringify(account.body)).toBe(201);
  await host.authorize(account.body.publicKey);

  const allocations = await admin("GET", `/api/groups/${groupId}/allocations`);
  expect(allocations.status).toBe(200);
  const now = Date.now();
  const current = (allocations.body.allocations as { startsAt: string; endsAt: string }[]).some(
    (a) => Date.parse(a.startsAt) <= now && Date.parse(a.endsAt) > now,
  );
  if (!current) {
    const allocation = await admin("POST", `/api/groups/${groupId}/allocations`, {
      name: "End-to-end checks",
      coreHours: 100,
      startsAt: new Date(now - 3_600_000).toISOString(),
      endsAt: new Date(now + 7 * 86_400_000).toISOString(),
    });
    expect(allocation.status, JSON.stringify(allocation.body)).toBe(201);
  }
  return hostId;
}

/**
 * A worker process (`worker/index.ts`) polling hosts every 500 ms. Its log (warnings and worse) is kept
 * for a failing test to show.
 */
export function spawnWorker(): { log: () => string; stop: () => Promise<void> } {
  const child: ChildProcess = spawn(process.execPath, ["--import", "tsx", "worker/index.ts"], {
    env: { ...process.env, WORKER_POLL_INTERVAL_MS: "500", LOG_LEVEL: "warn" },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let output = "";
  const keep = (data: Buffer) => {
    output = (output + data.toString()).slice(-20_000);
  };
  child.stdout!.on("data", keep);
  child.stderr!.on("data", keep);
  return {
    log: () => output,
    async stop() {
      if (child.exitCode !== null || child.signalCode !== null) return;
      const gone = new Promise<void>((resolve) => child.once("exit", () => resolve()));
      child.kill("SIGTERM");
      const kill = setTimeout(() => child.kill("SIGKILL"), 10_000);
      await gone;
      clearTimeout(kill);
    },
  };
}
