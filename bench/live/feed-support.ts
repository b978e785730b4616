/**
 * What the live feed benchmarks share: the code whose job writes numbered lines at a steady rate, a check
 * of the log file the job left on the host, a streaming check of what one client received (nothing
 * retained, so a thousand clients fit in memory), and readings of a process's memory.
 */
import { createHash } from "node:crypto";
import { readFileSync } from "node:fs";
import type { Socket } from "socket.io-client";
import { LIVE_EVENTS, type LiveAck, type LiveLogChunk } from "../../shared/schemas/live";

/**
 * A code that writes `linesPerSecond` numbered lines of `lineBytes` bytes each for `seconds` seconds:
 * `line 000000001 ....\n`, numbered from 1. Debian's python3 paces itself against the clock and writes
 * every few milliseconds the lines due by then straight to its standard output (the job log), so the
 * log grows smoothly (a wake-up every 2–20 ms, fewer for slower rates). It records when it started and
 * when its last line was written in `started.at` and `ended.at` (the host shares this machine's clock). The script holds no braces, so the template engine leaves it alone.
 */
export const FEED_CODE = {
  name: "numbered-lines",
  version: "1.0",
  executable: "/usr/bin/python3",
  arguments: ["feed.py"],
  inputTemplates: [
    {
      fileName: "feed.py",
      format: "text",
      template: [
        "import os, time",
        "rate = {{ linesPerSecond }}",
        "total = int(rate * {{ seconds }})",
        "pad = b'.' * ({{ lineBytes }} - 16)",
        "step = max(0.002, min(0.02, 20.0 / rate))",
        "start = time.time()",
        "with open('started.at', 'w') as f:",
        "    f.write('%.6f' % start)",
        "written = 0",
        "while written < total:",
        "    due = min(total, int((time.time() - start) * rate) + 1)",
        "    if due > written:",
        "        data = b''.join(b'line %09d ' % i + pad + b'\\n' for i in range(written + 1, due + 1))",
        "        view = memoryview(data)",
        "        while len(view) > 0:",
        "            view = view[os.write(1, view):]",
        "        written = due",
        "    else:",
        "        time.sleep(step)",
        "with open('ended.at', 'w') as f:",
        "    f.write('%.6f' % time.time())",
        "",
      ].join("\n"),
    },
  ],
  parameters: {
    type: "object",
    properties: {
      linesPerSecond: { type: "integer", minimum: 1 },
      seconds: { type: "number", minimum: 0 },
      lineBytes: { type: "integer", minimum: 17, maximum: 4096 },
    },
    required: ["linesPerSecond", "seconds", "lineBytes"],
  },
};

export type FeedParameters = { linesPerSecond: number; seconds: number; lineBytes: number };

const sha256 = (bytes: Uint8Array) => createHash("sha256").update(bytes).digest("hex");

/**
 * Checks the log the job left on the host: lines `line 1..N` each once and in order (the wrapper's own
 * `[sigmaflow] …` lines between them), every numbered line `lineBytes` long. Returns its size and sha256,
 * which a client's received bytes must match.
 */
export function checkHostLog(file: string, expectedLines: number, lineBytes: number) {
  const bytes = readFileSync(file);
  const lines = bytes.toString("latin1").split("\n");
  if (lines.at(-1) === "") lines.pop();
  let next = 1;
  for (const line of lines) {
    if (line.startsWith("[sigmaflow]")) continue;
    const number = Number(line.slice(5, 14));
    if (!line.startsWith("line ") || number !== next || line.length !== lineBytes - 1)
      throw new Error(`host log ${file}: expected line ${next}, found ${JSON.stringify(line.slice(0, 40))}`);
    next += 1;
  }
  if (next - 1 !== expectedLines)
    throw new Error(`host log ${file}: ${next - 1} numbered lines, expected ${expectedLines}`);
  return { bytes: bytes.length, sha256: sha256(bytes), lines: lines.length };
}

/** A moment (ms since the epoch) the job recorded in `started.at` or `ended.at` of its stage folder. */
export function stampMs(file: string): number {
  return Number.parseFloat(readFileSync(file, "utf8")) * 1000;
}

