/**
 * The live feed under a flood: one run whose job writes 20 000 numbered lines/s for 30 s (48-byte lines,
 * 960 kB/s, 28.8 MB in all), followed from before it starts by one socket.io client on /api/live (API
 * token, tests/integration/support/live-client.ts) that acknowledges every chunk and resumes when paused.
 * Checked: every chunk once, in order (sequence numbers 1..N, each starting where the last ended), every
 * numbered line once and in order, and the sha256 of the delivered bytes equal to the log file on the
 * host. Printed: lines/s delivered while the job wrote and overall, the largest backlog while it wrote,
 * the time from the job's last line to its delivery, CPU seconds of each process and peak memory (VmHWM)
 * of the server, the worker, the development host and this client (the job's own CPU is not counted: it
 * runs detached from the host process). The whole stack runs with production settings
 * (bench/engine/stack.ts: poll interval 2 s, fsync on); the host's limit of runs at once is 50, the
 * group's allocation 1 000 000 core-hours. WORKER_LOG_STREAMING=0 in the environment reaches the worker.
 *
 *   node --import tsx bench/live/flood.bench.ts [--lines-per-second=20000] [--seconds=30] [--line-bytes=48]
 *     [--fsync=off]
 *
 * Figures on this 2-core machine, shared with other test suites at the time (load 8–14), fsync on,
 * 20 000 lines/s × 30 s × 48 B:
 *
 * Before streaming (commit df687b7: the worker read running logs at the 2 s poll, 256 KiB per poll):
 *   all 600 000 lines once and in order, sha256 equal, 111 chunks, no pause; while the job wrote only
 *   2 489 lines/s arrived (256 KiB per 2 s ≈ 2 730 lines/s), the backlog grew to 519 865 lines (26 s of
 *   output); after the job ended the poller read the rest (16 MiB per poll) and the last line arrived
 *   10.1 s after the job wrote it; 14 977 lines/s overall. CPU s: PostgreSQL 4.1, server 1.6, worker
 *   2.8, host 1.4, client 2.1. Peak RSS (VmHWM): server 186 MiB, worker 198, host 109, client 212.
 * With streaming (commit 4f41943, and 9c076a0 in the server):
 *   all 600 000 lines once and in order, sha256 equal, 460 chunks, no pause; 19 901 lines/s arrived
 *   while the job wrote, largest backlog 25 902 lines (1.3 s of output), the last line arrived 0.20 s
 *   after the job wrote it. A second run: 512 chunks, 19 955 lines/s, backlog 1.1 s, last line 0.06 s
 *   (written → stored 0.04 s, stored → delivered 0.02 s). CPU s: PostgreSQL 3.9, server 2.3, worker 3.3, host 2.6 (+1.0 its
 *   commands), client 2.1. Peak RSS: server 204 MiB, worker 180, host 127, client 230.
 */
import { connectLive } from "../../tests/integration/support/live-client";
import { cpuReport, startEngineStack, waitUntilFinished } from "../engine/stack";
import {
  checkHostLog,
  DeliveryCheck,
  FEED_CODE,
  type FeedParameters,
  followRun,
  MemorySampler,
  stampMs,
} from "./feed-support";

const args = process.argv.slice(2);
const option = (name: string, fallback: number) =>
  Number(args.find((a) => a.startsWith(`--${name}=`))?.split("=")[1] ?? fallback);
const feed: FeedParameters = {
  linesPerSecond: option("lines-per-second", 20_000),
  seconds: option("seconds", 30),
  lineBytes: option("line-bytes", 48),
};
const durable = !args.includes("--fsync=off");
const expectedLines = Math.trunc(feed.linesPerSecond * feed.seconds);

