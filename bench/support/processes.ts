/**
 * Processes the benchmarks start the way deploy/start.sh does: the development cluster host, the
 * server and the worker, each in its own Node process (so their CPU is their own), plus the readings the
 * benchmarks print about them.
 */
import { type ChildProcess, spawn } from "node:child_process";
import { readdirSync, readFileSync, readlinkSync, writeFileSync } from "node:fs";
import { createServer } from "node:net";
import path from "node:path";

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const address = server.address();
      server.close(() => resolve(typeof address === "object" && address ? address.port : 0));
    });
  });
}

/**
 * Starts `node --import tsx <script>` with `env` and resolves once its standard output contains
 * `readyText` (at once when null); its standard error passes through so failures are visible.
 */
export function startNodeService(
  script: string,
  env: Record<string, string>,
  readyText: string | null,
  timeoutMs = 30_000,
): Promise<ChildProcess> {
  // BENCH_CPU_PROFILE=<folder> writes a V8 CPU profile of every service there when it exits.
  const profile = process.env.BENCH_CPU_PROFILE;
  const flags = profile ? ["--cpu-prof", `--cpu-prof-dir=${profile}`] : [];
  const child = spawn(process.execPath, [...flags, "--import", "tsx", script], {
    env: { ...process.env, ...env },
    stdio: ["ignore", "pipe", "inherit"],
  });
  if (readyText === null) {
    child.stdout!.resume();
    return Promise.resolve(child);
  }
  return new Promise((resolve, reject) => {
    const timer = setTimeout(
      () => reject(new Error(`${script} did not start within ${timeoutMs} ms`)),
      timeoutMs,
    );
    const onExit = (code: number | null) =>
      reject(new Error(`${script} exited (${code}) before it was ready`));
    child.once("exit", onExit);
    let seen = "";
    child.stdout!.on("data", (data: Buffer) => {
      if (seen.length < 100_000) seen += data.toString();
      if (seen.includes(readyText)) {
        clearTimeout(timer);
        child.off("exit", onExit);
        seen = "";
        child.stdout!.removeAllListeners("data");
        // BENCH_SHOW_LOGS=1 passes the services' own logs through, to see why a figure is what it is.
        if (process.env.BENCH_SHOW_LOGS === "1") child.stdout!.pipe(process.stdout);
        else child.stdout!.resume();
        resolve(child);
      }
    });
  });
}

/** Stops a child with SIGTERM (SIGKILL after `graceMs`) and waits until it is gone. */
export async function stopChild(child: ChildProcess, graceMs = 10_000): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return;
  const gone = new Promise<void>((resolve) => child.once("exit", () => resolve()));
  child.kill("SIGTERM");
  const timer = setTimeout(() => child.kill("SIGKILL"), graceMs);
  await gone;
  clearTimeout(timer);
}

export type FakeClusterProcess = {
  child: ChildProcess;
  port: number;
  rootDir: string;
  /** "ssh-ed25519 AAAA…", the key to pin. */
  hostKey: string;
  authorizedKeysPath: string;
};

/** The development cluster host (deploy/fake-cluster) in its own process, files under `workDir`. */
export async function startFakeClusterProcess(
  workDir: string,
  authorizedKeys = "",
): Promise<FakeClusterProcess> {
  const authorizedKeysPath = path.join(workDir, "authorized_keys");
  const hostKeyPath = path.join(workDir, "host_key");
  const rootDir = path.join(workDir, "root");
  writeFileSync(authorizedKeysPath, authorizedKeys);
  const port = await freePort();
  const child = await startNodeService(
    "deploy/fake-cluster/index.ts",
    {
      FAKE_CLUSTER_PORT: String(port),
      FAKE_CLUSTER_ROOT: rootDir,
      FAKE_CLUSTER_HOST_KEY: hostKeyPath,
      FAKE_CLUSTER_AUTHORIZED_KEYS: authorizedKeysPath,
    },
    "listening on",
  );
  const hostKey = readFileSync(`${hostKeyPath}.pub`, "utf8").trim().split(" ").slice(0, 2).join(" ");
  return { child, port, rootDir, hostKey, authorizedKeysPath };
}

/**
 * CPU seconds (user + system) a process used itself and its reaped children used, from /proc/<pid>/stat
 * (proc(5)).
 */
export function processCpuSplit(pid: number): { self: number; children: number } {
  const stat = readFileSync(`/proc/${pid}/stat`, "utf8");
  const fields = stat
    .slice(stat.lastIndexOf(")") + 2)
    .split(" ")
    .map(Number);
  // Fields 14–17 of proc(5) (utime, stime, cutime, cstime) are 11–14 here, after pid and comm.
  // USER_HZ is 100 on Linux (common practice; sysconf(_SC_CLK_TCK)).
  return { self: (fields[11]! + fields[12]!) / 100, children: (fields[13]! + fields[14]!) / 100 };
}

/** CPU seconds a process and its reaped children used. */
export function processCpuSeconds(pid: number): number {
  const { self, children } = processCpuSplit(pid);
  return self + children;
}

/** CPU seconds of a process and its live direct children (a PostgreSQL postmaster and its backends). */
export function processTreeCpuSeconds(pid: number): number {
  let total = processCpuSeconds(pid);
  for (const entry of readdirSync("/proc")) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      const stat = readFileSync(`/proc/${entry}/stat`, "utf8");
      const parent = Number(stat.slice(stat.lastIndexOf(")") + 2).split(" ")[1]);
      if (parent === pid) total += processCpuSeconds(Number(entry));
    } catch {}
  }
  return total;
}

/** The postmaster's pid, from the first line of postmaster.pid in the data folder. */
export function postmasterPid(dataDir: string): number {
  return Number(readFileSync(path.join(dataDir, "postmaster.pid"), "utf8").split("\n")[0]);
}

/**
 * Established TCP connections from process `pid` to 127.0.0.1:`port`, read from /proc (proc(5):
 * /proc/net/tcp lists sockets by inode; /proc/<pid>/fd links to "socket:[inode]").
 */
export function connectionsFrom(pid: number, port: number): number {
  const inodes = new Set<string>();
  for (const table of ["/proc/net/tcp", "/proc/net/tcp6"]) {
    let text = "";
    try {
      text = readFileSync(table, "utf8");
    } catch {
      continue;
    }
    for (const line of text.split("\n").slice(1)) {
      const fields = line.trim().split(/\s+/);
      if (fields.length < 10) continue;
      const remotePort = Number.parseInt(fields[2]!.split(":")[1] ?? "", 16);
      // State 01 is TCP_ESTABLISHED (include/net/tcp_states.h).
      if (remotePort === port && fields[3] === "01") inodes.add(fields[9]!);
    }
  }
  let count = 0;
  for (const link of listFdLinks(pid)) {
    const match = /^socket:\[(\d+)\]$/.exec(link);
    if (match && inodes.has(match[1]!)) count += 1;
  }
  return count;
}

function listFdLinks(pid: number): string[] {
  const links: string[] = [];
  for (const fd of readdirSync(`/proc/${pid}/fd`)) {
    try {
      links.push(readlinkSync(`/proc/${pid}/fd/${fd}`));
    } catch {}
  }
  return links;
}
