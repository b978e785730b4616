/**
 * The real compute back end the worker drives: Debian's OpenSSH server and a one-node Slurm 22.05 cluster
 * with slurmdbd accounting, brought up on loopback by deploy/engines/start-engines.sh (deploy/test.sh
 * sources the env file it writes). Everything goes over SSH as the job user, the way the worker does it:
 * SFTP to place a batch script, then sbatch / squeue / sacct / scancel as remote commands.
 *
 * Expected values come from the Slurm 22.05 man pages (cited per check: sbatch(1) for --parsable and the
 * SLURM_JOB_* variables, squeue(1) job state codes, sacct(1) State and ExitCode "code:signal") and from
 * RFC 4253 §6.6 for the host key blob. Comparisons are exact unless a tolerance is stated.
 * Waits poll a condition with a deadline; nothing sleeps for a fixed time.
 */
import { randomBytes } from "node:crypto";
import { readFileSync } from "node:fs";
import path from "node:path";
import { Client, type SFTPWrapper } from "ssh2";
import { afterAll, beforeAll, describe, it } from "vitest";
import { z } from "zod";
import { waitFor } from "./support/wait-for";

const engineEnvSchema = z.object({
  ENGINE_SSH_HOST: z.string().min(1),
  ENGINE_SSH_PORT: z.coerce.number().int().min(1).max(65535),
  ENGINE_SSH_USER: z.string().min(1),
  ENGINE_SSH_KEY: z.string().min(1),
  ENGINE_SSH_HOST_KEY_PUB: z.string().regex(/^ssh-[a-z0-9-]+ [A-Za-z0-9+/=]+$/),
  ENGINE_SLURM_CONF: z.string().min(1),
  ENGINE_REMOTE_BASE: z.string().startsWith("/"),
});
type EngineEnv = z.infer<typeof engineEnvSchema>;

function readEngineEnv(): EngineEnv {
  const parsed = engineEnvSchema.safeParse(process.env);
  if (!parsed.success) {
    const missing = parsed.error.issues.map((issue) => issue.path.join(".")).join(", ");
    throw new Error(
      `The SSH/Slurm engines are not configured (${missing}): run the suites through \`bash deploy/test.sh\`, ` +
        "or start them with deploy/engines/start-engines.sh and source the env file it writes.",
    );
  }
  return parsed.data;
}

interface ExecResult {
  code: number | null;
  stdout: string;
  stderr: string;
}

/** The key blob of an OpenSSH public key line ("type base64 [comment]"), as the server sends it. */
function publicKeyBlob(line: string): Buffer {
  return Buffer.from(line.trim().split(/\s+/)[1] ?? "", "base64");
}

function connect(env: EngineEnv, expectedHostKeyLine: string): Promise<Client> {
  const expected = publicKeyBlob(expectedHostKeyLine);
  return new Promise((resolve, reject) => {
    const client = new Client();
    client
      .on("ready", () => resolve(client))
      .on("error", reject)
      .connect({
        host: env.ENGINE_SSH_HOST,
        port: env.ENGINE_SSH_PORT,
        username: env.ENGINE_SSH_USER,
        privateKey: readFileSync(env.ENGINE_SSH_KEY),
        readyTimeout: 10_000,
        // Without hostHash, ssh2 hands over the raw key blob (RFC 4253 §6.6): pin it byte for byte.
        hostVerifier: (key: Buffer) => key.equals(expected),
      });
  });
}

function exec(client: Client, command: string): Promise<ExecResult> {
  return new Promise((resolve, reject) => {
    client.exec(command, (error, stream) => {
      if (error) return reject(error);
      let stdout = "";
      let stderr = "";
      let code: number | null = null;
      stream.on("data", (chunk: Buffer) => {
        stdout += chunk.toString("utf8");
      });
      stream.stderr.on("data", (chunk: Buffer) => {
        stderr += chunk.toString("utf8");
      });
      stream.on("exit", (exitCode: number | null) => {
        code = exitCode;
      });
      stream.on("close", () => resolve({ code, stdout, stderr }));
    });
  });
}

/** Runs a command that must succeed and returns its trimmed stdout. */
async function run(client: Client, command: string): Promise<string> {
  const result = await exec(client, command);
  if (result.code !== 0) {
    throw new Error(`\`${command}\` exited ${result.code}: ${result.stderr.trim() || result.stdout.trim()}`);
  }
  return result.stdout.trim();
}

function openSftp(client: Client): Promise<SFTPWrapper> {
  return new Promise((resolve, reject) =>
    client.sftp((error, sftp) => (error ? reject(error) : resolve(sftp))),
  );
}

function sftpCall<T>(call: (done: (error: Error | null | undefined, value?: T) => void) => void): Promise<T> {
  return new Promise((resolve, reject) =>
    call((error, value) => (error ? reject(error) : resolve(value as T))),
  );
}