console.log(
  `settings: server and worker defaults (poll 2 s${process.env.WORKER_LOG_STREAMING === "0" ? "; WORKER_LOG_STREAMING=0: running logs read only at the poll, 256 KiB each" : ""}), fsync ${durable ? "on" : "off"}, host limit 50 runs at once, allocation 1 000 000 core-hours; ` +
    `job ${feed.linesPerSecond} lines/s × ${feed.seconds} s × ${feed.lineBytes} B = ${((expectedLines * feed.lineBytes) / 1e6).toFixed(1)} MB`,
);
const stack = await startEngineStack({ durable, code: FEED_CODE, maxConcurrentRuns: 50 });
const socket = await connectLive(stack.baseUrl, { token: stack.token });
try {
  // Warm-up: connections, pools and the code's first run are in place before anything is measured.
  const warm = await stack.submit("warm-up", { linesPerSecond: 100, seconds: 1, lineBytes: feed.lineBytes });
  await waitUntilFinished(stack, [warm], 60_000);

  const memory = new MemorySampler({
    server: stack.server.pid!,
    worker: stack.workers[0]!.pid!,
    "development host": stack.fake.child.pid!,
    "benchmark client": process.pid,
  });
  const cpuBefore = stack.cpuSeconds();
  const runId = await stack.submit("flood", feed);
  const check = new DeliveryCheck(runId, true, true);
  await followRun(socket, runId, check);
  const states = await waitUntilFinished(stack, [runId], 10 * 60_000);
  if (states.done !== 1) throw new Error(`the run did not finish as done: ${JSON.stringify(states)}`);
  const host = checkHostLog(stack.hostPath(runId, "job.log"), expectedLines, feed.lineBytes);
  // The run is done once its whole log is stored; the feed may still be sending the last chunks.
  const deliveredBy = Date.now() + 60_000;
  while (check.report.bytes < host.bytes && Date.now() < deliveredBy)
    await new Promise((resolve) => setTimeout(resolve, 50));
  await new Promise((resolve) => setTimeout(resolve, 500));
  const cpuAfter = stack.cpuSeconds();
  const report = check.finish();
  const startedAt = stampMs(stack.hostPath(runId, "stage-1-main/started.at"));
  const endedAt = stampMs(stack.hostPath(runId, "stage-1-main/ended.at"));

  const timeline = report.timeline ?? [];
  const byEnd = timeline.filter(([at]) => at <= endedAt).at(-1)?.[1] ?? 0;
  let backlogLines = 0;
  for (const [at, lines] of timeline) {
    const written = Math.min(expectedLines, Math.max(0, ((at - startedAt) / 1000) * feed.linesPerSecond));
    backlogLines = Math.max(backlogLines, written - lines);
  }
  const faults = [...report.seqFaults, ...report.lineFaults];
  const complete =
    report.bytes === host.bytes &&
    report.sha256 === host.sha256 &&
    report.numberedLines === expectedLines &&
    faults.length === 0;
  console.log(
    `flood: ${report.numberedLines} of ${expectedLines} numbered lines delivered in ${report.chunks} chunks (${(report.bytes / 1e6).toFixed(1)} MB), ` +
      `${complete ? "every line once and in order, sha256 equal to the host's log" : `NOT COMPLETE: bytes ${report.bytes}/${host.bytes}, sha256 ${report.sha256 === host.sha256 ? "equal" : "differs"}, faults ${JSON.stringify(faults)}`}; ` +
      `paused ${report.pauses} time(s)`,
  );
  console.log(
    `delivered while the job wrote: ${byEnd} lines = ${(byEnd / ((endedAt - startedAt) / 1000)).toFixed(0)} lines/s (the job wrote ${feed.linesPerSecond}/s); ` +
      `overall ${(report.numberedLines / ((report.lastAtMs - startedAt) / 1000)).toFixed(0)} lines/s from the job's start to the last delivery; ` +
      `largest backlog while it wrote ${backlogLines.toFixed(0)} lines (${(backlogLines / feed.linesPerSecond).toFixed(1)} s of output); ` +
      `job's last line → delivered ${((report.lastAtMs - endedAt) / 1000).toFixed(2)} s (→ stored ${((report.lastStoredAtMs - endedAt) / 1000).toFixed(2)} s, stored → delivered ${((report.lastAtMs - report.lastStoredAtMs) / 1000).toFixed(2)} s)`,
  );
  console.log(`CPU: ${cpuReport(cpuBefore, cpuAfter)}`);
  console.log(`memory: ${memory.report()}`);
  if (!complete) process.exitCode = 1;
} finally {
  socket.close();
  await stack.stop();
}