export type DeliveryReport = {
  runId: string;
  chunks: number;
  bytes: number;
  sha256: string;
  numberedLines: number;
  /** Chunks that came with a sequence number other than the next one (gaps, repeats, disorder). */
  seqFaults: string[];
  /** Numbered lines out of order, repeated or missing (only when lines are checked). */
  lineFaults: string[];
  pauses: number;
  /** Joins the server refused before one was accepted (code: message). */
  joinRefusals: string[];
  /** When the accepted join was asked for and when the server acknowledged it (ms since the epoch). */
  joinAskedAtMs: number;
  joinedAtMs: number;
  /** [ms since the epoch, numbered lines so far] per chunk, when asked for. */
  timeline?: [number, number][];
  firstAtMs: number;
  lastAtMs: number;
  /** When the last chunk was stored (its `at`, the database's clock, which is this machine's). */
  lastStoredAtMs: number;
};

/**
 * One client's view of one run's feed, checked as chunks arrive: sequence numbers 1, 2, 3…, each chunk
 * starting at the byte offset where the previous one ended, a running sha256 of the bytes, and (when
 * `checkLines`) every numbered line the next number. Acknowledges each chunk, as the browser does.
 */
export class DeliveryCheck {
  private readonly hash = createHash("sha256");
  private nextSeq = 1;
  private nextOffset = 0;
  private nextLine = 1;
  private carry = "";
  readonly report: DeliveryReport;

  constructor(
    runId: string,
    private readonly checkLines: boolean,
    keepTimeline = false,
  ) {
    this.report = {
      runId,
      chunks: 0,
      bytes: 0,
      sha256: "",
      numberedLines: 0,
      seqFaults: [],
      lineFaults: [],
      pauses: 0,
      joinRefusals: [],
      joinAskedAtMs: 0,
      joinedAtMs: 0,
      ...(keepTimeline ? { timeline: [] } : {}),
      firstAtMs: 0,
      lastAtMs: 0,
      lastStoredAtMs: 0,
    };
  }

  /** The last sequence number taken (what a resume goes on from). */
  get lastSeq(): number {
    return this.nextSeq - 1;
  }

  receive(chunk: { seq: number; offsetBytes: number; data: Uint8Array | ArrayBuffer; at: string }): void {
    const now = Date.now();
    const data = Buffer.from(chunk.data as Uint8Array);
    const report = this.report;
    if (report.chunks === 0) report.firstAtMs = now;
    report.lastAtMs = now;
    report.lastStoredAtMs = Date.parse(chunk.at);
    if (chunk.seq !== this.nextSeq || chunk.offsetBytes !== this.nextOffset) {
      if (report.seqFaults.length < 10)
        report.seqFaults.push(
          `got seq ${chunk.seq} at offset ${chunk.offsetBytes}, expected seq ${this.nextSeq} at ${this.nextOffset}`,
        );
      // A repeat is not counted twice; anything else is taken as it comes.
      if (chunk.seq < this.nextSeq) return;
    }
    report.chunks += 1;
    report.bytes += data.length;
    this.nextSeq = chunk.seq + 1;
    this.nextOffset = chunk.offsetBytes + data.length;
    this.hash.update(data);
    if (this.checkLines) this.checkNumberedLines(data);
    else report.numberedLines += countNumberedLines(data);
    report.timeline?.push([now, report.numberedLines]);
  }

  private checkNumberedLines(data: Buffer): void {
    const text = this.carry + data.toString("latin1");
    const lines = text.split("\n");
    this.carry = lines.pop() ?? "";
    for (const line of lines) {
      if (!line.startsWith("line ")) continue;
      const number = Number(line.slice(5, 14));
      if (number !== this.nextLine && this.report.lineFaults.length < 10)
        this.report.lineFaults.push(`line ${number} where ${this.nextLine} was due`);
      this.nextLine = number + 1;
      this.report.numberedLines += 1;
    }
  }

  finish(): DeliveryReport {
    this.report.sha256 = this.hash.copy().digest("hex");
    return this.report;
  }
}

/** Numbered lines in a chunk: newlines preceded by a line that started with `line ` (the wrapper's are few). */
function countNumberedLines(data: Buffer): number {
  let count = 0;
  let start = 0;
  for (;;) {
    const end = data.indexOf(0x0a, start);
    if (end < 0) return count;
    if (data[start] === 0x6c /* l */ && end - start >= 5) count += 1;
    start = end + 1;
  }
}

