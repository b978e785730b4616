/**
 * Runs the development cluster host: `node --import tsx deploy/fake-cluster/index.ts`.
 * FAKE_CLUSTER_ROOT, FAKE_CLUSTER_HOST_KEY and FAKE_CLUSTER_AUTHORIZED_KEYS are required paths;
 * the host key is generated and the authorized_keys file created empty when missing. Stopping the
 * server leaves jobs started with nohup/setsid running, as on a real host.
 */
import { mkdir, open } from "node:fs/promises";
import path from "node:path";
import { z } from "zod";
import { startFakeCluster } from "./server";

const envSchema = z.object({
  FAKE_CLUSTER_PORT: z.coerce.number().int().min(1).max(65535).default(5184),
  FAKE_CLUSTER_ROOT: z.string().min(1),
  FAKE_CLUSTER_HOST_KEY: z.string().min(1),
  FAKE_CLUSTER_AUTHORIZED_KEYS: z.string().min(1),
  FAKE_CLUSTER_USER: z.string().min(1).default("sigmaflow"),
});

const env = envSchema.parse(process.env);

// "a": creates the file if missing and never truncates keys already there.
await mkdir(path.dirname(path.resolve(env.FAKE_CLUSTER_AUTHORIZED_KEYS)), { recursive: true });
await (await open(env.FAKE_CLUSTER_AUTHORIZED_KEYS, "a", 0o600)).close();

const cluster = await startFakeCluster({
  port: env.FAKE_CLUSTER_PORT,
  rootDir: env.FAKE_CLUSTER_ROOT,
  hostKeyPath: env.FAKE_CLUSTER_HOST_KEY,
  authorizedKeysPath: env.FAKE_CLUSTER_AUTHORIZED_KEYS,
  username: env.FAKE_CLUSTER_USER,
  log: (message) => console.error(`${new Date().toISOString()} fake-cluster: ${message}`),
});
console.log(`fake-cluster listening on 127.0.0.1:${cluster.port} (host key ${cluster.hostKeyFingerprint})`);

let stopping = false;
async function stop(): Promise<void> {
  if (stopping) return;
  stopping = true;
  await cluster.close();
  process.exit(0);
}
process.on("SIGINT", () => void stop());
process.on("SIGTERM", () => void stop());
