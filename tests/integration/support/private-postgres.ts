/**
 * A PostgreSQL cluster of its own on a free loopback port, for tests and benchmarks that restart the
 * database or load it heavily without disturbing the shared one. Free of vitest, so benchmarks use it too.
 */
import { execFile } from "node:child_process";
import { chown, mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { freePort } from "./http-browser";

const run = promisify(execFile);

const PG_BIN = process.env.SF_PG_BIN ?? "/usr/lib/postgresql/15/bin";

/**
 * A PostgreSQL cluster of its own (initdb as the postgres user, trust authentication; fsync off unless
 * `durable`, which benchmarks use to measure what a real installation would see).
 */
export async function startPrivatePostgres(
  options: { maxConnections?: number; durable?: boolean; extraOptions?: string } = {},
) {
  const dir = await mkdtemp(path.join(tmpdir(), "sf-private-pg-"));
  const { uid, gid } = await postgresIds();
  await chown(dir, uid, gid);
  const dataDir = path.join(dir, "data");
  const asPostgres = (bin: string, args: string[]) =>
    run("runuser", ["-u", "postgres", "--", path.join(PG_BIN, bin), ...args], { timeout: 60_000 });
  await asPostgres("initdb", ["-D", dataDir, "-A", "trust", "-U", "postgres", "--no-sync"]);
  const port = await freePort();
  const serverOptions = `-p ${port} -k ${dir} -c listen_addresses=127.0.0.1 -c max_connections=${options.maxConnections ?? 200}${options.durable ? "" : " -c fsync=off"} ${options.extraOptions ?? ""}`;
  const ctl = (action: string, extra: string[] = []) =>
    asPostgres("pg_ctl", ["-D", dataDir, "-l", path.join(dir, "server.log"), "-w", ...extra, action]);
  await ctl("start", ["-o", serverOptions]);
  return {
    port,
    dataDir,
    adminUrl: `postgres://postgres@127.0.0.1:${port}/postgres`,
    /** `pg_ctl restart -m fast`: every connection is cut, the server is back when this resolves. */
    restart: () => ctl("restart", ["-m", "fast", "-o", serverOptions]),
    async stop() {
      await ctl("stop", ["-m", "immediate"]).catch(() => {});
      await rm(dir, { recursive: true, force: true });
    },
  };
}
export type PrivatePostgres = Awaited<ReturnType<typeof startPrivatePostgres>>;

async function postgresIds(): Promise<{ uid: number; gid: number }> {
  const [uid, gid] = await Promise.all([run("id", ["-u", "postgres"]), run("id", ["-g", "postgres"])]);
  return { uid: Number(uid.stdout.trim()), gid: Number(gid.stdout.trim()) };
}
