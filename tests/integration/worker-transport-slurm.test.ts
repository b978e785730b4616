/**
 * The transport layer against the real engines deploy/engines/start-engines.sh brings up on loopback:
 * Debian's OpenSSH server (MaxSessions 10) and a single-node Slurm 22.05 with slurmdbd accounting. The
 * same contracts as the fake-cluster test, proven on the programs a cluster really runs.
 *
 * Needs the ENGINE_* variables of the engines' env file; deploy/test.sh sets them. Expected values: the
 * pinned key and paths from that env file; exit status 128 + signal (POSIX sh), SIGTERM = 15 (signal(7));
 * Slurm semantics from the sbatch/squeue/sacct man pages (ElapsedRaw in whole seconds, AllocCPUS =
 * --cpus-per-task for one task). Waits poll a condition with a deadline; none sleeps a fixed time.
 */
import { execFileSync } from "node:child_process";
import { randomUUID } from "node:crypto";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { chown, lchown, readFile, stat, symlink, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { fingerprintOf } from "../../server/crypto/ssh-public-keys";
import { fetchHostKey } from "../../server/hosts/host-key-probe";
import { readLogFrom, readLogsFrom } from "../../worker/logs/tail";
import { directScheduler } from "../../worker/schedulers/direct";
import { slurmScheduler } from "../../worker/schedulers/slurm";
import type { JobStatus, JobSubmission } from "../../worker/schedulers/types";
import { HostKeyMismatchError, RemotePathError, type TransportError } from "../../worker/ssh/errors";
import { SshPool, type SshTarget } from "../../worker/ssh/pool";
import { prepareRunDir, stageFiles } from "../../worker/ssh/remote-fs";
import type { RemoteSession } from "../../worker/ssh/session";
import { testKeyPair } from "./support/keys";
import { waitFor } from "./support/wait-for";

const env = process.env;
const pools: SshPool[] = [];
const submitted: string[] = [];
/** Unique per test run: tokens and folders of earlier runs stay in sacct and on disk. */
const RUN_TAG = `t${randomUUID().slice(0, 8)}`;

let target: SshTarget;
let remoteBase: string;
let jobUid: number;
let jobGid: number;

function newPool(options?: ConstructorParameters<typeof SshPool>[0]): SshPool {
  const pool = new SshPool(options);
  pools.push(pool);
  return pool;
}

function countingSession(session: RemoteSession): { session: RemoteSession; execs: () => number } {
  let count = 0;
  const counted: RemoteSession = Object.create(session);
  counted.exec = (argv, options) => {
    count += 1;
    return session.exec(argv, options);
  };
  counted.run = (argv, options) => {
    count += 1;
    return session.run(argv, options);
  };
  return { session: counted, execs: () => count };
}

beforeAll(() => {
  if (!env.ENGINE_SSH_HOST) {
    throw new Error(
      "ENGINE_SSH_HOST is not set: run this test through deploy/test.sh, which starts the real sshd and Slurm " +
        "(or start them with deploy/engines/start-engines.sh <workdir> <envfile> and source the env file)",
    );
  }
  target = {
    key: "engines:sfrun",
    address: env.ENGINE_SSH_HOST,
    port: Number(env.ENGINE_SSH_PORT),
    username: env.ENGINE_SSH_USER!,
    privateKey: readFileSync(env.ENGINE_SSH_KEY!, "utf8"),
    pinnedHostKey: env.ENGINE_SSH_HOST_KEY_PUB!,
  };
  remoteBase = `${env.ENGINE_REMOTE_BASE!}/${RUN_TAG}`;
  jobUid = Number(execFileSync("id", ["-u", target.username], { encoding: "utf8" }).trim());
  jobGid = Number(execFileSync("id", ["-g", target.username], { encoding: "utf8" }).trim());
});

afterAll(async () => {
  if (target) {
    const session = newPool().session(target);
    if (submitted.length > 0) await session.exec(["scancel", ...submitted]).catch(() => undefined);
    // Slurm jobs may still be writing their logs for a moment after scancel: wait for them to leave squeue.
    await waitFor(
      "the test's jobs to leave the Slurm queue",
      () => session.run(["squeue", "-h", "-u", target.username, "-o", "%i"]).catch(() => ""),
      (listed) => !submitted.some((id) => listed.split("\n").includes(id)),
    ).catch(() => undefined);
    await session.exec(["rm", "-rf", "--", remoteBase]).catch(() => undefined);
  }
  for (const pool of pools) await pool.close();
});

describe("SSH pool over OpenSSH", () => {
  it("reads the pinned host key, with the fingerprint ssh-keygen prints", async () => {
    const fetched = await fetchHostKey(target.address, target.port, 5000);
    expect(fetched.publicKey).toBe(target.pinnedHostKey);
    const scratch = mkdtempSync(path.join(tmpdir(), "sigmaflow-engines-key-"));
    try {
      writeFileSync(path.join(scratch, "host.pub"), `${target.pinnedHostKey}\n`);
      const printed = execFileSync("ssh-keygen", ["-l", "-f", path.join(scratch, "host.pub")], {
        encoding: "utf8",
      });
      expect(fetched.fingerprint).toBe(printed.split(" ")[1]);
      expect(fingerprintOf(target.pinnedHostKey)).toBe(fetched.fingerprint);
    } finally {
      rmSync(scratch, { recursive: true, force: true });
    }
  });

  it("refuses sshd when another key is pinned", async () => {
    const pool = newPool();
    const other = {
      ...target,
      key: "engines:wrong-key",
      pinnedHostKey: testKeyPair().public,
    };
    const error = await pool
      .session(other)
      .exec(["true"])
      .catch((caught: unknown) => caught);
    expect(error).toBeInstanceOf(HostKeyMismatchError);
    expect((error as HostKeyMismatchError).actualFingerprint).toBe(fingerprintOf(target.pinnedHostKey));
    expect(pool.stats().connections).toBe(0);
  });

  it("stays within MaxSessions 10 on one connection under a burst", async () => {
    const pool = newPool({ maxConnectionsPerTarget: 1 });
    const session = pool.session(target);
    const results = await Promise.all(
      Array.from({ length: 40 }, (_, i) => session.exec(["sh", "-c", `sleep 0.05; echo ${i}`])),
    );
    expect(results.map((result) => result.code)).toEqual(Array(40).fill(0));
    expect(results.map((result) => result.stdout.toString().trim())).toEqual(
      Array.from({ length: 40 }, (_, i) => `${i}`),
    );
    expect(pool.stats().peakChannelsPerConnection).toBe(8);
    expect(pool.stats().connectionsOpened).toBe(1);

    // Control: 16 channels on one connection exceed MaxSessions 10 and are refused.
    const greedy = newPool({ maxConnectionsPerTarget: 1, maxChannelsPerConnection: 16 });
    const settled = await Promise.allSettled(
      Array.from({ length: 16 }, () =>
        greedy.session({ ...target, key: "engines:greedy" }).exec(["sleep", "1"]),
      ),
    );
    const refused = settled.filter((result): result is PromiseRejectedResult => result.status === "rejected");
    expect(refused.length).toBeGreaterThan(0);
    expect((refused[0]!.reason as TransportError).failure).toBe("channel");
  });
});

describe("run folders on the real host", () => {
  let session: RemoteSession;
  beforeAll(() => {
    session = newPool().session(target);
  });

  it("stages into an absolute base folder with sha256 verification", async () => {
    const runDir = await prepareRunDir(session, remoteBase, "r-stage");
    expect(runDir).toBe(`${remoteBase}/r-stage`);
    const info = await stat(runDir);
    expect(info.mode & 0o777).toBe(0o700);
    expect(info.uid).toBe(jobUid);
    const staged = await stageFiles(session, runDir, [
      { relativePath: "abc.txt", content: Buffer.from("abc") },
      { relativePath: "stage-1/deep/file.bin", content: Buffer.alloc(100_000, 1) },
    ]);
    // FIPS 180-2 Appendix B.1: SHA-256("abc").
    expect(staged[0]!.sha256).toBe("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    expect((await readFile(`${runDir}/stage-1/deep/file.bin`)).length).toBe(100_000);
  });

  it("refuses a planted symbolic link as run folder, and replaces one planted at a file name", async () => {
    await prepareRunDir(session, remoteBase, "r-target");
    await symlink(`${remoteBase}/r-target`, `${remoteBase}/r-planted`);
    await expect(prepareRunDir(session, remoteBase, "r-planted")).rejects.toBeInstanceOf(RemotePathError);
    await expect(prepareRunDir(session, `${remoteBase}/r-planted`, "inner")).rejects.toThrow(/symbolic link/);

    const runDir = await prepareRunDir(session, remoteBase, "r-file-link");
    const victim = `${remoteBase}/r-target/victim.txt`;
    await writeFile(victim, "keep me");
    await chown(victim, jobUid, jobGid);
    await symlink(victim, `${runDir}/input.txt`);
    await lchown(`${runDir}/input.txt`, jobUid, jobGid);
    await stageFiles(session, runDir, [{ relativePath: "input.txt", content: Buffer.from("staged") }]);
    expect(await readFile(victim, "utf8")).toBe("keep me");
    expect(await readFile(`${runDir}/input.txt`, "utf8")).toBe("staged");
  });
});

async function stageJob(
  session: RemoteSession,
  name: string,
  script: string,
  cores = 1,
): Promise<JobSubmission> {
  const runDir = await prepareRunDir(session, remoteBase, name);
  await stageFiles(session, runDir, [
    { relativePath: "job.sh", content: Buffer.from(`#!/bin/sh\n${script}`) },
  ]);
  return {
    runDir,
    token: `sf-${RUN_TAG}-${name}`,
    logName: "job.log",
    scriptName: "job.sh",
    cores,
    wallTimeMinutes: 5,
  };
}

describe("direct scheduler under OpenSSH", () => {
  it("detaches the job from the channel, submits once, and cancels the process group", async () => {
    const session = newPool().session(target);
    const job = await stageJob(session, "d-openssh", "echo started >> starts.txt\nsleep 30\n");
    const startedAt = Date.now();
    const [first, second] = await Promise.all([
      directScheduler.submit(session, job),
      directScheduler.submit(session, job),
    ]);
    // The submit returns while the 30 s job runs: the job holds none of the channel's pipes.
    expect(Date.now() - startedAt).toBeLessThan(10_000);
    expect(first.jobId).toBe(second.jobId);
    expect([first.alreadySubmitted, second.alreadySubmitted].sort()).toEqual([false, true]);
    const ref = { ...job, jobId: first.jobId };
    await waitFor(
      "the job to run",
      async () => (await directScheduler.states(session, [ref])).get(ref.jobId)?.state,
      (state) => state === "running",
    );
    await directScheduler.cancel(session, ref);
    const status = await waitFor(
      "the job to be cancelled",
      async () => (await directScheduler.states(session, [ref])).get(ref.jobId),
      (s) => s?.state === "cancelled",
    );
    // POSIX sh: status 128 + n for a command ended by signal n; SIGTERM = 15.
    expect(status?.exitCode).toBe(143);
    expect(await readFile(`${job.runDir}/starts.txt`, "utf8")).toBe("started\n");
  });
});

describe("Slurm scheduler", () => {
  let session: RemoteSession;
  beforeAll(() => {
    session = newPool().session(target);
  });

  async function statusOf(jobId: string, job: JobSubmission): Promise<JobStatus | undefined> {
    return (await slurmScheduler.states(session, [{ ...job, jobId }])).get(jobId);
  }

  it("submits once per token, however often and however concurrently submit is called", async () => {
    const job = await stageJob(session, "s-once", "while [ ! -f release ]; do sleep 0.1; done\n");
    const [first, second] = await Promise.all([
      slurmScheduler.submit(session, job),
      slurmScheduler.submit(session, job),
    ]);
    submitted.push(first.jobId);
    const third = await slurmScheduler.submit(session, job);
    expect(new Set([first.jobId, second.jobId, third.jobId]).size).toBe(1);
    expect([first.alreadySubmitted, second.alreadySubmitted].sort()).toEqual([false, true]);
    expect(third.alreadySubmitted).toBe(true);
    const named = await session.run(["squeue", "-h", "-t", "all", `--name=${job.token}`, "-o", "%i"]);
    expect(named.trim().split("\n")).toEqual([first.jobId]);

    await waitFor(
      "the job to run",
      () => statusOf(first.jobId, job),
      (status) => status?.state === "running",
    );
    await writeFile(`${job.runDir}/release`, "");
    const done = await waitFor(
      "the job to complete",
      () => statusOf(first.jobId, job),
      (status) => status?.state === "completed",
    );
    expect(done?.exitCode).toBe(0);
    // After the end, the name is still found (squeue until MinJobAge, then sacct): no second submission.
    expect(await slurmScheduler.submit(session, job)).toEqual({ jobId: first.jobId, alreadySubmitted: true });
  });

  it("reports a host's jobs with at most two commands: squeue, then sacct for the ended ones", async () => {
    const ok = await stageJob(session, "s-ok", "echo 'α fine'\n");
    const failing = await stageJob(session, "s-fail", "echo broken >&2\nexit 7\n");
    const running = await stageJob(session, "s-run", "while [ ! -f release ]; do sleep 0.1; done\n");
    const jobs: Array<JobSubmission & { jobId: string }> = [];
    for (const job of [ok, failing, running]) {
      const { jobId } = await slurmScheduler.submit(session, job);
      submitted.push(jobId);
      jobs.push({ ...job, jobId });
    }
    await waitFor(
      "the jobs to complete, fail and run",
      () => slurmScheduler.states(session, jobs),
      (map) =>
        map.get(jobs[0]!.jobId)?.state === "completed" &&
        map.get(jobs[1]!.jobId)?.state === "failed" &&
        map.get(jobs[2]!.jobId)?.state === "running",
    );
    const counted = countingSession(session);
    const statuses = await slurmScheduler.states(counted.session, jobs);
    expect(counted.execs()).toBeLessThanOrEqual(2);
    expect(statuses.get(jobs[1]!.jobId)).toMatchObject({ state: "failed", exitCode: 7 });
    expect(statuses.get(jobs[0]!.jobId)?.endedAt).toBeInstanceOf(Date);
    expect(statuses.get(jobs[2]!.jobId)?.startedAt).toBeInstanceOf(Date);

    const [okLog, failLog] = await readLogsFrom(session, [
      { path: `${ok.runDir}/job.log`, offsetBytes: 0 },
      { path: `${failing.runDir}/job.log`, offsetBytes: 0 },
    ]);
    expect(okLog).toEqual({ text: "α fine\n", nextOffsetBytes: Buffer.byteLength("α fine\n") });
    expect(failLog?.text).toBe("broken\n");
    expect(await readLogFrom(session, `${ok.runDir}/job.log`, okLog!.nextOffsetBytes)).toEqual({
      text: "",
      nextOffsetBytes: okLog!.nextOffsetBytes,
    });
    await writeFile(`${running.runDir}/release`, "");
  });

  it("cancels a running job, which then reads as cancelled; a second cancel is harmless", async () => {
    const job = await stageJob(session, "s-cancel", "sleep 60\n");
    const { jobId } = await slurmScheduler.submit(session, job);
    submitted.push(jobId);
    await waitFor(
      "the job to run",
      () => statusOf(jobId, job),
      (status) => status?.state === "running",
    );
    await slurmScheduler.cancel(session, { ...job, jobId });
    await waitFor(
      "the job to be cancelled",
      () => statusOf(jobId, job),
      (status) => status?.state === "cancelled",
    );
    await slurmScheduler.cancel(session, { ...job, jobId });
    expect((await statusOf(jobId, job))?.state).toBe("cancelled");
  });

  it("accounts ElapsedRaw × AllocCPUS from sacct", async () => {
    const job = await stageJob(session, "s-account", "sleep 2\n", 2);
    const { jobId } = await slurmScheduler.submit(session, job);
    submitted.push(jobId);
    await waitFor(
      "the job to complete",
      () => statusOf(jobId, job),
      (status) => status?.state === "completed",
    );
    const usage = await waitFor(
      "sacct to account the job's elapsed time",
      () => slurmScheduler.accounting(session, { ...job, jobId }, 2),
      (value) => value !== null && value.elapsedSeconds > 0,
    );
    // sleep 2 runs ≥ 2 s; ElapsedRaw is whole seconds; under 10 s allows a loaded 2-core machine.
    expect(usage!.elapsedSeconds).toBeGreaterThanOrEqual(2);
    expect(usage!.elapsedSeconds).toBeLessThan(10);
    expect(Number.isInteger(usage!.elapsedSeconds)).toBe(true);
    // --cpus-per-task=2 with one task allocates 2 CPUs (sbatch(1)).
    expect(usage!.coreSeconds).toBe(2 * usage!.elapsedSeconds);
  });
});
