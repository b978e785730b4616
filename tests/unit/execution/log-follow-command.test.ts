/**
 * The remote side of a streamed log, run here with /bin/sh and the system's tail as a host runs it:
 * it starts at the stored offset, passes bytes through unchanged as they are appended, ends (and
 * leaves no tail behind) when its input ends, and reports a missing log with its own status.
 */
import { type ChildProcessWithoutNullStreams, spawn } from "node:child_process";
import { appendFile, mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { followCommand } from "../../../worker/logs/log-follower";

let dir: string;
beforeEach(async () => {
  dir = await mkdtemp(path.join(tmpdir(), "sigmaflow-follow-"));
});
afterEach(async () => {
  await rm(dir, { recursive: true, force: true });
});

function start(logPath: string, offsetBytes: number) {
  const [program, ...args] = followCommand(logPath, offsetBytes);
  const child = spawn(program!, args, { cwd: dir }) as ChildProcessWithoutNullStreams;
  const received: Buffer[] = [];
  child.stdout.on("data", (bytes: Buffer) => received.push(bytes));
  const exited = new Promise<number | null>((resolve) => child.on("close", (code) => resolve(code)));
  return { child, received: () => Buffer.concat(received), exited };
}

async function until(check: () => boolean, timeoutMs = 5000) {
  const started = Date.now();
  while (!check()) {
    if (Date.now() - started > timeoutMs) throw new Error("timed out");
    await new Promise((resolve) => setTimeout(resolve, 10));
  }
}

/** Processes whose command line names the log file: a tail left running would show here. */
async function tailsOf(logPath: string): Promise<number> {
  const { readdir } = await import("node:fs/promises");
  let count = 0;
  for (const entry of await readdir("/proc")) {
    if (!/^\d+$/.test(entry)) continue;
    const cmdline = await readFile(`/proc/${entry}/cmdline`, "utf8").catch(() => "");
    if (cmdline.startsWith("tail\0") && cmdline.includes(logPath)) count += 1;
  }
  return count;
}

describe("the log follow command", () => {
  it("streams from the offset on, byte for byte, and ends with its input", async () => {
    const logPath = path.join(dir, "run.log");
    // Invalid UTF-8, a split character, CR and ANSI colour pass through untouched.
    const head = Buffer.from("already stored\n");
    await writeFile(logPath, head);
    const follower = start(logPath, head.length);
    const appended = Buffer.concat([
      Buffer.from("line 1 \x1b[32mgreen\x1b[0m\r\n"),
      Buffer.from([0xff, 0xfe, 0x0a]),
      Buffer.from("😀".slice(0, 2)),
      Buffer.from("\n"),
    ]);
    await new Promise((resolve) => setTimeout(resolve, 100));
    await appendFile(logPath, appended.subarray(0, 10));
    await until(() => follower.received().length >= 10);
    await appendFile(logPath, appended.subarray(10));
    await until(() => follower.received().length >= appended.length);
    expect(follower.received().equals(appended)).toBe(true);
    expect(await tailsOf(logPath)).toBe(1);

    follower.child.stdin.end();
    expect(await follower.exited).not.toBeNull();
    await until(() => false, 200).catch(() => {});
    expect(await tailsOf(logPath)).toBe(0);
  });

  it("reports a log that is not there yet with status 3", async () => {
    const follower = start(path.join(dir, "missing.log"), 0);
    expect(await follower.exited).toBe(3);
  });

  it("takes a path with spaces and shell metacharacters as one argument", async () => {
    const logPath = path.join(dir, "a log; $(echo x) `y`.txt");
    await writeFile(logPath, "first\n");
    const follower = start(logPath, 0);
    await until(() => follower.received().toString() === "first\n");
    follower.child.stdin.end();
    await follower.exited;
  });
});
