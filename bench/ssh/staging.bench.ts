/**
 * Staging throughput: 200 MiB (20 files × 10 MiB of random bytes) uploaded over SFTP with Sigmaflow's SSH
 * pool into the real OpenSSH server (the ENGINE_* variables of deploy/engines/start-engines.sh) and into
 * the development fake cluster (its own process, as a host would be), against OpenSSH's `scp` of the same
 * files to the same sshd. Rounds are interleaved so that load from other processes hits every variant
 * alike; medians are printed, and the pool/scp ratio (goal ≥ 0.8) both from the medians and round by round.
 * The pool sends 4 files at a time (as staging does); it is also timed one file at a time, like scp.
 *
 *   bash deploy/engines/start-engines.sh /tmp/sf-engines /tmp/sf-engines.env
 *   source /tmp/sf-engines.env && node --import tsx bench/ssh/staging.bench.ts [rounds]
 *
 * Loopback on a small machine is CPU-bound on both ends (encryption, sshd's sftp-server, our event loop):
 * compare ratios, not absolute MiB/s, across machines.
 */
import { type ChildProcess, execFileSync, spawn } from "node:child_process";
import { createHash, randomBytes } from "node:crypto";
import { createReadStream, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { testKeyPair } from "../../tests/integration/support/keys";
import { SshPool, type SshTarget } from "../../worker/ssh/pool";
import { prepareRunDir } from "../../worker/ssh/remote-fs";
import type { RemoteSession } from "../../worker/ssh/session";
import { freePort } from "../support/processes";

const FILE_COUNT = 20;
const FILE_BYTES = 10 * 1024 * 1024;
const TOTAL_MIB = (FILE_COUNT * FILE_BYTES) / (1024 * 1024);
/** Files in flight at once over the pool, as a stage step with several large inputs would send them. */
const PARALLEL_FILES = 4;
const rounds = Number(process.argv[2] ?? 3);

const env = process.env;
if (!env.ENGINE_SSH_HOST) {
  console.error(
    "ENGINE_SSH_HOST is not set. Start the engines and load their env file first:\n" +
      "  bash deploy/engines/start-engines.sh /tmp/sf-engines /tmp/sf-engines.env && source /tmp/sf-engines.env",
  );
  process.exit(2);
}

const work = mkdtempSync(path.join(tmpdir(), "sigmaflow-staging-bench-"));
const localDir = path.join(work, "files");
execFileSync("mkdir", ["-p", localDir]);
const localFiles = Array.from({ length: FILE_COUNT }, (_, index) => {
  const file = path.join(localDir, `input-${String(index).padStart(2, "0")}.bin`);
  writeFileSync(file, randomBytes(FILE_BYTES));
  return file;
});

async function sha256OfFile(file: string): Promise<string> {
  const hash = createHash("sha256");
  for await (const chunk of createReadStream(file)) hash.update(chunk as Buffer);
  return hash.digest("hex");
}
const localDigests = await Promise.all(localFiles.map(sha256OfFile));

/** The fake cluster in its own process, so its CPU is not our event loop's, like sshd. */
async function startFakeClusterProcess(): Promise<{ child: ChildProcess; target: SshTarget }> {
  const keys = testKeyPair();
  const authorizedKeys = path.join(work, "fake-authorized_keys");
  const hostKey = path.join(work, "fake-host_key");
  writeFileSync(authorizedKeys, `${keys.public}\n`);
  const port = await freePort();
  const child = spawn(process.execPath, ["--import", "tsx", "deploy/fake-cluster/index.ts"], {
    env: {
      ...env,
      FAKE_CLUSTER_PORT: String(port),
      FAKE_CLUSTER_ROOT: path.join(work, "fake-root"),
      FAKE_CLUSTER_HOST_KEY: hostKey,
      FAKE_CLUSTER_AUTHORIZED_KEYS: authorizedKeys,
    },
    stdio: ["ignore", "pipe", "inherit"],
  });
  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error("fake cluster did not start within 20 s")), 20_000);
    child.once("exit", (code) => reject(new Error(`fake cluster exited (${code})`)));
    child.stdout!.on("data", (data: Buffer) => {
      if (data.toString().includes("listening on")) {
        clearTimeout(timer);
        resolve();
      }
    });
  });
  const pinnedHostKey = readFileSync(`${hostKey}.pub`, "utf8").trim().split(" ").slice(0, 2).join(" ");
  return {
    child,
    target: {
      key: "bench:fake",
      address: "127.0.0.1",
      port,
      username: "sigmaflow",
      privateKey: keys.private,
      pinnedHostKey,
    },
  };
}

const engineTarget: SshTarget = {
  key: "bench:engines",
  address: env.ENGINE_SSH_HOST,
  port: Number(env.ENGINE_SSH_PORT),
  username: env.ENGINE_SSH_USER!,
  privateKey: readFileSync(env.ENGINE_SSH_KEY!, "utf8"),
  pinnedHostKey: env.ENGINE_SSH_HOST_KEY_PUB!,
};
const knownHosts = path.join(work, "known_hosts");
writeFileSync(knownHosts, `[${engineTarget.address}]:${engineTarget.port} ${engineTarget.pinnedHostKey}\n`);

async function poolUpload(
  session: RemoteSession,
  remoteDir: string,
  parallelFiles = PARALLEL_FILES,
): Promise<number> {
  let next = 0;
  const started = performance.now();
  await Promise.all(
    Array.from({ length: parallelFiles }, async () => {
      while (next < localFiles.length) {
        const index = next++;
        await session.putFile(localFiles[index]!, `${remoteDir}/${path.basename(localFiles[index]!)}`);
      }
    }),
  );
  return (performance.now() - started) / 1000;
}