const quote = (value: string) => `'${value.replaceAll("'", `'\\''`)}'`;

interface AccountingRow {
  jobId: string;
  jobName: string;
  state: string;
  exitCode: string;
  elapsedRawS: number;
  allocCpus: number;
}

// Job states after which a job never changes again (squeue(1), JOB STATE CODES).
const FINAL_STATES =
  /^(COMPLETED|FAILED|CANCELLED|TIMEOUT|OUT_OF_MEMORY|NODE_FAIL|PREEMPTED|BOOT_FAIL|DEADLINE)/;

// Concurrent: each job waits ~5 s for its full accounting record, and the jobs are independent of each other
// (two CPUs; a third job simply queues). One SSH connection carries all of them (sshd MaxSessions 10).
describe.concurrent("OpenSSH + Slurm engines on loopback", () => {
  let env: EngineEnv;
  let client: Client;
  let sftp: SFTPWrapper;
  let runDir: string;
  const token = randomBytes(6).toString("hex");
  const submitted: string[] = [];

  beforeAll(async () => {
    env = readEngineEnv();
    client = await connect(env, env.ENGINE_SSH_HOST_KEY_PUB);
    sftp = await openSftp(client);
    runDir = path.posix.join(env.ENGINE_REMOTE_BASE, `engines-test-${token}`);
    await sftpCall<void>((done) => sftp.mkdir(runDir, done));
  });

  afterAll(async () => {
    if (!client) return;
    // Nothing of ours may stay queued or running (a failed check can leave a job behind).
    if (submitted.length > 0) await exec(client, `scancel ${submitted.join(" ")}`);
    await exec(client, `rm -rf ${quote(runDir)}`);
    client.end();
  });

  /** Uploads a batch script over SFTP and submits it; returns the job id. */
  async function submit(name: string, body: string, extra = ""): Promise<string> {
    const scriptPath = path.posix.join(runDir, `${name}.sh`);
    const script = `#!/bin/bash\n${body}\n`;
    await sftpCall<void>((done) => sftp.writeFile(scriptPath, script, { mode: 0o755 }, done));
    const stats = await sftpCall<{ size: number }>((done) => sftp.stat(scriptPath, done));
    if (stats.size !== Buffer.byteLength(script))
      throw new Error(`uploaded ${stats.size} bytes of ${scriptPath}`);
    const out = await run(
      client,
      `sbatch --parsable --job-name=${quote(name)} --chdir=${quote(runDir)} ` +
        `--output=${quote(`${runDir}/${name}.out`)} --ntasks=1 --cpus-per-task=1 ${extra} ${quote(scriptPath)}`,
    );
    // sbatch(1) --parsable: "Outputs only the job id number and the cluster name if present" (id;cluster).
    if (!/^\d+(;[\w-]+)?$/.test(out)) throw new Error(`sbatch --parsable printed ${JSON.stringify(out)}`);
    const jobId = out.split(";")[0]!;
    submitted.push(jobId);
    return jobId;
  }

  const squeueState = (jobId: string) =>
    exec(client, `squeue -h -j ${jobId} -o %T`).then((r) => r.stdout.trim());

  async function accounting(jobId: string): Promise<AccountingRow | undefined> {
    const out = await run(
      client,
      `sacct -n -P -X -j ${jobId} -o JobID,JobName,State,ExitCode,ElapsedRaw,AllocCPUS`,
    );
    const line = out.split("\n").find((row) => row.startsWith(`${jobId}|`));
    if (!line) return undefined;
    const [id, jobName, state, exitCode, elapsed, cpus] = line.split("|");
    return {
      jobId: id!,
      jobName: jobName!,
      state: state!,
      exitCode: exitCode!,
      elapsedRawS: Number(elapsed),
      allocCpus: Number(cpus),
    };
  }

  // For a job that starts and ends within seconds, slurmctld sends its start record to slurmdbd only on its
  // next periodic pass (measured here: up to ~5 s later). Until then sacct shows the final State and ExitCode
  // but the placeholder JobName "allocation". Wait for the full record.
  const finalRow = (jobId: string, settled: (row: AccountingRow) => boolean = () => true) =>
    waitFor(
      `the final sacct record of job ${jobId}`,
      () => accounting(jobId),
      (row) =>
        row !== undefined && FINAL_STATES.test(row.state) && row.jobName !== "allocation" && settled(row),
    ) as Promise<AccountingRow>;

  it("refuses a server whose host key is not the pinned one", async ({ expect }) => {
    const other = `ssh-ed25519 ${Buffer.concat([
      Buffer.from([0, 0, 0, 11]),
      Buffer.from("ssh-ed25519"),
      Buffer.from([0, 0, 0, 32]),
      randomBytes(32),
    ]).toString("base64")}`;
    // ssh2 ends the handshake with this message when hostVerifier answers false (ssh2 lib/protocol/kex.js).
    await expect(connect(env, other)).rejects.toThrow("Host denied (verification failed)");
    // The pinned key itself is accepted (beforeAll connected with it) and the session works.
    expect(await run(client, "id -un")).toBe(env.ENGINE_SSH_USER);
  });

  it("runs an uploaded script to COMPLETED, found by its token while queued, with accounting", async ({
    expect,
  }) => {
    const name = `sf-${token}`;
    const startedAtMs = Date.now();
    // The job holds until we release it, so squeue is sure to see it alive (bounded: gives up after 60 s).
    const jobId = await submit(
      name,
      [
        'echo "job $SLURM_JOB_ID name $SLURM_JOB_NAME"',
        "for i in $(seq 600); do [ -e release ] && break; sleep 0.1; done",
        "echo released",
      ].join("\n"),
    );

    // squeue(1) JOB STATE CODES: a job that has not ended is PENDING, RUNNING or CONFIGURING.
    expect(await squeueState(jobId)).toMatch(/^(PENDING|CONFIGURING|RUNNING)$/);
    // The worker's guard against a double submit: the token names exactly this job.
    expect(await run(client, `squeue -h --name=${quote(name)} -o %i`)).toBe(jobId);
    await waitFor(
      "the job to run",
      () => squeueState(jobId),
      (state) => state === "RUNNING",
    );

    await sftpCall<void>((done) => sftp.writeFile(path.posix.join(runDir, "release"), "", done));
    const outputPath = path.posix.join(runDir, `${name}.out`);
    const output = await waitFor(
      "the job's output to say released",
      () => exec(client, `cat ${quote(outputPath)}`).then((r) => r.stdout),
      (text) => text.includes("released"),
    );
    // sbatch(1) OUTPUT ENVIRONMENT VARIABLES: SLURM_JOB_ID and SLURM_JOB_NAME as submitted.
    expect(output).toBe(`job ${jobId} name ${name}\nreleased\n`);

    const row = await finalRow(jobId);
    const wallS = (Date.now() - startedAtMs) / 1000;
    expect(row).toMatchObject({ jobId, jobName: name, state: "COMPLETED", exitCode: "0:0", allocCpus: 1 });
    // ElapsedRaw is whole seconds between start and end; it cannot exceed what we waited (+1 s rounding).
    expect(row.elapsedRawS).toBeGreaterThanOrEqual(0);
    expect(row.elapsedRawS).toBeLessThanOrEqual(Math.ceil(wallS) + 1);
    expect(await squeueState(jobId)).toMatch(/^(|COMPLETED|COMPLETING)$/);
  });

  it("reports a script that exits 3 as FAILED with exit code 3:0", async ({ expect }) => {
    const jobId = await submit(`sf-${token}-fail`, "echo about to fail\nexit 3");
    // Seen here: sacct may show FAILED with ExitCode 0:0 for a moment before the batch step's code arrives.
    const row = await finalRow(jobId, (r) => r.exitCode !== "0:0");
    // sacct(1): ExitCode is "exit code:signal"; a non-zero exit of the batch script makes the job FAILED.
    expect(row).toMatchObject({ jobId, jobName: `sf-${token}-fail`, state: "FAILED", exitCode: "3:0" });
    const output = await run(client, `cat ${quote(`${runDir}/sf-${token}-fail.out`)}`);
    expect(output).toBe("about to fail");
  });

  it("ends a cancelled sleeping job as CANCELLED, by the submitting user", async ({ expect }) => {
    const jobId = await submit(`sf-${token}-sleep`, "sleep 300");
    await waitFor(
      "the sleeping job to run",
      () => squeueState(jobId),
      (state) => state === "RUNNING",
    );
    await run(client, `scancel ${jobId}`);
    const row = await finalRow(jobId);
    const uid = await run(client, "id -u");
    // sacct(1) State: "CANCELLED by <uid>" names who cancelled it.
    expect(row.state).toBe(`CANCELLED by ${uid}`);
    expect(row.jobName).toBe(`sf-${token}-sleep`);
    await waitFor(
      "the cancelled job to leave squeue",
      () => squeueState(jobId),
      (state) => !/RUNNING|PENDING/.test(state),
    );
  });

  it("finds a queued job by its token name and nothing for an unknown one", async ({ expect }) => {
    const name = `sf-${token}-held`;
    // Held jobs stay PENDING without using the node (sbatch(1) --hold).
    const jobId = await submit(name, "echo never", "--hold");
    expect(await run(client, `squeue -h --name=${quote(name)} -o ${quote("%i|%T|%r")}`)).toBe(
      `${jobId}|PENDING|JobHeldUser`,
    );
    expect(await run(client, `squeue -h --name=${quote(`sf-${randomBytes(6).toString("hex")}`)} -o %i`)).toBe(
      "",
    );
    await run(client, `scancel ${jobId}`);
    const row = await finalRow(jobId);
    expect(row.state).toMatch(/^CANCELLED/);
  });
});
