/**
 * The development cluster host (deploy/fake-cluster), started in-process on a free port and driven
 * the way Sigmaflow's worker drives a login node: ssh2's Client with a pinned host key, exec of
 * quoted commands, SFTP staging into a run folder. Debian's OpenSSH clients (ssh, sftp, scp) are
 * run against it too when installed, since the same worker code also talks to OpenSSH's sshd.
 *
 * Expected behaviour comes from: RFC 4252 (public-key authentication), RFC 4254 (sessions,
 * exit-status/exit-signal, channel open failure reason codes), draft-ietf-secsh-filexfer-02 (SFTP
 * v3 status codes: 1 EOF, 2 NO_SUCH_FILE, 3 PERMISSION_DENIED, 4 FAILURE), ssh-keygen(1) for the
 * fingerprint format, and OpenSSH's sshd/sftp-server behaviour (MaxSessions answered with
 * "administratively prohibited: open failed"; RENAME never replaces an existing file) — the last
 * two from memory of OpenSSH's sources. Comparisons are exact (bytes, codes, SHA-256 digests).
 */
import { spawn } from "node:child_process";
import { createHash, randomBytes } from "node:crypto";
import { existsSync } from "node:fs";
import {
  chmod,
  lstat,
  mkdir,
  mkdtemp,
  readdir,
  readFile,
  realpath,
  rm,
  stat,
  symlink,
  writeFile,
} from "node:fs/promises";
import { connect as tcpConnect } from "node:net";
import { tmpdir } from "node:os";
import path from "node:path";
import ssh2, { type ClientChannel, type ConnectConfig, type SFTPWrapper } from "ssh2";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { type FakeCluster, startFakeCluster } from "../../deploy/fake-cluster/server";
import { testKeyPair } from "./support/keys";
import { waitFor } from "./support/wait-for";

const USERNAME = "sigmaflow";
const MAX_SESSIONS = 4;
/** SFTP v3 status codes, draft-ietf-secsh-filexfer-02 §7. */
const NO_SUCH_FILE = 2;
const PERMISSION_DENIED = 3;
const FAILURE = 4;
const MIB = 1024 * 1024;
const HAS_OPENSSH = ["/usr/bin/ssh", "/usr/bin/sftp", "/usr/bin/scp"].every((binary) => existsSync(binary));

type ExecResult = { stdout: string; stderr: string; code: number | null; signal: string | undefined };

const sha256 = (data: Buffer) => createHash("sha256").update(data).digest("hex");
const blobOf = (publicKeyLine: string) => Buffer.from(publicKeyLine.split(" ")[1] ?? "", "base64");

function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

function call<T = void>(start: (callback: (error: Error | undefined | null, value?: T) => void) => void) {
  return new Promise<T>((resolve, reject) => {
    start((error, value) => (error ? reject(error) : resolve(value as T)));
  });
}

function execute(client: ssh2.Client, command: string, stdin?: string): Promise<ExecResult> {
  return new Promise((resolve, reject) => {
    client.exec(command, (error, stream) => {
      if (error) return reject(error);
      const result: ExecResult = { stdout: "", stderr: "", code: null, signal: undefined };
      stream.on("data", (chunk: Buffer) => {
        result.stdout += chunk.toString("utf8");
      });
      stream.stderr.on("data", (chunk: Buffer) => {
        result.stderr += chunk.toString("utf8");
      });
      stream.on("exit", (code: number | null, signal?: string) => {
        result.code = code;
        result.signal = signal;
      });
      stream.on("close", () => resolve(result));
      if (stdin !== undefined) stream.end(stdin);
    });
  });
}

function openExec(client: ssh2.Client, command: string): Promise<ClientChannel> {
  return call<ClientChannel>((callback) => client.exec(command, callback));
}

function runProcess(
  command: string,
  args: string[],
  input = "",
): Promise<{ code: number | null; out: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(command, args, { stdio: ["pipe", "pipe", "pipe"] });
    let out = "";
    child.stdout.on("data", (chunk: Buffer) => {
      out += chunk.toString("utf8");
    });
    child.stderr.on("data", (chunk: Buffer) => {
      out += chunk.toString("utf8");
    });
    child.on("error", reject);
    child.on("close", (code) => resolve({ code, out }));
    child.stdin.end(input);
  });
}

