/**
 * The worker's transport layer against the development fake cluster (deploy/fake-cluster), started
 * in-process on a free port with a temporary sandbox and freshly generated keys: pooled SSH, host-key
 * pinning, recovery after the host restarts, run-folder staging with sha256 verification and refusals,
 * the direct scheduler's contract, and log tailing by byte offset.
 *
 * Sources of expected values: SHA-256 test vector "abc" from FIPS 180-2 Appendix B.1; shell exit status
 * 128 + signal number for a signalled process (POSIX sh "Exit Status", SIGTERM = 15 on Linux, signal(7));
 * UTF-8 byte lengths from RFC 3629 §3 (é U+00E9 = 2 bytes, € U+20AC = 3 bytes, 😀 U+1F600 = 4 bytes).
 * Waits poll a condition with a deadline; none sleeps a fixed time.
 */
import { createHash } from "node:crypto";
import { mkdir, mkdtemp, readdir, readFile, rm, stat, symlink, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { type FakeCluster, startFakeCluster } from "../../deploy/fake-cluster/server";
import { fetchHostKey } from "../../server/hosts/host-key-probe";
import { readLogFrom, readLogsFrom } from "../../worker/logs/tail";
import { directScheduler } from "../../worker/schedulers/direct";
import type { JobStatus, JobSubmission } from "../../worker/schedulers/types";
import { HostKeyMismatchError, RemotePathError, TransportError } from "../../worker/ssh/errors";
import { SshPool, type SshTarget } from "../../worker/ssh/pool";
import { prepareRunDir, stageFiles } from "../../worker/ssh/remote-fs";
import type { RemoteSession } from "../../worker/ssh/session";
import { testKeyPair } from "./support/keys";
import { waitFor } from "./support/wait-for";

let workDir: string;
let rootDir: string;
let cluster: FakeCluster;
let clientKey: { private: string; public: string };
const pools: SshPool[] = [];

function clusterOptions(port: number, maxSessionsPerConnection = 10) {
  return {
    port,
    rootDir,
    hostKeyPath: path.join(workDir, "host_key"),
    authorizedKeysPath: path.join(workDir, "authorized_keys"),
    maxSessionsPerConnection,
  };
}

function targetFor(port: number, hostKey: string, key = "fake-host:account"): SshTarget {
  return {
    key,
    address: "127.0.0.1",
    port,
    username: "sigmaflow",
    privateKey: clientKey.private,
    pinnedHostKey: hostKey,
  };
}

function newPool(options?: ConstructorParameters<typeof SshPool>[0]): SshPool {
  const pool = new SshPool(options);
  pools.push(pool);
  return pool;
}

/** Whether a process exists and is not a zombie (an exited child not yet reaped is state Z in /proc/<pid>/stat). */
async function isLive(pid: number): Promise<boolean> {
  const stat = await readFile(`/proc/${pid}/stat`, "utf8").catch(() => null);
  return stat !== null && stat.slice(stat.lastIndexOf(")") + 2)[0] !== "Z";
}

/** Counts exec round trips, to check the batched calls stay batched. */
function countingSession(session: RemoteSession): { session: RemoteSession; execs: () => number } {
  let count = 0;
  const counted: RemoteSession = Object.create(session);
  counted.exec = (argv, options) => {
    count += 1;
    return session.exec(argv, options);
  };
  counted.run = async (argv, options) => {
    count += 1;
    return session.run(argv, options);
  };
  return { session: counted, execs: () => count };
}

beforeAll(async () => {
  workDir = await mkdtemp(path.join(tmpdir(), "sigmaflow-transport-"));
  rootDir = path.join(workDir, "home");
  clientKey = testKeyPair();
  await writeFile(path.join(workDir, "authorized_keys"), `${clientKey.public}\n`);
  cluster = await startFakeCluster(clusterOptions(0));
});

afterAll(async () => {
  for (const pool of pools) await pool.close();
  await cluster?.close();
  await rm(workDir, { recursive: true, force: true });
});

describe("SSH pool", () => {
  it("runs many concurrent commands over at most two reused connections", async () => {
    const pool = newPool();
    const session = pool.session(targetFor(cluster.port, cluster.hostPublicKey));
    const outputs = await Promise.all(
      Array.from({ length: 60 }, (_, i) => session.run(["printf", "%s", `n${i}`])),
    );
    expect(outputs).toEqual(Array.from({ length: 60 }, (_, i) => `n${i}`));
    const stats = pool.stats();
    expect(stats.connections).toBeLessThanOrEqual(2);
    expect(stats.perTarget["fake-host:account"]).toBe(stats.connections);
    expect(stats.connectionsOpened).toBeLessThanOrEqual(2);
    // A second burst reuses the same connections.
    await Promise.all(Array.from({ length: 20 }, () => session.run(["true"])));
    expect(pool.stats().connectionsOpened).toBe(stats.connectionsOpened);
  });

  it("quotes arguments so the remote shell sees them verbatim", async () => {
    const pool = newPool();
    const session = pool.session(targetFor(cluster.port, cluster.hostPublicKey));
    const tricky = [
      "it's",
      "$(touch pwned)",
      "a b",
      "`id`",
      "semi;colon",
      "star*",
      "",
      "new\nline",
      "back\\slash",
    ];
    const output = await session.run(["printf", "%s\\0", ...tricky]);
    expect(output.split("\0").slice(0, -1)).toEqual(tricky);
    await expect(stat(path.join(rootDir, "pwned"))).rejects.toThrow(/ENOENT/);
  });

  it("keeps channels per connection within the limit the server enforces", async () => {
    const limited = await startFakeCluster({ ...clusterOptions(0, 3) });
    try {
      const pool = newPool({ maxConnectionsPerTarget: 1, maxChannelsPerConnection: 3 });
      const session = pool.session(targetFor(limited.port, limited.hostPublicKey, "limited"));
      const results = await Promise.all(
        Array.from({ length: 24 }, () => session.exec(["sh", "-c", "sleep 0.05; echo ok"])),
      );
      expect(results.map((result) => result.code)).toEqual(Array(24).fill(0));
      expect(pool.stats().peakChannelsPerConnection).toBe(3);

      // Control: a pool allowed more channels than the server grants meets refusals (after its brief retries,
      // well under the 1 s the commands hold their channels), so the check above can fail.
      const greedy = newPool({ maxConnectionsPerTarget: 1, maxChannelsPerConnection: 6 });
      const greedySession = greedy.session(targetFor(limited.port, limited.hostPublicKey, "greedy"));
      const settled = await Promise.allSettled(
        Array.from({ length: 12 }, () => greedySession.exec(["sleep", "1"])),
      );
      const refused = settled.filter((result) => result.status === "rejected");
      expect(refused.length).toBeGreaterThan(0);
      expect((refused[0] as PromiseRejectedResult).reason).toBeInstanceOf(TransportError);
      expect(((refused[0] as PromiseRejectedResult).reason as TransportError).failure).toBe("channel");
    } finally {
      await limited.close();
    }
  });

  it("reads the host key and its fingerprint as ssh-keygen prints them", async () => {
    const fetched = await fetchHostKey("127.0.0.1", cluster.port, 5000);
    expect(fetched.publicKey).toBe(cluster.hostPublicKey);
    expect(fetched.fingerprint).toBe(cluster.hostKeyFingerprint);
  });

  it("refuses a host whose key differs from the pinned one and keeps no connection", async () => {
    const impostor = testKeyPair().public;
    const pool = newPool();
    const session = pool.session(targetFor(cluster.port, impostor, "pinned-elsewhere"));
    const error = await session.exec(["true"]).catch((caught: unknown) => caught);
    expect(error).toBeInstanceOf(HostKeyMismatchError);
    expect((error as HostKeyMismatchError).actualFingerprint).toBe(cluster.hostKeyFingerprint);
    expect((error as HostKeyMismatchError).expectedFingerprint).not.toBe(cluster.hostKeyFingerprint);
    expect((error as HostKeyMismatchError).retryable).toBe(false);
    expect(pool.stats().connections).toBe(0);
  });

  it("reports a stopped host as a TransportError and recovers when it is back on the same port", async () => {
    const restartable = await startFakeCluster(clusterOptions(0));
    const port = restartable.port;
    const pool = newPool({ readyTimeoutMs: 3000 });
    const session = pool.session(targetFor(port, restartable.hostPublicKey, "restartable"));
    expect(await session.run(["echo", "before"])).toBe("before\n");

    await restartable.close();
    await waitFor(
      "the pool to drop its connections to the stopped host",
      async () => pool.stats().perTarget.restartable ?? 0,
      (connections) => connections === 0,
    );
    const error = await session.exec(["echo", "during"]).catch((caught: unknown) => caught);
    expect(error).toBeInstanceOf(TransportError);
    expect((error as TransportError).retryable).toBe(true);

    const again = await startFakeCluster(clusterOptions(port));
    try {
      expect(again.hostPublicKey).toBe(restartable.hostPublicKey);
      expect(await session.run(["echo", "after"])).toBe("after\n");
    } finally {
      await again.close();
    }
  });

  it("gives up on a command after its timeout and frees the channel", async () => {
    const pool = newPool();
    const session = pool.session(targetFor(cluster.port, cluster.hostPublicKey, "timeouts"));
    const error = await session.exec(["sleep", "20"], { timeoutMs: 300 }).catch((caught: unknown) => caught);
    expect(error).toBeInstanceOf(TransportError);
    expect((error as TransportError).failure).toBe("command-timeout");
    // Only the persistent SFTP channel may remain; none was opened here, so nothing stays open.
    await waitFor(
      "the timed-out command's channel to be released",
      async () => pool.stats().channelsInUse,
      (channels) => channels === 0,
    );
    expect(await session.run(["echo", "still usable"])).toBe("still usable\n");
  });

  it("reads whole files over SFTP within a size limit", async () => {
    await mkdir(path.join(rootDir, "files"), { recursive: true });
    await writeFile(path.join(rootDir, "files/result.txt"), "x".repeat(1000));
    const session = newPool().session(targetFor(cluster.port, cluster.hostPublicKey));
    expect((await session.readFile("files/result.txt", 1000)).toString()).toBe("x".repeat(1000));
    await expect(session.readFile("files/result.txt", 999)).rejects.toMatchObject({ reason: "too-large" });
    await expect(session.readFile("files/none.txt", 10)).rejects.toMatchObject({ reason: "missing" });
    expect(await session.stat("files/none.txt")).toBeNull();
    expect((await session.stat("files/result.txt"))?.sizeBytes).toBe(1000);
  });

  it("fails a command in flight when the connection drops, without crashing the process", async () => {
    const dropping = await startFakeCluster(clusterOptions(0));
    const pool = newPool();
    const session = pool.session(targetFor(dropping.port, dropping.hostPublicKey, "dropping"));
    const running = session.exec(["sleep", "20"]).catch((caught: unknown) => caught);
    await waitFor(
      "the command to hold a channel",
      async () => pool.stats().channelsInUse,
      (channels) => channels === 1,
    );
    await dropping.close();
    expect(await running).toBeInstanceOf(TransportError);
  });
});

describe("run folders", () => {
  let session: RemoteSession;
  beforeAll(() => {
    session = newPool().session(targetFor(cluster.port, cluster.hostPublicKey));
  });

  it("creates the run folder mode 700 and stages files verified by sha256", async () => {
    const runDir = await prepareRunDir(session, "runs", "r-staging");
    expect(runDir).toBe("runs/r-staging");
    expect((await stat(path.join(rootDir, "runs/r-staging"))).mode & 0o777).toBe(0o700);

    const big = Buffer.alloc(300_000, 7);
    const staged = await stageFiles(session, runDir, [
      { relativePath: "abc.txt", content: Buffer.from("abc") },
      { relativePath: "stage-1/inputs/big.bin", content: big },
      { relativePath: "empty", content: Buffer.alloc(0) },
    ]);
    // FIPS 180-2 Appendix B.1: SHA-256("abc").
    expect(staged[0]).toEqual({
      relativePath: "abc.txt",
      sha256: "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad",
    });
    expect(staged[1]!.sha256).toBe(createHash("sha256").update(big).digest("hex"));
    // FIPS 180-2 / common knowledge: SHA-256 of the empty string.
    expect(staged[2]!.sha256).toBe("e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
    expect(await readFile(path.join(rootDir, "runs/r-staging/stage-1/inputs/big.bin"))).toEqual(big);

    // Staging again (a repeated step) rewrites the same files.
    const again = await stageFiles(session, runDir, [
      { relativePath: "abc.txt", content: Buffer.from("abcd") },
    ]);
    expect(again[0]!.sha256).toBe(createHash("sha256").update("abcd").digest("hex"));
  });

  it("refuses paths that leave the run folder before touching the host", async () => {
    const runDir = await prepareRunDir(session, "runs", "r-escape");
    for (const bad of ["../outside.txt", "/etc/passwd", "a/../../x", "./x", "a//b", ".hidden", "-rf"]) {
      await expect(
        stageFiles(session, runDir, [{ relativePath: bad, content: Buffer.from("x") }]),
      ).rejects.toBeInstanceOf(RemotePathError);
    }
    await expect(stat(path.join(rootDir, "runs/outside.txt"))).rejects.toThrow(/ENOENT/);
    await expect(prepareRunDir(session, "runs/../elsewhere", "r")).rejects.toBeInstanceOf(RemotePathError);
    await expect(prepareRunDir(session, "runs", "../r")).rejects.toBeInstanceOf(RemotePathError);
  });

  it("refuses a run folder, base folder or subfolder that is a planted symbolic link", async () => {
    await mkdir(path.join(rootDir, "elsewhere"), { recursive: true });
    await mkdir(path.join(rootDir, "runs"), { recursive: true });
    await symlink(path.join(rootDir, "elsewhere"), path.join(rootDir, "runs/r-planted"));
    await expect(prepareRunDir(session, "runs", "r-planted")).rejects.toBeInstanceOf(RemotePathError);

    await symlink(path.join(rootDir, "runs"), path.join(rootDir, "linked-base"));
    await expect(prepareRunDir(session, "linked-base", "r-new")).rejects.toThrow(/symbolic link/);
    await expect(stat(path.join(rootDir, "runs/r-new"))).rejects.toThrow(/ENOENT/);

    const runDir = await prepareRunDir(session, "runs", "r-sub");
    await symlink(path.join(rootDir, "elsewhere"), path.join(rootDir, "runs/r-sub/stage-1"));
    await expect(
      stageFiles(session, runDir, [{ relativePath: "stage-1/input.txt", content: Buffer.from("x") }]),
    ).rejects.toBeInstanceOf(RemotePathError);
    await expect(stat(path.join(rootDir, "elsewhere/input.txt"))).rejects.toThrow(/ENOENT/);
  });

  it("replaces a link planted at a file name instead of writing through it", async () => {
    const runDir = await prepareRunDir(session, "runs", "r-file-link");
    const victim = path.join(rootDir, "elsewhere-victim.txt");
    await writeFile(victim, "keep me");
    await symlink(victim, path.join(rootDir, "runs/r-file-link/input.txt"));
    await stageFiles(session, runDir, [{ relativePath: "input.txt", content: Buffer.from("staged") }]);
    expect(await readFile(victim, "utf8")).toBe("keep me");
    const staged = path.join(rootDir, "runs/r-file-link/input.txt");
    expect((await stat(staged)).isFile()).toBe(true);
    expect(await readFile(staged, "utf8")).toBe("staged");
  });
});

describe("direct scheduler", () => {
  let session: RemoteSession;
  beforeAll(() => {
    session = newPool().session(targetFor(cluster.port, cluster.hostPublicKey));
  });

  async function stageJob(
    name: string,
    script: string,
    cores = 1,
    limits: Pick<JobSubmission, "wallTimeMinutes" | "wallTimeGraceSeconds"> = { wallTimeMinutes: 5 },
  ): Promise<JobSubmission> {
    const runDir = await prepareRunDir(session, "runs", name);
    await stageFiles(session, runDir, [{ relativePath: "job.sh", content: Buffer.from(script) }]);
    return { runDir, token: `tok-${name}`, logName: "job.log", scriptName: "job.sh", cores, ...limits };
  }

  /** Live processes whose session is `sid` (field 6 of /proc/<pid>/stat, proc(5)). */
  async function liveInSession(sid: number): Promise<number[]> {
    const pids = (await readdir("/proc")).filter((name) => /^\d+$/.test(name)).map(Number);
    const live: number[] = [];
    for (const pid of pids) {
      const stat = await readFile(`/proc/${pid}/stat`, "utf8").catch(() => null);
      if (!stat) continue;
      const fields = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
      if (fields[0] !== "Z" && Number(fields[3]) === sid) live.push(pid);
    }
    return live;
  }

  async function stateOf(job: JobSubmission & { jobId: string }): Promise<JobStatus | undefined> {
    return (await directScheduler.states(session, [job])).get(job.jobId);
  }

  it("starts one process however often and however concurrently submit is called", async () => {
    const job = await stageJob(
      "d-once",
      "echo started >> starts.txt\nwhile [ ! -f release ]; do sleep 0.02; done\n",
    );
    const [first, second] = await Promise.all([
      directScheduler.submit(session, job),
      directScheduler.submit(session, job),
    ]);
    const third = await directScheduler.submit(session, job);
    expect(new Set([first.jobId, second.jobId, third.jobId]).size).toBe(1);
    expect([first.alreadySubmitted, second.alreadySubmitted].sort()).toEqual([false, true]);
    expect(third.alreadySubmitted).toBe(true);

    await writeFile(path.join(rootDir, "runs/d-once/release"), "");
    const ended = await waitFor(
      "the job to complete",
      () => stateOf({ ...job, jobId: first.jobId }),
      (status) => status?.state === "completed",
    );
    expect(ended?.exitCode).toBe(0);
    expect(await readFile(path.join(rootDir, "runs/d-once/starts.txt"), "utf8")).toBe("started\n");
  });

  it("reports every job of a host in one command, failing exit codes included", async () => {
    const ok = await stageJob("d-ok", "echo fine\n");
    const failing = await stageJob("d-fail", "echo broken >&2\nexit 7\n");
    const running = await stageJob("d-run", "while [ ! -f release ]; do sleep 0.02; done\n");
    const jobs: Array<JobSubmission & { jobId: string }> = [];
    for (const job of [ok, failing, running])
      jobs.push({ ...job, jobId: (await directScheduler.submit(session, job)).jobId });

    const counted = countingSession(session);
    const statuses = await waitFor(
      "the first job to complete and the second to fail",
      () => directScheduler.states(counted.session, jobs),
      (map) => map.get(jobs[0]!.jobId)?.state === "completed" && map.get(jobs[1]!.jobId)?.state === "failed",
    );
    const before = counted.execs();
    await directScheduler.states(counted.session, jobs);
    expect(counted.execs() - before).toBe(1);

    expect(statuses.get(jobs[1]!.jobId)).toMatchObject({ state: "failed", exitCode: 7 });
    expect(statuses.get(jobs[2]!.jobId)).toMatchObject({ state: "running", exitCode: null });
    expect(statuses.get(jobs[0]!.jobId)?.endedAt?.getTime()).toBeGreaterThanOrEqual(
      statuses.get(jobs[0]!.jobId)!.startedAt!.getTime(),
    );
    expect(await readFile(path.join(rootDir, "runs/d-fail/job.log"), "utf8")).toBe("broken\n");
    await writeFile(path.join(rootDir, "runs/d-run/release"), "");
  });

  it("cancels the whole process group and then reports the job cancelled", async () => {
    const job = await stageJob("d-cancel", "sleep 30 &\nchild=$!\necho $child > child.pid\nwait $child\n");
    const { jobId } = await directScheduler.submit(session, job);
    await waitFor(
      "the job to record its child's pid",
      () => readFile(path.join(rootDir, "runs/d-cancel/child.pid"), "utf8").catch(() => ""),
      (text) => text.trim() !== "",
    );
    const childPid = Number((await readFile(path.join(rootDir, "runs/d-cancel/child.pid"), "utf8")).trim());
    expect((await stateOf({ ...job, jobId }))?.state).toBe("running");

    await directScheduler.cancel(session, { ...job, jobId });
    const status = await waitFor(
      "the job to be cancelled",
      () => stateOf({ ...job, jobId }),
      (s) => s?.state === "cancelled",
    );
    // POSIX sh: a command ended by a signal has status 128 + n; SIGTERM is 15 on Linux (signal(7)).
    expect(status?.exitCode).toBe(143);
    // The background child, in the same process group, was signalled too.
    await waitFor(
      "the job's child to end",
      () => isLive(childPid),
      (live) => !live,
    );
    // Cancelling again, after the end, is harmless.
    await directScheduler.cancel(session, { ...job, jobId });
    expect((await stateOf({ ...job, jobId }))?.state).toBe("cancelled");
  });

  // Regression: a code that ignores TERM outlived a cancel, still using the host's cores, because the
  // cancel stopped waiting once the batch script had ended.
  it("kills what a cancelled job left behind that ignores TERM", async () => {
    const job = await stageJob(
      "d-cancel-stubborn",
      "sh -c \"trap '' TERM; sleep 30\" &\necho $! > child.pid\nwait\n",
    );
    const { jobId } = await directScheduler.submit(session, job);
    await waitFor(
      "the job to record its child's pid",
      () => readFile(path.join(rootDir, "runs/d-cancel-stubborn/child.pid"), "utf8").catch(() => ""),
      (text) => text.trim() !== "",
    );
    const childPid = Number(
      (await readFile(path.join(rootDir, "runs/d-cancel-stubborn/child.pid"), "utf8")).trim(),
    );
    await directScheduler.cancel(session, { ...job, jobId });
    // KILL is sent before cancel returns; on a busy machine the process takes a moment to be gone.
    await waitFor(
      "the stubborn child to be gone",
      () => isLive(childPid),
      (live) => !live,
      {
        timeoutMs: 5000,
      },
    );
    expect((await stateOf({ ...job, jobId }))?.state).toBe("cancelled");
    expect(await liveInSession(Number(jobId))).toEqual([]);
  });

  // Regression: the direct scheduler did not enforce the wall-time limit, so a job ran (and was
  // charged) past it. A batch scheduler sends TERM at the limit and KILL after a grace period.
  it("stops a job at its wall-time limit with TERM and reports it timed out", async () => {
    // 1/60 min = 1 s; fractions of a minute count to the second.
    const job = await stageJob("d-limit", "echo $$ > script.pid\nsleep 30\necho late\n", 2, {
      wallTimeMinutes: 1 / 60,
    });
    const { jobId } = await directScheduler.submit(session, job);
    const status = await waitFor(
      "the job to end at its wall-time limit",
      () => stateOf({ ...job, jobId }),
      (s) => s?.state !== "running" && s?.state !== "pending",
    );
    // POSIX sh: a command ended by a signal has status 128 + n; SIGTERM is 15 on Linux (signal(7)).
    expect(status).toMatchObject({ state: "failed", exitCode: 143, timedOut: true });
    const usage = await directScheduler.accounting(session, { ...job, jobId }, 2);
    expect(usage?.timedOut).toBe(true);
    // Stopped at 1 s; under 5 s allows a loaded 2-core machine.
    expect(usage!.elapsedSeconds).toBeGreaterThanOrEqual(1);
    expect(usage!.elapsedSeconds).toBeLessThan(5);
    expect(await readFile(path.join(rootDir, "runs/d-limit/job.log"), "utf8")).not.toContain("late");
    const scriptPid = Number((await readFile(path.join(rootDir, "runs/d-limit/script.pid"), "utf8")).trim());
    await waitFor(
      "the batch script to end",
      () => isLive(scriptPid),
      (live) => !live,
    );
  });

  it("kills a job that ignores TERM once the grace period after its limit is over", async () => {
    const job = await stageJob("d-stubborn", "trap '' TERM\nsleep 30 &\necho $! > child.pid\nwait\n", 1, {
      wallTimeMinutes: 1 / 60,
      wallTimeGraceSeconds: 1,
    });
    const { jobId } = await directScheduler.submit(session, job);
    const status = await waitFor(
      "the job to end at its wall-time limit",
      () => stateOf({ ...job, jobId }),
      (s) => s?.state !== "running" && s?.state !== "pending",
    );
    // 128 + SIGKILL (9 on Linux, signal(7)), as a shell reports a KILLed command.
    expect(status).toMatchObject({ state: "failed", exitCode: 137, timedOut: true });
    const usage = await directScheduler.accounting(session, { ...job, jobId }, 1);
    // Limit 1 s + grace 1 s; under 6 s allows a loaded 2-core machine.
    expect(usage!.elapsedSeconds).toBeGreaterThanOrEqual(2);
    expect(usage!.elapsedSeconds).toBeLessThan(6);
    const childPid = Number((await readFile(path.join(rootDir, "runs/d-stubborn/child.pid"), "utf8")).trim());
    await waitFor(
      "the job's child to end",
      () => isLive(childPid),
      (live) => !live,
    );
    expect(await liveInSession(Number(jobId))).toEqual([]);
  });

  it("leaves no timer behind when a job ends within its limit", async () => {
    const job = await stageJob("d-in-time", "echo done\n");
    const { jobId } = await directScheduler.submit(session, job);
    const status = await waitFor(
      "the job to complete",
      () => stateOf({ ...job, jobId }),
      (s) => s?.state === "completed",
    );
    expect(status?.timedOut).toBeUndefined();
    expect((await directScheduler.accounting(session, { ...job, jobId }, 1))?.timedOut).toBe(false);
    // The wrapper is the session leader (setsid): nothing of the job, its timer included, lives on.
    await waitFor(
      "nothing of the job to live on in its session",
      () => liveInSession(Number(jobId)),
      (live) => live.length === 0,
    );
  });

  it("accounts cores × measured wall time", async () => {
    const job = await stageJob("d-account", "sleep 0.4\n", 3);
    const { jobId } = await directScheduler.submit(session, job);
    await waitFor(
      "the job to complete",
      () => stateOf({ ...job, jobId }),
      (s) => s?.state === "completed",
    );
    const usage = await directScheduler.accounting(session, { ...job, jobId }, 3);
    expect(usage).not.toBeNull();
    // sleep 0.4 lasts at least 0.4 s (sleep(1)); under 5 s allows a loaded 2-core machine.
    expect(usage!.elapsedSeconds).toBeGreaterThanOrEqual(0.4);
    expect(usage!.elapsedSeconds).toBeLessThan(5);
    expect(usage!.coreSeconds).toBeCloseTo(3 * usage!.elapsedSeconds, 9);
  });
});

describe("log tailing", () => {
  let session: RemoteSession;
  beforeAll(async () => {
    session = newPool().session(targetFor(cluster.port, cluster.hostPublicKey));
    await mkdir(path.join(rootDir, "logs"), { recursive: true });
  });

  it("returns complete lines by byte offset and never splits a UTF-8 character", async () => {
    // é is 2 bytes, € 3, 😀 4 (RFC 3629 §3): "ééé€😀\n" is 2+2+2+3+4+1 = 14 bytes.
    const logPath = path.join(rootDir, "logs/utf8.log");
    await writeFile(logPath, "ééé€😀\nnext line\npartial");
    const first = await readLogFrom(session, "logs/utf8.log", 0, 5);
    // Five bytes hold "éé" and half of the third é: no newline, chunk full → the complete characters only.
    expect(first).toEqual({ text: "éé", nextOffsetBytes: 4 });
    const second = await readLogFrom(session, "logs/utf8.log", 4, 8);
    // Bytes 4..11: "é" (2) + "€" (3) + 3 of the 4 bytes of 😀 → "é€", next at 9.
    expect(second).toEqual({ text: "é€", nextOffsetBytes: 9 });
    const rest = await readLogFrom(session, "logs/utf8.log", 9);
    expect(rest).toEqual({ text: "😀\nnext line\n", nextOffsetBytes: 24 });
    // The unfinished last line waits for its newline, unless the job has ended.
    expect(await readLogFrom(session, "logs/utf8.log", 24)).toEqual({ text: "", nextOffsetBytes: 24 });
    expect(await readLogFrom(session, "logs/utf8.log", 24, 1024, { includePartialLine: true })).toEqual({
      text: "partial",
      nextOffsetBytes: 31,
    });
  });

  it("returns only the lines that fit when a chunk holds several", async () => {
    await writeFile(path.join(rootDir, "logs/lines.log"), "one\ntwo\nthree\n");
    expect(await readLogFrom(session, "logs/lines.log", 0, 10)).toEqual({
      text: "one\ntwo\n",
      nextOffsetBytes: 8,
    });
    expect(await readLogFrom(session, "logs/lines.log", 8, 10)).toEqual({
      text: "three\n",
      nextOffsetBytes: 14,
    });
  });

  it("reads many logs at once over SFTP, with no remote command, by the same rules", async () => {
    await writeFile(path.join(rootDir, "logs/a.log"), "α line\nβ half");
    await writeFile(path.join(rootDir, "logs/b.log"), "");
    await writeFile(path.join(rootDir, "logs/c.log"), "x".repeat(10));
    const counted = countingSession(session);
    const chunks = await readLogsFrom(
      counted.session,
      [
        { path: "logs/a.log", offsetBytes: 0 },
        { path: "logs/missing.log", offsetBytes: 5 },
        { path: "logs/b.log", offsetBytes: 0 },
        { path: "logs/c.log", offsetBytes: 2 },
        { path: "logs/a.log", offsetBytes: 40 },
      ],
      4,
    );
    expect(counted.execs()).toBe(0);
    // α is 2 bytes (RFC 3629): "α l" = 4 bytes fills the chunk with no newline → handed out whole.
    expect(chunks).toEqual([
      { text: "α l", nextOffsetBytes: 4 },
      { text: "", nextOffsetBytes: 5 },
      { text: "", nextOffsetBytes: 0 },
      { text: "xxxx", nextOffsetBytes: 6 },
      { text: "", nextOffsetBytes: 40 },
    ]);
    const whole = await readLogsFrom(session, [{ path: "logs/a.log", offsetBytes: 0 }]);
    expect(whole).toEqual([{ text: "α line\n", nextOffsetBytes: 8 }]);
  });

  it("treats a missing log as empty", async () => {
    expect(await readLogFrom(session, "logs/not-yet.log", 0)).toEqual({ text: "", nextOffsetBytes: 0 });
    expect(await readLogFrom(session, "logs/not-yet.log", 120)).toEqual({ text: "", nextOffsetBytes: 120 });
  });
});