async function verify(session: RemoteSession, remoteDir: string): Promise<void> {
  const output = await session.run([
    "sha256sum",
    "--",
    ...localFiles.map((file) => `${remoteDir}/${path.basename(file)}`),
  ]);
  const remote = output
    .trim()
    .split("\n")
    .map((line) => line.slice(0, 64));
  if (remote.join() !== localDigests.join())
    throw new Error(`uploaded files differ from the local ones in ${remoteDir}`);
}

function scpUpload(remoteDir: string, cipher?: string): number {
  const started = performance.now();
  execFileSync("scp", [
    "-q",
    "-B",
    ...(cipher ? ["-c", cipher] : []),
    "-i",
    env.ENGINE_SSH_KEY!,
    "-P",
    String(engineTarget.port),
    "-o",
    `UserKnownHostsFile=${knownHosts}`,
    "-o",
    "StrictHostKeyChecking=yes",
    ...localFiles,
    `${engineTarget.username}@${engineTarget.address}:${remoteDir}/`,
  ]);
  return (performance.now() - started) / 1000;
}

const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)]!;
const mibPerSecond = (seconds: number) => TOTAL_MIB / seconds;

const fake = await startFakeClusterProcess();
const pool = new SshPool();
try {
  const engine = pool.session(engineTarget);
  const fakeSession = pool.session(fake.target);
  const engineDir = await prepareRunDir(engine, env.ENGINE_REMOTE_BASE!, `staging-bench-${process.pid}`);
  const fakeDir = await prepareRunDir(fakeSession, "bench", `staging-${process.pid}`);
  // Connections and SFTP channels are opened before timing: staging reuses pooled connections.
  await Promise.all([engine.stat(engineDir), fakeSession.stat(fakeDir)]);

  const results = {
    poolSshd: [] as number[],
    poolSshdSerial: [] as number[],
    poolFake: [] as number[],
    scp: [] as number[],
    scpAesGcm: [] as number[],
  };
  const ratios: number[] = [];
  for (let round = 1; round <= rounds; round += 1) {
    const poolSeconds = await poolUpload(engine, engineDir);
    await verify(engine, engineDir);
    await engine.run(["sh", "-c", 'rm -f -- "$1"/*.bin', "sh", engineDir]);
    // One file at a time, like scp: the like-for-like comparison of the two SFTP clients.
    const serialSeconds = await poolUpload(engine, engineDir, 1);
    await engine.run(["sh", "-c", 'rm -f -- "$1"/*.bin', "sh", engineDir]);
    const scpSeconds = scpUpload(engineDir);
    await engine.run(["sh", "-c", 'rm -f -- "$1"/*.bin', "sh", engineDir]);
    const scpGcmSeconds = scpUpload(engineDir, "aes128-gcm@openssh.com");
    await engine.run(["sh", "-c", 'rm -f -- "$1"/*.bin', "sh", engineDir]);
    const fakeSeconds = await poolUpload(fakeSession, fakeDir);
    await verify(fakeSession, fakeDir);
    await fakeSession.run(["sh", "-c", 'rm -f -- "$1"/*.bin', "sh", fakeDir]);

    results.poolSshd.push(mibPerSecond(poolSeconds));
    results.poolSshdSerial.push(mibPerSecond(serialSeconds));
    results.scp.push(mibPerSecond(scpSeconds));
    results.scpAesGcm.push(mibPerSecond(scpGcmSeconds));
    results.poolFake.push(mibPerSecond(fakeSeconds));
    ratios.push(scpSeconds / poolSeconds);
    console.log(
      `round ${round}: pool→sshd ${mibPerSecond(poolSeconds).toFixed(1)} MiB/s (one file at a time ` +
        `${mibPerSecond(serialSeconds).toFixed(1)}), scp ${mibPerSecond(scpSeconds).toFixed(1)}, ` +
        `scp aes128-gcm ${mibPerSecond(scpGcmSeconds).toFixed(1)}, pool→fake cluster ${mibPerSecond(fakeSeconds).toFixed(1)}`,
    );
  }
  await engine.run(["rm", "-rf", "--", engineDir]);

  console.log(
    `\n${TOTAL_MIB} MiB (${FILE_COUNT} × ${FILE_BYTES / 1024 / 1024} MiB), ${rounds} rounds, medians:`,
  );
  console.log(
    `  pool SFTP → OpenSSH sshd     ${median(results.poolSshd).toFixed(1)} MiB/s (ssh2 negotiates aes128-gcm)`,
  );
  console.log(`  pool SFTP, one file at a time ${median(results.poolSshdSerial).toFixed(1)} MiB/s`);
  console.log(
    `  OpenSSH scp → sshd           ${median(results.scp).toFixed(1)} MiB/s (default cipher, chacha20-poly1305)`,
  );
  console.log(`  OpenSSH scp -c aes128-gcm    ${median(results.scpAesGcm).toFixed(1)} MiB/s`);
  console.log(`  pool SFTP → fake cluster     ${median(results.poolFake).toFixed(1)} MiB/s`);
  const ratio = median(results.poolSshd) / median(results.scp);
  console.log(
    `  ratio pool/scp: ${ratio.toFixed(2)} of medians, ${median(ratios).toFixed(2)} median per round ` +
      `(goal ≥ 0.8: ${ratio >= 0.8 ? "met" : "NOT met"}); vs scp aes128-gcm ${(median(results.poolSshd) / median(results.scpAesGcm)).toFixed(2)}`,
  );
  console.log(
    `  ratio one file at a time / scp: ${(median(results.poolSshdSerial) / median(results.scp)).toFixed(2)}`,
  );
} finally {
  await pool.close();
  fake.child.kill("SIGTERM");
  rmSync(work, { recursive: true, force: true });
}