describe("fake cluster host", () => {
  let baseDir: string;
  let rootDir: string;
  let outsideDir: string;
  let hostKeyPath: string;
  let authorizedKeysPath: string;
  let cluster: FakeCluster;
  const clientKey = testKeyPair("sigmaflow-worker");
  const clients: ssh2.Client[] = [];

  function connect(overrides: Partial<ConnectConfig> = {}): Promise<ssh2.Client> {
    const hostBlob = blobOf(cluster.hostPublicKey);
    return new Promise((resolve, reject) => {
      const client = new ssh2.Client();
      clients.push(client);
      client.once("ready", () => resolve(client));
      client.once("error", reject);
      client.connect({
        host: "127.0.0.1",
        port: cluster.port,
        username: USERNAME,
        privateKey: clientKey.private,
        hostVerifier: (key: Buffer) => key.equals(hostBlob),
        readyTimeout: 10_000,
        ...overrides,
      });
    });
  }

  async function sftpSession(client?: ssh2.Client): Promise<SFTPWrapper> {
    const connection = client ?? (await connect());
    return call<SFTPWrapper>((callback) => connection.sftp(callback));
  }

  beforeAll(async () => {
    baseDir = await realpath(await mkdtemp(path.join(tmpdir(), "sigmaflow-fake-cluster-")));
    rootDir = path.join(baseDir, "home");
    outsideDir = path.join(baseDir, "outside");
    hostKeyPath = path.join(baseDir, "host", "ssh_host_ed25519_key");
    authorizedKeysPath = path.join(baseDir, "authorized_keys");
    await mkdir(outsideDir);
    await writeFile(path.join(outsideDir, "secret.txt"), "outside the sandbox\n");
    // A comment line and a leading option, both legal in sshd(8)'s authorized_keys format.
    await writeFile(authorizedKeysPath, `# Sigmaflow worker\nrestrict ${clientKey.public}\n`);
    cluster = await startFakeCluster({
      port: 0,
      rootDir,
      hostKeyPath,
      authorizedKeysPath,
      maxSessionsPerConnection: MAX_SESSIONS,
    });
  });

  afterAll(async () => {
    for (const client of clients) client.end();
    await cluster?.close();
    if (baseDir) await rm(baseDir, { recursive: true, force: true });
  });

  describe("host key", () => {
    it("generates an ed25519 host key, private to its owner, beside its .pub file", async () => {
      expect((await stat(hostKeyPath)).mode & 0o777).toBe(0o600);
      const parsed = ssh2.utils.parseKey(await readFile(hostKeyPath, "utf8"));
      if (parsed instanceof Error) throw parsed;
      expect(parsed.type).toBe("ssh-ed25519");
      expect(cluster.hostPublicKey).toMatch(/^ssh-ed25519 AAAA[0-9A-Za-z+/]+=*$/);
      expect(parsed.getPublicSSH().equals(blobOf(cluster.hostPublicKey))).toBe(true);
    });

    it.skipIf(!existsSync("/usr/bin/ssh-keygen"))(
      "reports the fingerprint ssh-keygen -l prints",
      async () => {
        // ssh-keygen(1): "<bits> SHA256:<unpadded base64> <comment> (<TYPE>)".
        const result = await runProcess("ssh-keygen", ["-l", "-E", "sha256", "-f", `${hostKeyPath}.pub`]);
        expect(result.code).toBe(0);
        expect(result.out.split(" ")[1]).toBe(cluster.hostKeyFingerprint);
      },
    );

    it("keeps the key across restarts, and close() ends connected clients", async () => {
      const second = await startFakeCluster({ port: 0, rootDir, hostKeyPath, authorizedKeysPath });
      expect(second.hostKeyFingerprint).toBe(cluster.hostKeyFingerprint);
      const client = await connect({ port: second.port });
      const closed = new Promise<void>((resolve) => client.once("close", () => resolve()));
      await second.close();
      await closed;
      await expect(connect({ port: second.port })).rejects.toThrow(/ECONNREFUSED/);
    });
  });

  describe("authentication", () => {
    it("accepts the pinned host key and is refused when the pinned key differs", async () => {
      await expect(connect()).resolves.toBeInstanceOf(ssh2.Client);
      const otherKey = blobOf(testKeyPair().public);
      await expect(connect({ hostVerifier: (key: Buffer) => key.equals(otherKey) })).rejects.toThrow(
        /verification failed/i,
      );
    });

    it("rejects an unauthorized key, another user name and passwords", async () => {
      const stranger = testKeyPair();
      await expect(connect({ privateKey: stranger.private })).rejects.toThrow(
        /authentication methods failed/,
      );
      await expect(connect({ username: "root" })).rejects.toThrow(/authentication methods failed/);
      await expect(connect({ privateKey: undefined, password: "sigmaflow" })).rejects.toThrow(
        /authentication methods failed/,
      );
    });

    it("reads authorized_keys again at each login, so a key added while running works", async () => {
      const newcomer = testKeyPair();
      await expect(connect({ privateKey: newcomer.private })).rejects.toThrow(
        /authentication methods failed/,
      );
      await writeFile(authorizedKeysPath, `${newcomer.public}\n`, { flag: "a" });
      await expect(connect({ privateKey: newcomer.private })).resolves.toBeInstanceOf(ssh2.Client);
    });
  });

  describe("exec", () => {
    let client: ssh2.Client;
    beforeAll(async () => {
      client = await connect();
    });

    it("runs a command and reports exit status 0", async () => {
      expect(await execute(client, "echo 'hello from the cluster'")).toEqual({
        stdout: "hello from the cluster\n",
        stderr: "",
        code: 0,
        signal: undefined,
      });
    });

    it("passes stderr and a failing exit status through", async () => {
      const result = await execute(client, "echo oops >&2; exit 3");
      expect(result.stderr).toBe("oops\n");
      expect(result.code).toBe(3);
    });

    it("reports a command killed by a signal as exit-signal (RFC 4254 §6.10)", async () => {
      const result = await execute(client, "kill -TERM $$");
      expect(result.code).toBeNull();
      expect(result.signal).toBe("SIGTERM");
    });

    it("runs in the sandbox root with the documented environment", async () => {
      const result = await execute(
        client,
        'pwd; printf "%s|%s|%s|%s\\n" "$HOME" "$LANG" "$SIGMAFLOW_FAKE_CLUSTER" "$USER"',
      );
      expect(result.stdout).toBe(`${rootDir}\n${rootDir}|C.UTF-8|1|${USERNAME}\n`);
    });

    it("pipes the channel into the command's stdin", async () => {
      expect((await execute(client, "tr a-z A-Z", "k-matrix\n")).stdout).toBe("K-MATRIX\n");
    });

    it("runs quoted worker-style commands against files in the sandbox", async () => {
      expect((await execute(client, "mkdir -p -- 'runs/abc'")).code).toBe(0);
      expect((await stat(path.join(rootDir, "runs", "abc"))).isDirectory()).toBe(true);
      await writeFile(path.join(rootDir, "runs", "abc", "input.txt"), "basis set cc-pVDZ\n");
      const result = await execute(
        client,
        "sha256sum -- 'runs/abc/input.txt'; tail -c +7 'runs/abc/input.txt'",
      );
      expect(result.stdout).toBe(
        `${sha256(Buffer.from("basis set cc-pVDZ\n"))}  runs/abc/input.txt\nset cc-pVDZ\n`,
      );
    });

    it("returns the pid of a nohup'd background job at once", async () => {
      const result = await execute(client, "sh -c 'nohup sleep 0.2 >/dev/null 2>&1 & echo $!'");
      expect(result.code).toBe(0);
      expect(result.stdout).toMatch(/^[1-9]\d*\n$/);
    });

    it("signals only the direct child when the client closes early; nohup'd jobs survive", async () => {
      const jobDir = path.join(rootDir, "runs", "detached");
      await mkdir(jobDir, { recursive: true });
      // The job waits for a release file, so the test decides when it may finish.
      const job = "while [ ! -f release ]; do sleep 0.05; done; echo survived > job.out";
      const channel = await openExec(
        client,
        `cd runs/detached && nohup sh -c '${job}' >/dev/null 2>&1 & echo $$; exec sleep 30`,
      );
      const directPid = await new Promise<number>((resolve) =>
        channel.once("data", (chunk: Buffer) => resolve(Number.parseInt(chunk.toString("utf8"), 10))),
      );
      expect(processAlive(directPid)).toBe(true);
      channel.close();
      await waitFor(
        "the direct child to be signalled",
        () => processAlive(directPid),
        (alive) => !alive,
      );
      await writeFile(path.join(jobDir, "release"), "");
      await waitFor("the detached job to finish", () => existsSync(path.join(jobDir, "job.out")), Boolean);
      expect(await readFile(path.join(jobDir, "job.out"), "utf8")).toBe("survived\n");
    });
  });

  describe("SFTP", () => {
    let sftp: SFTPWrapper;
    let localDir: string;
    beforeAll(async () => {
      sftp = await sftpSession();
      localDir = path.join(baseDir, "local");
      await mkdir(localDir);
      await call((callback) => sftp.mkdir("/staging", callback));
    });

    it("answers REALPATH '.' with the sandbox root '/'", async () => {
      expect(await call<string>((callback) => sftp.realpath(".", callback))).toBe("/");
      expect(await call<string>((callback) => sftp.realpath("staging/../staging/.", callback))).toBe(
        "/staging",
      );
    });

    it("round-trips a few MiB with fastPut/fastGet, byte for byte", async () => {
      const payload = randomBytes(3 * MIB + 12_345);
      const localPath = path.join(localDir, "input.bin");
      await writeFile(localPath, payload);
      await call((callback) => sftp.fastPut(localPath, "/staging/input.bin", callback));
      expect(sha256(await readFile(path.join(rootDir, "staging", "input.bin")))).toBe(sha256(payload));
      const backPath = path.join(localDir, "back.bin");
      await call((callback) => sftp.fastGet("/staging/input.bin", backPath, callback));
      expect(sha256(await readFile(backPath))).toBe(sha256(payload));
      const remoteSum = await execute(await connect(), "sha256sum -- 'staging/input.bin'");
      expect(remoteSum.stdout).toBe(`${sha256(payload)}  staging/input.bin\n`);
    });

    it("answers a READ at end of file with an EOF status, not empty data", async () => {
      await writeFile(path.join(rootDir, "staging", "short.txt"), "eigenphase\n");
      const lines: string[] = [];
      const client = await connect({ debug: (line: string) => lines.push(line) });
      const session = await sftpSession(client);
      const handle = await call<Buffer>((callback) => session.open("/staging/short.txt", "r", callback));
      const buffer = Buffer.alloc(64);
      const readAt = (position: number) =>
        new Promise<number>((resolve, reject) =>
          session.read(handle, buffer, 0, 64, position, (error, bytes) =>
            error ? reject(error) : resolve(bytes),
          ),
        );
      expect(await readAt(0)).toBe(11);
      expect(await readAt(11)).toBe(0);
      expect(lines).toContainEqual(expect.stringMatching(/Received STATUS \(id:\d+, 1, /));
      expect(lines).not.toContainEqual(expect.stringMatching(/Received DATA \(id:\d+, 0\)/));
    });

    it("lists, stats, renames and removes", async () => {
      await writeFile(path.join(rootDir, "staging", "a.txt"), "point group C2v\n");
      const names = (await call<{ filename: string }[]>((callback) => sftp.readdir("/staging", callback)))
        .map((entry) => entry.filename)
        .sort();
      expect(names).toEqual(["a.txt", "input.bin", "short.txt"]);

      const fileStats = await call<ssh2.Stats>((callback) => sftp.stat("/staging/a.txt", callback));
      expect(fileStats.isFile()).toBe(true);
      expect(fileStats.size).toBe(16);
      expect((await call<ssh2.Stats>((callback) => sftp.stat("/staging", callback))).isDirectory()).toBe(
        true,
      );

      await call((callback) => sftp.rename("/staging/a.txt", "/staging/b.txt", callback));
      expect(existsSync(path.join(rootDir, "staging", "a.txt"))).toBe(false);
      expect(await readFile(path.join(rootDir, "staging", "b.txt"), "utf8")).toBe("point group C2v\n");
      // Plain SFTP RENAME does not replace an existing file on OpenSSH; neither does this host.
      const clash = call((callback) => sftp.rename("/staging/b.txt", "/staging/short.txt", callback));
      await expect(clash).rejects.toMatchObject({ code: FAILURE });
      expect(await readFile(path.join(rootDir, "staging", "short.txt"), "utf8")).toBe("eigenphase\n");

      await call((callback) => sftp.unlink("/staging/b.txt", callback));
      const gone = call<ssh2.Stats>((callback) => sftp.stat("/staging/b.txt", callback));
      await expect(gone).rejects.toMatchObject({ code: NO_SUCH_FILE });
      await call((callback) => sftp.mkdir("/staging/empty", callback));
      await call((callback) => sftp.rmdir("/staging/empty", callback));
      expect(existsSync(path.join(rootDir, "staging", "empty"))).toBe(false);
    });

    it("honours append and exclusive-create flags and chmod", async () => {
      await call((callback) => sftp.writeFile("/staging/log.txt", "cross ", callback));
      await call((callback) => sftp.appendFile("/staging/log.txt", "section\n", callback));
      expect(await readFile(path.join(rootDir, "staging", "log.txt"), "utf8")).toBe("cross section\n");
      const exclusive = call<Buffer>((callback) => sftp.open("/staging/log.txt", "wx", callback));
      await expect(exclusive).rejects.toMatchObject({ code: FAILURE });
      await call((callback) => sftp.chmod("/staging/log.txt", 0o640, callback));
      expect((await stat(path.join(rootDir, "staging", "log.txt"))).mode & 0o777).toBe(0o640);
    });

    it("refuses to create symbolic links", async () => {
      const attempt = call((callback) => sftp.symlink("/staging/short.txt", "/staging/link", callback));
      await expect(attempt).rejects.toMatchObject({ code: PERMISSION_DENIED });
      expect(existsSync(path.join(rootDir, "staging", "link"))).toBe(false);
    });
  });

  describe("SFTP sandbox", () => {
    let sftp: SFTPWrapper;
    const put = (remotePath: string, text: string) =>
      call((callback) => sftp.writeFile(remotePath, text, callback));
    const get = (remotePath: string) => call<Buffer>((callback) => sftp.readFile(remotePath, callback));

    beforeAll(async () => {
      sftp = await sftpSession();
      await symlink(outsideDir, path.join(rootDir, "escape-dir"));
      await symlink(path.join(outsideDir, "secret.txt"), path.join(rootDir, "escape-file"));
      await symlink(path.join(outsideDir, "not-yet.txt"), path.join(rootDir, "escape-dangling"));
      await mkdir(path.join(rootDir, "inside"), { recursive: true });
      await writeFile(path.join(rootDir, "inside", "data.txt"), "rate coefficient\n");
      await symlink("inside", path.join(rootDir, "inside-link"));
    });

    it("keeps '..' at the root, as a chrooted SFTP server does", async () => {
      await put("../escape.txt", "1");
      await put("/../../escape2.txt", "2");
      expect(await readFile(path.join(rootDir, "escape.txt"), "utf8")).toBe("1");
      expect(await readFile(path.join(rootDir, "escape2.txt"), "utf8")).toBe("2");
      expect(existsSync(path.join(baseDir, "escape.txt"))).toBe(false);
    });

    it("maps absolute paths into the root, so host paths are not reachable", async () => {
      await expect(get("/etc/passwd")).rejects.toMatchObject({ code: NO_SUCH_FILE });
      await expect(put(path.join(outsideDir, "planted.txt"), "x")).rejects.toMatchObject({
        code: NO_SUCH_FILE,
      });
    });

    it("refuses every route through a symbolic link that points outside", async () => {
      await expect(put("/escape-dir/planted.txt", "x")).rejects.toMatchObject({ code: PERMISSION_DENIED });
      await expect(get("/escape-dir/secret.txt")).rejects.toMatchObject({ code: PERMISSION_DENIED });
      await expect(get("/escape-file")).rejects.toMatchObject({ code: PERMISSION_DENIED });
      await expect(put("/escape-file", "overwritten")).rejects.toMatchObject({ code: PERMISSION_DENIED });
      await expect(put("/escape-dangling", "created")).rejects.toMatchObject({ code: PERMISSION_DENIED });
      const listing = call<ssh2.FileEntryWithStats[]>((callback) => sftp.readdir("/escape-dir", callback));
      await expect(listing).rejects.toMatchObject({ code: PERMISSION_DENIED });
      const stats = call<ssh2.Stats>((callback) => sftp.stat("/escape-dir", callback));
      await expect(stats).rejects.toMatchObject({ code: PERMISSION_DENIED });
      const resolved = call<string>((callback) => sftp.realpath("/escape-dir/secret.txt", callback));
      await expect(resolved).rejects.toMatchObject({ code: PERMISSION_DENIED });
      const moved = call((callback) => sftp.rename("/escape2.txt", "/escape-dir/moved.txt", callback));
      await expect(moved).rejects.toMatchObject({ code: PERMISSION_DENIED });
      const made = call((callback) => sftp.mkdir("/escape-dir/newdir", callback));
      await expect(made).rejects.toMatchObject({ code: PERMISSION_DENIED });

      expect((await readdir(outsideDir)).sort()).toEqual(["secret.txt"]);
      expect(await readFile(path.join(outsideDir, "secret.txt"), "utf8")).toBe("outside the sandbox\n");
    });

    it("still shows the link itself (LSTAT) and follows links that stay inside", async () => {
      const linkStats = await call<ssh2.Stats>((callback) => sftp.lstat("/escape-dir", callback));
      expect(linkStats.isSymbolicLink()).toBe(true);
      expect((await get("/inside-link/data.txt")).toString("utf8")).toBe("rate coefficient\n");
      expect(await call<string>((callback) => sftp.realpath("/inside-link/data.txt", callback))).toBe(
        "/inside/data.txt",
      );
      expect(await call<string>((callback) => sftp.readlink("/inside-link", callback))).toBe("inside");
    });
  });

  describe("sessions per connection", () => {
    it(`refuses session ${MAX_SESSIONS + 1} with 'open failed'; the others keep working`, async () => {
      const client = await connect();
      const channels = await Promise.all(Array.from({ length: MAX_SESSIONS }, () => openExec(client, "cat")));
      // RFC 4254 §5.1: reason 1 is SSH_OPEN_ADMINISTRATIVELY_PROHIBITED.
      await expect(openExec(client, "echo extra")).rejects.toMatchObject({
        reason: 1,
        message: expect.stringMatching(/open failed/),
      });

      const echoes = channels.map(
        (channel, index) =>
          new Promise<string>((resolve) => {
            let text = "";
            channel.on("data", (chunk: Buffer) => {
              text += chunk.toString("utf8");
            });
            channel.on("close", () => resolve(text));
            channel.end(`channel ${index}\n`);
          }),
      );
      expect(await Promise.all(echoes)).toEqual(channels.map((_, index) => `channel ${index}\n`));
      // Closed sessions no longer count against the limit.
      expect((await execute(client, "echo again")).stdout).toBe("again\n");
    });
  });

  describe("misbehaving clients", () => {
    it("survives a client dropped mid-upload and a non-SSH peer", async () => {
      const dropped = await connect();
      const session = await sftpSession(dropped);
      const handle = await call<Buffer>((callback) => session.open("/dropped.bin", "w", callback));
      session.write(handle, randomBytes(64 * 1024), 0, 64 * 1024, 0, () => undefined);
      dropped.destroy();

      const peer = tcpConnect(cluster.port, "127.0.0.1");
      peer.on("error", () => undefined);
      // Reading is what lets "end" and then "close" arrive once the server hangs up.
      peer.resume();
      await new Promise((resolve) => peer.once("connect", resolve));
      peer.write("GET / HTTP/1.1\r\nHost: cluster\r\n\r\n");
      await new Promise((resolve) => peer.once("close", resolve));

      expect((await execute(await connect(), "echo still-here")).stdout).toBe("still-here\n");
    });
  });

  // Skipped, with this name in the report, where Debian's openssh-client is not installed.
  describe("Debian's OpenSSH clients (openssh-client)", () => {
    let keyPath: string;
    let options: string[];
    let workDir: string;

    beforeAll(async () => {
      if (!HAS_OPENSSH) return;
      workDir = path.join(baseDir, "openssh");
      await mkdir(workDir);
      keyPath = path.join(workDir, "id_ed25519");
      await writeFile(keyPath, clientKey.private, { mode: 0o600 });
      await chmod(keyPath, 0o600);
      // Pinned like the worker pins it: StrictHostKeyChecking=yes against this one known_hosts line.
      const knownHosts = path.join(workDir, "known_hosts");
      await writeFile(knownHosts, `[127.0.0.1]:${cluster.port} ${cluster.hostPublicKey}\n`);
      options = [
        "-i",
        keyPath,
        "-o",
        "IdentitiesOnly=yes",
        "-o",
        "BatchMode=yes",
        "-o",
        "StrictHostKeyChecking=yes",
        "-o",
        `UserKnownHostsFile=${knownHosts}`,
        "-o",
        "GlobalKnownHostsFile=/dev/null",
        "-o",
        "LogLevel=ERROR",
      ];
    });

    it.skipIf(!HAS_OPENSSH)("ssh runs a command and returns its exit status", async () => {
      const result = await runProcess("ssh", [
        ...options,
        "-p",
        String(cluster.port),
        `${USERNAME}@127.0.0.1`,
        "echo from-openssh; exit 7",
      ]);
      expect(result).toEqual({ code: 7, out: "from-openssh\n" });
    });

    it.skipIf(!HAS_OPENSSH)("sftp in batch mode uploads, lists, downloads, renames and removes", async () => {
      const payload = randomBytes(2 * MIB + 777);
      await writeFile(path.join(workDir, "upload.bin"), payload);
      const batch = [
        "mkdir /openssh",
        `put ${path.join(workDir, "upload.bin")} /openssh/data.bin`,
        "ls -l /openssh",
        `get /openssh/data.bin ${path.join(workDir, "download.bin")}`,
        "rename /openssh/data.bin /openssh/renamed.bin",
        "rm /openssh/renamed.bin",
        "rmdir /openssh",
      ].join("\n");
      const result = await runProcess(
        "sftp",
        ["-b", "-", "-P", String(cluster.port), ...options, `${USERNAME}@127.0.0.1`],
        `${batch}\n`,
      );
      expect(result.code, result.out).toBe(0);
      expect(result.out).toMatch(
        new RegExp(`-rw-\\S+\\s+1\\s+\\d+\\s+\\d+\\s+${payload.length} .* data\\.bin`),
      );
      expect(sha256(await readFile(path.join(workDir, "download.bin")))).toBe(sha256(payload));
      expect(existsSync(path.join(rootDir, "openssh"))).toBe(false);
    });

    it.skipIf(!HAS_OPENSSH)("scp over SFTP copies a 16 MiB file both ways intact and exits 0", async () => {
      // scp writes in place and truncates at the last write acknowledged in order; answers sent out
      // of order would cut the file short. 16 MiB gives many pipelined writes.
      const payload = randomBytes(16 * MIB);
      const localPath = path.join(workDir, "scp-up.bin");
      await writeFile(localPath, payload);
      const target = `${USERNAME}@127.0.0.1:/scp.bin`;
      const up = await runProcess("scp", ["-s", "-P", String(cluster.port), ...options, localPath, target]);
      expect(up.code, up.out).toBe(0);
      expect((await lstat(path.join(rootDir, "scp.bin"))).size).toBe(payload.length);
      expect(sha256(await readFile(path.join(rootDir, "scp.bin")))).toBe(sha256(payload));
      const backPath = path.join(workDir, "scp-down.bin");
      const down = await runProcess("scp", ["-s", "-P", String(cluster.port), ...options, target, backPath]);
      expect(down.code, down.out).toBe(0);
      expect(sha256(await readFile(backPath))).toBe(sha256(payload));
    });
  });
});
