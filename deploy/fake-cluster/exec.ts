/**
 * Runs one exec request the way OpenSSH's sshd does for a session without a terminal: the command
 * string goes to `/bin/sh -c` in the user's home (here the sandbox root), stdin/stdout/stderr are
 * pipes to the channel, and the exit status (or signal) is reported before the channel closes.
 *
 * Each command gets its own session (setsid, as sshd gives every session), so jobs it starts with
 * nohup/setsid outlive both the channel and this server; when the client closes the channel early
 * only the direct child is signalled, never its process group.
 */
import { spawn } from "node:child_process";
import { constants as osConstants } from "node:os";
import type { ServerChannel } from "ssh2";

export type ExecOptions = { rootDir: string; username: string; log: (message: string) => void };

/** What a shell reports for a command it could not start (POSIX "command not found" family). */
const CANNOT_START_STATUS = 127;

function commandEnv(options: ExecOptions): NodeJS.ProcessEnv {
  return {
    HOME: options.rootDir,
    PATH: process.env.PATH ?? "/usr/local/bin:/usr/bin:/bin",
    LANG: "C.UTF-8",
    USER: options.username,
    LOGNAME: options.username,
    SIGMAFLOW_FAKE_CLUSTER: "1",
  };
}

/**
 * Resolves once everything written so far has left the stream. An empty write is queued behind
 * the earlier ones, so its callback marks the point; a channel that closes meanwhile never calls
 * it back, hence the race with "close".
 */
function flushed(
  channel: ServerChannel,
  stream: NodeJS.WritableStream & { writable: boolean },
): Promise<void> {
  if (!stream.writable) return Promise.resolve();
  return new Promise((resolve) => {
    channel.once("close", resolve);
    stream.write(Buffer.alloc(0), () => {
      channel.off("close", resolve);
      resolve();
    });
  });
}

function sendExit(channel: ServerChannel, code: number | null, signal: NodeJS.Signals | null): void {
  if (!signal) {
    channel.exit(code ?? 0);
    return;
  }
  try {
    channel.exit(signal, false, "");
  } catch {
    // A signal the SSH protocol has no name for: report it as a shell does, 128 + its number.
    channel.exit(128 + (osConstants.signals[signal] ?? 0));
  }
}

export function runCommand(channel: ServerChannel, command: string, options: ExecOptions): void {
  const child = spawn("/bin/sh", ["-c", command], {
    cwd: options.rootDir,
    env: commandEnv(options),
    stdio: ["pipe", "pipe", "pipe"],
    detached: true,
  });
  let running = true;
  let reported = false;

  const finish = async (report: () => void) => {
    if (reported) return;
    reported = true;
    await Promise.all([flushed(channel, channel), flushed(channel, channel.stderr)]);
    report();
    if (!channel.writableEnded) channel.end();
  };

  channel.on("error", (error: Error) => options.log(`exec channel: ${error.message}`));
  channel.stderr.on("error", (error: Error) => options.log(`exec stderr: ${error.message}`));
  child.stdin.on("error", () => {
    // EPIPE: the command exited without reading all its input; sshd drops the rest too.
  });
  channel.pipe(child.stdin);
  child.stdout.pipe(channel, { end: false });
  child.stderr.pipe(channel.stderr, { end: false });

  child.on("error", (error) => {
    running = false;
    options.log(`exec: could not start /bin/sh: ${error.message}`);
    channel.stderr.write(`fake-cluster: cannot run command: ${error.message}\n`);
    void finish(() => channel.exit(CANNOT_START_STATUS));
  });
  child.on("exit", () => {
    running = false;
  });
  // "close" also waits for stdout and stderr to reach EOF, so all output is in the channel first.
  child.on("close", (code, signal) => void finish(() => sendExit(channel, code, signal)));

  channel.on("close", () => {
    channel.unpipe(child.stdin);
    // Like sshd closing its ends of the pipes: a background job still holding them gets EPIPE
    // instead of blocking on a pipe nobody drains.
    child.stdin.destroy();
    child.stdout.destroy();
    child.stderr.destroy();
    if (!running || child.pid === undefined) return;
    try {
      process.kill(child.pid, "SIGTERM");
    } catch {
      // Exited between the check and the signal.
    }
  });
}