/**
 * Joins `runId` on `socket` (an API-token connection, tests/integration/support/live-client.ts) and feeds
 * its chunks to `check`; a feed the server paused (the client fell more than its send budget behind) is
 * resumed from the last chunk held, as the browser does. Resolves once the join is acknowledged.
 */
export async function followRun(socket: Socket, runId: string, check: DeliveryCheck): Promise<void> {
  socket.on(LIVE_EVENTS.log, (chunk: LiveLogChunk, ack?: () => void) => {
    if (chunk.runId !== runId) return;
    check.receive(chunk);
    if (typeof ack === "function") ack();
  });
  socket.on(LIVE_EVENTS.paused, (event: { runId: string }) => {
    if (event.runId !== runId) return;
    check.report.pauses += 1;
    socket.emit(LIVE_EVENTS.resumeRun, { runId, afterSeq: check.lastSeq }, () => {});
  });
  for (let attempt = 1; ; attempt += 1) {
    check.report.joinAskedAtMs = Date.now();
    const ack = (await socket
      .timeout(30_000)
      .emitWithAck(LIVE_EVENTS.joinRun, { runId, afterSeq: check.lastSeq })) as LiveAck;
    if (ack.ok) {
      check.report.joinedAtMs = Date.now();
      return;
    }
    // The browser shows a refused join and stops; the benchmark counts it and asks again, to go on measuring.
    check.report.joinRefusals.push(`${ack.error.code}: ${ack.error.message}`);
    if (attempt >= JOIN_ATTEMPTS || !["internal_error", "too_many_requests"].includes(ack.error.code))
      throw new Error(`joining run ${runId}: ${ack.error.code} ${ack.error.message}`);
    await new Promise((resolve) => setTimeout(resolve, 1000));
  }
}

/** Joins tried per client when the server answers with a passing error (internal_error, too_many_requests). */
const JOIN_ATTEMPTS = 10;

/** Resident memory of a process now and at its peak (VmRSS and VmHWM of /proc/<pid>/status, proc(5)), in MiB. */
export function memoryMiB(pid: number): { rss: number; peak: number } {
  const status = readFileSync(`/proc/${pid}/status`, "utf8");
  const field = (name: string) =>
    Number(new RegExp(`^${name}:\\s+(\\d+) kB`, "m").exec(status)?.[1] ?? 0) / 1024;
  return { rss: field("VmRSS"), peak: field("VmHWM") };
}

/**
 * Samples the resident memory of named processes every `intervalMs`: the peak (the kernel's VmHWM, which
 * counts even a spike between samples) and the samples themselves, to tell growth from a plateau.
 */
export class MemorySampler {
  private readonly samples = new Map<string, { atMs: number; rss: number }[]>();
  private readonly timer: NodeJS.Timeout;
  private readonly startedAt = Date.now();

  constructor(
    private readonly pids: Record<string, number>,
    intervalMs = 500,
  ) {
    for (const name of Object.keys(pids)) this.samples.set(name, []);
    this.sample();
    this.timer = setInterval(() => this.sample(), intervalMs);
    this.timer.unref();
  }

  private sample() {
    for (const [name, pid] of Object.entries(this.pids)) {
      try {
        this.samples.get(name)!.push({ atMs: Date.now() - this.startedAt, rss: memoryMiB(pid).rss });
      } catch {}
    }
  }

  /** A process's peak resident memory so far (VmHWM), in MiB. */
  peakMiB(name: string): number {
    return memoryMiB(this.pids[name]!).peak;
  }

  /** "server RSS 120 → 180 MiB (samples: max 185, last 180), peak (VmHWM) 190 MiB; …" */
  report(): string {
    clearInterval(this.timer);
    this.sample();
    return Object.entries(this.pids)
      .map(([name, pid]) => {
        const list = this.samples.get(name)!;
        const first = list[0]?.rss ?? Number.NaN;
        const last = list.at(-1)?.rss ?? Number.NaN;
        const max = Math.max(...list.map((s) => s.rss));
        let peak = Number.NaN;
        try {
          peak = memoryMiB(pid).peak;
        } catch {}
        return `${name} RSS ${first.toFixed(0)} → ${last.toFixed(0)} MiB (max sampled ${max.toFixed(0)}), peak VmHWM ${peak.toFixed(0)} MiB`;
      })
      .join("; ");
  }
}
