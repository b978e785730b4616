/**
 * Pure parts of the worker's transport layer, checked against outside references where there are any:
 * quoting against a real /bin/sh, fingerprints against OpenSSH's ssh-keygen, sha256sum parsing against
 * coreutils' own output, Slurm state names and "N:M" exit codes against the squeue/sacct man pages
 * (JOB STATE CODES), UTF-8 sequence lengths against RFC 3629 §3. Exact comparisons throughout.
 */
import { execFileSync, spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { fingerprintOf, parsePublicKeyLine } from "../../server/crypto/ssh-public-keys";
import { completeUtf8Length, consumableLength } from "../../worker/logs/tail";
import { directStatusOf } from "../../worker/schedulers/direct";
import {
  mapSlurmState,
  parseExitCode,
  parseSacct,
  parseSacctAccounting,
  parseSqueue,
} from "../../worker/schedulers/slurm";
import {
  AuthenticationError,
  classifySshError,
  HostKeyMismatchError,
  RemotePathError,
  TransportError,
} from "../../worker/ssh/errors";
import { commandLine, shellQuote } from "../../worker/ssh/quote";
import { assertInside, normaliseBaseDir, parseSha256sum } from "../../worker/ssh/remote-fs";
import { chargeFor, wallTimeLimitMessage } from "../../worker/steps/collect";
import { testKeyPair } from "./support/keys";

const scratch = mkdtempSync(path.join(tmpdir(), "sigmaflow-transport-units-"));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

describe("shell quoting", () => {
  it("round-trips awkward arguments through /bin/sh unchanged", () => {
    const argv = [
      "printf",
      "%s\\0",
      "it's",
      "$HOME",
      "`id`",
      "a b",
      "",
      "é ü",
      "*",
      "new\nline",
      "-n",
      "x=1",
      "'",
    ];
    const result = spawnSync("/bin/sh", ["-c", commandLine(argv)], { cwd: scratch });
    expect(result.status).toBe(0);
    expect(result.stdout.toString("utf8").split("\0").slice(0, -1)).toEqual(argv.slice(2));
  });

  it("leaves plain words readable and quotes the rest", () => {
    expect(shellQuote("runs/r-1.txt")).toBe("runs/r-1.txt");
    expect(shellQuote("")).toBe("''");
    expect(shellQuote("a=b")).toBe("'a=b'");
    expect(shellQuote("it's")).toBe(`'it'\\''s'`);
  });

  it("refuses a NUL byte, which no argv entry can carry", () => {
    expect(() => shellQuote("a\0b")).toThrow(/NUL/);
  });
});

describe("host keys", () => {
  it("prints the fingerprint ssh-keygen -l prints", () => {
    const pair = testKeyPair("fingerprint-check");
    const file = path.join(scratch, "key.pub");
    writeFileSync(file, `${pair.public}\n`);
    // ssh-keygen -l -f: "<bits> SHA256:<base64> <comment> (ED25519)".
    const printed = execFileSync("ssh-keygen", ["-l", "-f", file], { encoding: "utf8" }).split(" ")[1];
    expect(fingerprintOf(pair.public)).toBe(printed);
  });

  it("refuses a key line whose type does not match its key", () => {
    const pair = testKeyPair();
    const blob = pair.public.split(" ")[1]!;
    expect(() => parsePublicKeyLine(`ssh-rsa ${blob}`)).toThrow(/ssh-ed25519/);
    expect(() => parsePublicKeyLine("not a key")).toThrow();
  });
});

describe("error classification", () => {
  const withFields = (message: string, fields: Record<string, string>) =>
    Object.assign(new Error(message), fields);
  it.each([
    [
      withFields("connect ECONNREFUSED 127.0.0.1:1", { code: "ECONNREFUSED", level: "client-socket" }),
      "refused",
    ],
    [withFields("read ECONNRESET", { code: "ECONNRESET" }), "reset"],
    [withFields("Timed out while waiting for handshake", { level: "client-timeout" }), "timeout"],
    [withFields("Keepalive timeout", { level: "client-timeout" }), "keepalive"],
    [new Error("(SSH) Channel open failure: open failed"), "channel"],
    [withFields("Handshake failed: no matching cipher", { level: "handshake" }), "handshake"],
    [new Error("No response from server"), "closed"],
  ])("%s is a retryable TransportError (%s)", (error, failure) => {
    const classified = classifySshError(error);
    expect(classified).toBeInstanceOf(TransportError);
    expect((classified as TransportError).failure).toBe(failure);
    expect(classified.retryable).toBe(true);
  });

  it("makes a refused login an AuthenticationError and passes classified errors through", () => {
    const refused = withFields("All configured authentication methods failed", {
      level: "client-authentication",
    });
    expect(classifySshError(refused)).toBeInstanceOf(AuthenticationError);
    expect(classifySshError(refused).retryable).toBe(false);
    const mismatch = new HostKeyMismatchError("SHA256:a", "SHA256:b");
    expect(classifySshError(mismatch)).toBe(mismatch);
  });
});

describe("run-folder paths", () => {
  it("accepts generated names and joins them to the run folder", () => {
    expect(assertInside("runs/r1", "stage-1/inputs/target.json")).toBe("runs/r1/stage-1/inputs/target.json");
    expect(assertInside("/scratch/sf/r1", "job.sh")).toBe("/scratch/sf/r1/job.sh");
  });

  it.each([
    "..",
    "../x",
    "a/../b",
    "/abs",
    "a//b",
    "./a",
    "a/.",
    ".env",
    "-rf",
    "sp ace",
    "semi;colon",
    "",
    "a\0b",
  ])("refuses %j", (bad) => {
    expect(() => assertInside("runs/r1", bad)).toThrow(RemotePathError);
  });

  it("normalises a base folder and refuses one that climbs or is the root", () => {
    expect(normaliseBaseDir("runs/")).toBe("runs");
    expect(normaliseBaseDir("/scratch//sf/")).toBe("/scratch/sf");
    for (const bad of ["/", ".", "", "a/../b", "x\0"])
      expect(() => normaliseBaseDir(bad)).toThrow(RemotePathError);
  });

  it("parses sha256sum's own output, text and binary mode", () => {
    const a = path.join(scratch, "a.txt");
    const b = path.join(scratch, "b.txt");
    writeFileSync(a, "abc");
    writeFileSync(b, "");
    const text = execFileSync("sha256sum", ["--", a, b], { encoding: "utf8" });
    const binary = execFileSync("sha256sum", ["-b", "--", a], { encoding: "utf8" });
    // FIPS 180-2 Appendix B.1 ("abc") and the SHA-256 of the empty message.
    expect(parseSha256sum(text)).toEqual([
      "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad",
      "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855",
    ]);
    expect(parseSha256sum(binary)).toEqual([
      "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad",
    ]);
    expect(() => parseSha256sum("sha256sum: x: No such file or directory\n")).toThrow();
  });
});

describe("Slurm parsing", () => {
  it.each([
    ["PENDING", "pending"],
    ["CONFIGURING", "pending"],
    ["RUNNING", "running"],
    ["COMPLETING", "running"],
    ["COMPLETED", "completed"],
    ["FAILED", "failed"],
    ["TIMEOUT", "failed"],
    ["NODE_FAIL", "failed"],
    ["OUT_OF_MEMORY", "failed"],
    ["CANCELLED", "cancelled"],
    ["CANCELLED by 1001", "cancelled"],
    ["SOMETHING_NEW", "unknown"],
  ])("maps %s to %s", (slurm, ours) => {
    expect(mapSlurmState(slurm)).toBe(ours);
  });

  it("reads ExitCode N:M as the status, or 128 + the signal when a signal ended the job", () => {
    expect(parseExitCode("0:0")).toBe(0);
    expect(parseExitCode("3:0")).toBe(3);
    // Seen on the test cluster for a script killed by SIGTERM (15): "0:15"; a shell would report 143.
    expect(parseExitCode("0:15")).toBe(143);
    expect(parseExitCode("")).toBeNull();
  });

  it("parses squeue and sacct lines with epoch times (SLURM_TIME_FORMAT=%s)", () => {
    const squeue = parseSqueue("12|RUNNING|1700000000\n13|PENDING|1700000500\n");
    expect(squeue.get("12")).toEqual({ state: "running", startedAt: new Date(1_700_000_000_000) });
    expect(squeue.get("13")).toEqual({ state: "pending", startedAt: undefined });
    const sacct = parseSacct("14|FAILED|7:0|1700000000|1700000060\n15|RUNNING|0:0|1700000000|Unknown\n");
    expect(sacct.get("14")).toEqual({
      state: "failed",
      exitCode: 7,
      startedAt: new Date(1_700_000_000_000),
      endedAt: new Date(1_700_000_060_000),
    });
    expect(sacct.get("15")).toEqual({
      state: "running",
      exitCode: null,
      startedAt: new Date(1_700_000_000_000),
      endedAt: undefined,
    });
  });
});

// Regression: a run stopped at its wall-time limit must say so and be charged at most its reservation,
// on `direct` hosts as on Slurm (TIMEOUT in the squeue/sacct man pages, JOB STATE CODES).
describe("wall-time limits", () => {
  it("marks a Slurm TIMEOUT as timed out, in states and in accounting", () => {
    const sacct = parseSacct("21|TIMEOUT|0:15|1700000000|1700000065\n22|FAILED|1:0|1700000000|1700000005\n");
    expect(sacct.get("21")).toMatchObject({ state: "failed", exitCode: 143, timedOut: true });
    expect(sacct.get("22")?.timedOut).toBeUndefined();
    expect(parseSacctAccounting("21|65|2|TIMEOUT\n", "21", 1)).toEqual({
      elapsedSeconds: 65,
      coreSeconds: 130,
      timedOut: true,
    });
    expect(parseSacctAccounting("22|5|2|FAILED\n", "22", 1)?.timedOut).toBe(false);
    // A requeued job's last row wins; no AllocCPUS falls back to the requested cores.
    expect(parseSacctAccounting("23|9|4|TIMEOUT\n23|7||COMPLETED\n", "23", 3)).toEqual({
      elapsedSeconds: 7,
      coreSeconds: 21,
      timedOut: false,
    });
  });

  it("reads a direct job stopped at its limit as failed and timed out, even with exit status 0", () => {
    const line = (text: string) => directStatusOf(text.split("|")).status;
    // index|pid|exit|alive|started|ended|cancelled|locked|timedout
    expect(line("0|42|143|0|1|2|0|1|1")).toMatchObject({ state: "failed", exitCode: 143, timedOut: true });
    expect(line("0|42|0|0|1|2|0|1|1")).toMatchObject({ state: "failed", exitCode: 0, timedOut: true });
    expect(line("0|42||0|1||0|1|1")).toMatchObject({ state: "failed", exitCode: null, timedOut: true });
    // Cancelled first: a cancel is what the person asked for, not a time-out.
    expect(line("0|42|143|0|1|2|1|1|1")).toMatchObject({ state: "cancelled", exitCode: 143 });
    expect(line("0|42|143|0|1|2|1|1|1").timedOut).toBeUndefined();
  });

  it("charges at most the reservation and states any use beyond it", () => {
    // 1 core × 1 min reserved = 60 core-seconds; 72.4 core-seconds measured.
    const over = chargeFor({ reservedCoreSeconds: 60 }, 72.4);
    expect(over.chargedCoreSeconds).toBe(60);
    expect(over.overCoreSeconds).toBe(12);
    // 72 / 3600 = 0.020, 12 / 3600 = 0.003, 60 / 3600 = 0.017 core-hours, three decimals.
    expect(over.notice).toBe(
      "It used 0.020 core-hours, 0.003 over its reservation of 0.017; it was charged the reservation",
    );
    expect(chargeFor({ reservedCoreSeconds: 60 }, 59.6)).toEqual({
      chargedCoreSeconds: 60,
      overCoreSeconds: 0,
      notice: "",
    });
    expect(chargeFor({ reservedCoreSeconds: 600 }, 42.2)).toMatchObject({
      chargedCoreSeconds: 42,
      overCoreSeconds: 0,
    });
    expect(wallTimeLimitMessage(1)).toBe("Stopped at its wall-time limit of 1 min");
  });
});

describe("direct scheduler status lines", () => {
  // index|pid|exit|alive|started|ended|cancelled|locked
  const line = (text: string) => directStatusOf(text.split("|")).status;
  it("prefers the exit file over the process table (an unreaped zombie still answers kill -0)", () => {
    expect(line("0|42|0|1|1700000000.5|1700000001.5|0|1")).toMatchObject({ state: "completed", exitCode: 0 });
    expect(line("0|42|9|0|1|2|0|1")).toMatchObject({ state: "failed", exitCode: 9 });
    expect(line("0|42|143|0|1|2|1|1")).toMatchObject({ state: "cancelled", exitCode: 143 });
  });

  it("tells running, starting, lost and never-submitted jobs apart", () => {
    expect(line("0|42||1|1700000000.25||0|1")).toEqual({
      state: "running",
      exitCode: null,
      startedAt: new Date(1_700_000_000_250),
      endedAt: undefined,
    });
    expect(line("0||||||0|1").state).toBe("pending");
    expect(line("0||||||0|0").state).toBe("unknown");
    expect(line("0|42||0|1||0|1")).toMatchObject({ state: "failed", exitCode: null });
    expect(line("0|42||0|1||1|1")).toMatchObject({ state: "cancelled", exitCode: null });
  });
});

describe("log chunks", () => {
  const bytes = (text: string) => new TextEncoder().encode(text);
  it("finds where the last complete UTF-8 character ends (RFC 3629 §3 sequence lengths)", () => {
    expect(completeUtf8Length(bytes("abc"))).toBe(3);
    expect(completeUtf8Length(bytes("aé").subarray(0, 2))).toBe(1);
    expect(completeUtf8Length(bytes("a€").subarray(0, 3))).toBe(1);
    expect(completeUtf8Length(bytes("a😀").subarray(0, 4))).toBe(1);
    expect(completeUtf8Length(bytes("a😀"))).toBe(5);
    expect(completeUtf8Length(Uint8Array.from([0x80, 0x80, 0x80, 0x80]))).toBe(4);
  });

  it("hands out whole lines, a full line-less chunk, or everything at the end", () => {
    expect(consumableLength(bytes("one\ntwo"), 100, false)).toBe(4);
    expect(consumableLength(bytes("no newline"), 100, false)).toBe(0);
    expect(consumableLength(bytes("no newline"), 10, false)).toBe(10);
    expect(consumableLength(bytes("one\ntwo"), 100, true)).toBe(7);
  });
});
