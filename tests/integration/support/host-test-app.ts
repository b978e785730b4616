/**
 * Helpers for the host, code, recipe and allocation tests: JSON calls with an API token, a development cluster host
 * (deploy/fake-cluster, a real SSH server on loopback) in a throwaway folder, and rows a run would leave
 * behind (for the "cannot delete while runs refer to it" rules).
 */
import { randomBytes } from "node:crypto";
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { type FakeCluster, startFakeCluster } from "../../../deploy/fake-cluster/server";
import type { Database } from "../../../server/db/client";
import { allocations, codes, hostAccounts, recipes, runs } from "../../../server/db/schema";
import { codeDefinition } from "./code-fixtures";

// biome-ignore lint/suspicious/noExplicitAny: replies are checked field by field with expect().
export type JsonReply = { status: number; body: any; text: string };

export async function callApi(
  baseUrl: string,
  token: string | null,
  method: string,
  urlPath: string,
  body?: unknown,
): Promise<JsonReply> {
  const headers: Record<string, string> = { "content-type": "application/json" };
  if (token) headers.authorization = `Bearer ${token}`;
  const response = await fetch(`${baseUrl}${urlPath}`, {
    method,
    headers,
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const text = await response.text();
  return { status: response.status, body: text ? JSON.parse(text) : null, text };
}

export type TestCluster = FakeCluster & {
  dir: string;
  hostKeyPath: string;
  authorizedKeysPath: string;
  stop(): Promise<void>;
};

/** A fake cluster host with its own new host key, on a free loopback port. */
export async function startTestCluster(): Promise<TestCluster> {
  const dir = await mkdtemp(path.join(tmpdir(), "sigmaflow-cluster-"));
  const hostKeyPath = path.join(dir, "host_ed25519_key");
  const authorizedKeysPath = path.join(dir, "authorized_keys");
  await writeFile(authorizedKeysPath, "");
  const cluster = await startFakeCluster({
    port: 0,
    rootDir: path.join(dir, "home"),
    hostKeyPath,
    authorizedKeysPath,
    username: "researcher",
  });
  return {
    ...cluster,
    dir,
    hostKeyPath,
    authorizedKeysPath,
    async stop() {
      await cluster.close();
      await rm(dir, { recursive: true, force: true });
    },
  };
}

/** Inserts a run (with the code, recipe and allocation it needs unless given) that points at a host. */
export async function insertRun(
  db: Database,
  refs: { groupId: string; hostId: string; hostAccountId?: string; recipeId?: string },
): Promise<string> {
  const suffix = randomBytes(4).toString("hex");
  let recipeId = refs.recipeId;
  if (!recipeId) {
    const definition = codeDefinition({ name: `run-code-${suffix}` });
    const [code] = await db
      .insert(codes)
      .values({ groupId: refs.groupId, name: definition.name, version: definition.version, definition })
      .returning();
    const [recipe] = await db
      .insert(recipes)
      .values({
        groupId: refs.groupId,
        name: `run-recipe-${suffix}`,
        stages: [{ name: "only", codeId: code!.id }],
      })
      .returning();
    recipeId = recipe!.id;
  }
  let hostAccountId = refs.hostAccountId;
  if (!hostAccountId) {
    const [account] = await db
      .insert(hostAccounts)
      .values({
        hostId: refs.hostId,
        ownerUserId: null,
        username: "runner",
        publicKey: "ssh-ed25519 AAAA",
        privateKeyEncrypted: Buffer.from("not used"),
      })
      .returning();
    hostAccountId = account!.id;
  }
  const [allocation] = await db
    .insert(allocations)
    .values({
      groupId: refs.groupId,
      name: `run-allocation-${suffix}`,
      grantedCoreSeconds: 3600,
      startsAt: new Date("2000-01-01T00:00:00Z"),
      endsAt: new Date("2000-01-02T00:00:00Z"),
    })
    .returning();
  const [run] = await db
    .insert(runs)
    .values({
      groupId: refs.groupId,
      recipeId,
      hostId: refs.hostId,
      hostAccountId,
      allocationId: allocation!.id,
      name: `run ${suffix}`,
      spec: {},
      plan: {},
      fingerprint: suffix,
      cores: 1,
      wallTimeMinutes: 1,
      reservedCoreSeconds: 60,
      remoteDir: `/scratch/${suffix}`,
      submitToken: `token-${suffix}`,
    })
    .returning();
  return run!.id;
}
