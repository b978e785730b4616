/**
 * Transport cost of a trivial run, end to end on the host side: prepare the run folder, stage two small
 * files (sha256 verified), submit with the direct scheduler, poll states and logs batched per host, read
 * the accounting. Many runs are driven at once, as the worker's steps would, against the fake cluster (in
 * its own process) and, when the ENGINE_* variables are set, the real OpenSSH server. Prints runs/s and
 * remote commands per run; Sigmaflow's goal for the whole system is ≥ 50 trivial runs/s on 2 cores, so the
 * transport alone must leave room for the database and queue.
 *
 *   node --import tsx bench/ssh/run-cycle.bench.ts [runs] [concurrency]
 */
import type { ChildProcess } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { testKeyPair } from "../../tests/integration/support/keys";
import { readLogsFrom } from "../../worker/logs/tail";
import { directScheduler } from "../../worker/schedulers/direct";
import type { JobSubmission } from "../../worker/schedulers/types";
import { SshPool, type SshTarget } from "../../worker/ssh/pool";
import { prepareRunDir, stageFiles } from "../../worker/ssh/remote-fs";
import type { RemoteSession } from "../../worker/ssh/session";
import { processCpuSeconds, startFakeClusterProcess } from "../support/processes";

const runCount = Number(process.argv[2] ?? 200);
const concurrency = Number(process.argv[3] ?? 32);
const work = mkdtempSync(path.join(tmpdir(), "sigmaflow-run-cycle-bench-"));

async function startFakeHost(): Promise<{ child: ChildProcess; target: SshTarget }> {
  const keys = testKeyPair();
  const fake = await startFakeClusterProcess(work, `${keys.public}\n`);
  return {
    child: fake.child,
    target: {
      key: "bench:fake",
      address: "127.0.0.1",
      port: fake.port,
      username: "sigmaflow",
      privateKey: keys.private,
      pinnedHostKey: fake.hostKey,
    },
  };
}

/** Counts remote commands, the unit of cost on a host (each forks a shell there). */
function counting(session: RemoteSession): { session: RemoteSession; commands: () => number } {
  let commands = 0;
  const counted: RemoteSession = Object.create(session);
  counted.exec = (argv, options) => {
    commands += 1;
    return session.exec(argv, options);
  };
  counted.run = (argv, options) => {
    commands += 1;
    return session.run(argv, options);
  };
  return { session: counted, commands: () => commands };
}

async function cycle(
  label: string,
  rawSession: RemoteSession,
  baseDir: string,
  serverPid?: number,
): Promise<void> {
  const { session, commands } = counting(rawSession);
  await session.run(["true"]);
  const before = commands();
  const started = performance.now();
  const clientCpuBefore = process.cpuUsage();
  const serverCpuBefore = serverPid ? processCpuSeconds(serverPid) : 0;
  const active = new Map<string, JobSubmission & { jobId: string }>();
  let launched = 0;
  let finished = 0;

  const launchOne = async (index: number) => {
    const runDir = await prepareRunDir(session, baseDir, `run-${process.pid}-${index}`);
    await stageFiles(session, runDir, [
      { relativePath: "job.sh", content: Buffer.from("echo computing\necho done\n") },
      { relativePath: "input.json", content: Buffer.from(JSON.stringify({ index })) },
    ]);
    const job = {
      runDir,
      token: `bench-${index}`,
      logName: "job.log",
      scriptName: "job.sh",
      cores: 1,
      wallTimeMinutes: 1,
    };
    const { jobId } = await directScheduler.submit(session, job);
    active.set(jobId, { ...job, jobId });
  };

  // The stage/submit steps, `concurrency` at a time.
  const launching = Promise.all(
    Array.from({ length: concurrency }, async () => {
      while (launched < runCount) await launchOne(launched++);
    }),
  );

  // The poller: one states command and one log command per round for everything active on the host.
  let launchDone = false;
  void launching.then(() => {
    launchDone = true;
  });
  while (!launchDone || active.size > 0) {
    const jobs = [...active.values()];
    if (jobs.length === 0) {
      await new Promise((resolve) => setTimeout(resolve, 5));
      continue;
    }
    const states = await directScheduler.states(session, jobs);
    const ended = jobs.filter((job) => {
      const state = states.get(job.jobId)?.state;
      return state === "completed" || state === "failed";
    });
    if (ended.length > 0) {
      await readLogsFrom(
        session,
        ended.map((job) => ({ path: `${job.runDir}/${job.logName}`, offsetBytes: 0 })),
        256 * 1024,
        { includePartialLine: true },
      );
      await Promise.all(ended.map((job) => directScheduler.accounting(session, job, job.cores)));
      for (const job of ended) active.delete(job.jobId);
      finished += ended.length;
    }
  }
  await launching;
  const seconds = (performance.now() - started) / 1000;
  const perRun = (commands() - before) / runCount;
  const clientCpu = process.cpuUsage(clientCpuBefore);
  const clientMsPerRun = (clientCpu.user + clientCpu.system) / 1000 / runCount;
  const serverMsPerRun = serverPid
    ? ((processCpuSeconds(serverPid) - serverCpuBefore) * 1000) / runCount
    : null;
  console.log(
    `${label}: ${finished} runs in ${seconds.toFixed(2)} s = ${(finished / seconds).toFixed(1)} runs/s, ` +
      `${perRun.toFixed(2)} remote commands per run (concurrency ${concurrency}); CPU per run: worker side ` +
      `${clientMsPerRun.toFixed(2)} ms${serverMsPerRun === null ? "" : `, fake-cluster process with its commands ${serverMsPerRun.toFixed(2)} ms`}`,
  );
  await rawSession.run(["sh", "-c", 'rm -rf -- "$1"/run-"$2"-*', "sh", baseDir, String(process.pid)]);
}

const fake = await startFakeHost();
const pool = new SshPool();
try {
  await cycle("fake cluster", pool.session(fake.target), "runs", fake.child.pid);
  const env = process.env;
  if (env.ENGINE_SSH_HOST) {
    const target: SshTarget = {
      key: "bench:engines",
      address: env.ENGINE_SSH_HOST,
      port: Number(env.ENGINE_SSH_PORT),
      username: env.ENGINE_SSH_USER!,
      privateKey: readFileSync(env.ENGINE_SSH_KEY!, "utf8"),
      pinnedHostKey: env.ENGINE_SSH_HOST_KEY_PUB!,
    };
    await cycle("OpenSSH sshd", pool.session(target), env.ENGINE_REMOTE_BASE!);
  } else {
    console.log("OpenSSH sshd: skipped (ENGINE_* not set; see deploy/engines/start-engines.sh)");
  }
} finally {
  await pool.close();
  fake.child.kill("SIGTERM");
  rmSync(work, { recursive: true, force: true });
}
