/**
 * The live feed's fan-out: 50 runs whose jobs each write 1 000 numbered lines/s for 30 s (48-byte
 * lines, 1.44 MB per run), each followed by 20 socket.io clients on /api/live (API token), 1 000
 * connections in all. The clients live in a few processes of their own (bench/live/feed-clients.ts,
 * 4 by default, each holding 250 connections spread over all runs), so one Node process's event loop
 * is not what limits them; each client checks what arrives as it arrives and acknowledges every chunk.
 * Checked: every client got its run's every chunk once and in order (sequence numbers 1..N, each
 * starting where the last ended) and bytes whose sha256 equals the log file on the host, which itself
 * holds lines 1..N once and in order. Printed: lines/s delivered to all clients, the time from each
 * job's last line to its delivery to each client, CPU seconds of each process, and peak memory (VmHWM)
 * of the server (Sigmaflow's goal: under 300 MB), the worker, the development host and the client
 * processes. The stack runs with production settings (bench/engine/stack.ts: poll interval 2 s, fsync
 * on); the host's limit of runs at once is 50, so all 50 run together; the group's allocation is
 * 1 000 000 core-hours. WORKER_LOG_STREAMING=0 in the environment reaches the worker. The connections
 * are opened before the runs are submitted and join right after; a join the server refuses is asked
 * again after 1 s (a browser would show the refusal) and counted.
 *
 *   node --import tsx bench/live/fanout.bench.ts [--runs=50] [--clients-per-run=20] [--client-processes=4]
 *     [--lines-per-second=1000] [--seconds=30] [--line-bytes=48] [--fsync=off]
 *
 * Figures on this 2-core machine, fsync on, 50 runs × 1 000 lines/s × 30 s, 20 clients each. The
 * machine was shared with other test suites; "quiet" means a load average of 1–3, "loaded" 8–14, and
 * the figures move with it. "Last line" is the job's last line → its delivery, per complete client that
 * joined before its job ended, split into written → stored (worker) and stored → delivered (server).
 *
 * Before (commit df687b7: running logs read at the 2 s poll; each socket's feed read the stored log
 * on its own), two loaded runs:
 *   594 and 689 of 1 000 clients got the whole log; the other 406 and 311 stopped part-way (what they
 *   got had no gap and no repeat, e.g. 262 125 of 1 440 123 bytes, then nothing for 120 s); 40 and 79
 *   clients had joins refused (143 and 178 internal_error). Server log: ~1 700 failed reads of the
 *   stored log, all "timeout exceeded when trying to connect". Server peak 324 and 293 MiB (goal
 *   < 300 MiB missed once). CPU s: PostgreSQL 28.2, server 31.3, worker 8.7, host 3.8, clients 21.8.
 *   Cause: 1 000 feeds each read every chunk through the server's pool of 10 connections (5 s wait for
 *   one); a failed read was not tried again, so a feed whose failed read came after its run's last
 *   notice never moved again, and a join whose queries waited over 5 s was refused.
 * After commit 9c076a0 (a run's feeds share one read; a failed read is tried again after 1 s), logs
 * read at the poll only (WORKER_LOG_STREAMING=0):
 *   quiet: 1 000 of 1 000 clients got every line, no refused join, 768 045 lines/s delivered; last
 *   line p50 1.51 s, p95 2.80 s, max 3.58 s (worker 1.37 / 2.77 s, server 0.17 / 0.53 s); joins p50
 *   0.31 s, p95 0.69 s. CPU s: PostgreSQL 8.9, server 8.2, worker 5.5, host 4.4 (+1.8 its commands),
 *   clients 14.2. Peak RSS: server 243 MiB (goal met), worker 196, host 115, client processes 172–220.
 *   loaded: 1 000 of 1 000, 2 refused joins; last line p50 8.86 s, p95 12.90 s; server peak 244 MiB.
 * With streaming (commit 4f41943) and 9c076a0:
 *   quiet: 1 000 of 1 000 clients got every line, no refused join, no error in the server's log;
 *   627 223 lines/s delivered; last line p50 1.75 s, p95 6.17 s, max 6.61 s (worker 1.30 / 5.06 s,
 *   server 0.46 / 1.40 s); joins p50 1.39 s, p95 4.20 s. CPU s: PostgreSQL 13.7, server 12.0, worker
 *   8.0, host 5.2 (+3.3), clients 19.9. Peak RSS: server 250 MiB (goal met), worker 229, host 110,
 *   client processes 180–200.
 *   loaded, three runs: 1 000 of 1 000 each; 0, 11 and 4 refused joins (pool waits over 5 s);
 *   12 chunks per run on average in the last (at most 2 connections × (8 − 3 spare) channels = 10
 *   logs stream at once, the others are read at the poll); last line p50 23.1 s, p95 31.3 s, of which
 *   the worker 22.3 / 27.6 s and the server 1.8 / 6.3 s; server peak 272, 249 and 235 MiB.
 */
import { type ChildProcess, fork } from "node:child_process";
import { fileURLToPath } from "node:url";
import { cpuReport, quantile, startEngineStack, waitUntilFinished } from "../engine/stack";
import { processCpuSeconds, stopChild } from "../support/processes";
import type {
  CollectMessage,
  ConnectedMessage,
  ConnectMessage,
  JoinedMessage,
  JoinMessage,
  ReportsMessage,
} from "./feed-clients";
import { checkHostLog, FEED_CODE, type FeedParameters, MemorySampler, stampMs } from "./feed-support";

const args = process.argv.slice(2);
const option = (name: string, fallback: number) =>
  Number(args.find((a) => a.startsWith(`--${name}=`))?.split("=")[1] ?? fallback);
const runCount = option("runs", 50);
const clientsPerRun = option("clients-per-run", 20);
const clientProcesses = option("client-processes", 4);
const feed: FeedParameters = {
  linesPerSecond: option("lines-per-second", 1000),
  seconds: option("seconds", 30),
  lineBytes: option("line-bytes", 48),
};
const durable = !args.includes("--fsync=off");
const expectedLines = Math.trunc(feed.linesPerSecond * feed.seconds);
const SERVER_PEAK_GOAL_MIB = 300;
const CONNECT_NOTE = "each client process asks 10 joins at once, as it opened its connections";

console.log(
  `settings: server and worker defaults (poll 2 s${process.env.WORKER_LOG_STREAMING === "0" ? "; WORKER_LOG_STREAMING=0: running logs read only at the poll, 256 KiB each" : ""}), fsync ${durable ? "on" : "off"}, host limit ${Math.max(50, runCount)} runs at once, allocation 1 000 000 core-hours; ` +
    `${runCount} runs × ${feed.linesPerSecond} lines/s × ${feed.seconds} s × ${feed.lineBytes} B; ` +
    `${clientsPerRun} clients per run = ${runCount * clientsPerRun} connections in ${clientProcesses} client processes`,
);
const stack = await startEngineStack({ durable, code: FEED_CODE, maxConcurrentRuns: Math.max(50, runCount) });
const clientScript = fileURLToPath(new URL("./feed-clients.ts", import.meta.url));
const children: ChildProcess[] = Array.from({ length: clientProcesses }, () =>
  fork(clientScript, [], { execArgv: ["--import", "tsx"], stdio: ["ignore", "inherit", "inherit", "ipc"] }),
);
const nextMessage = <T>(child: ChildProcess, type: string, timeoutMs: number) =>
  new Promise<T>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`no ${type} from a client process in time`)), timeoutMs);
    child.once("exit", (code) => reject(new Error(`a client process exited (${code})`)));
    const onMessage = (message: { type: string }) => {
      if (message.type !== type) return;
      clearTimeout(timer);
      child.off("message", onMessage);
      resolve(message as T);
    };
    child.on("message", onMessage);
  });

try {
  const warm = await stack.submit("warm-up", { linesPerSecond: 100, seconds: 1, lineBytes: feed.lineBytes });
  await waitUntilFinished(stack, [warm], 60_000);

  const memory = new MemorySampler({
    server: stack.server.pid!,
    worker: stack.workers[0]!.pid!,
    "development host": stack.fake.child.pid!,
    ...Object.fromEntries(children.map((child, i) => [`client process ${i + 1}`, child.pid!])),
  });
  const cpu = () => ({
    ...stack.cpuSeconds(),
    "client processes": children.reduce((sum, child) => sum + processCpuSeconds(child.pid!), 0),
  });
  // Client c of run r goes to process (r × clientsPerRun + c) mod P: every process follows every run.
  const perProcess = children.map((_, i) =>
    Array.from({ length: runCount * clientsPerRun }, (_, k) => k).filter((k) => k % clientProcesses === i),
  );
  const connectStarted = Date.now();
  const connected = children.map((child) => nextMessage<ConnectedMessage>(child, "connected", 600_000));
  children.forEach((child, i) => {
    child.send({
      type: "connect",
      baseUrl: stack.baseUrl,
      token: stack.token,
      count: perProcess[i]!.length,
    } satisfies ConnectMessage);
  });
  const connections = await Promise.all(connected);
  console.log(
    `  ${connections.reduce((sum, c) => sum + c.connections, 0)} connections open in ${((Date.now() - connectStarted) / 1000).toFixed(1)} s ` +
      `(${connections.reduce((sum, c) => sum + c.retries, 0)} handshakes tried again after a 10 s timeout)`,
  );

  const cpuBefore = cpu();
  const submittedAt = Date.now();
  const runIds = await Promise.all(
    Array.from({ length: runCount }, (_, i) => stack.submit(`fanout-${i}`, feed)),
  );
  const joined = children.map((child) => nextMessage<JoinedMessage>(child, "joined", 600_000));
  children.forEach((child, i) => {
    child.send({
      type: "join",
      runIds: perProcess[i]!.map((k) => runIds[Math.floor(k / clientsPerRun)]!),
    } satisfies JoinMessage);
  });
  await Promise.all(joined);
  console.log(
    `  all ${runCount * clientsPerRun} clients joined ${((Date.now() - submittedAt) / 1000).toFixed(1)} s after the first submission`,
  );
  const states = await waitUntilFinished(stack, runIds, 15 * 60_000, (s) =>
    console.log(`  … ${((Date.now() - submittedAt) / 1000).toFixed(0)} s: ${JSON.stringify(s)}`),
  );
  if (states.done !== runCount) throw new Error(`not every run finished as done: ${JSON.stringify(states)}`);
  const hostLogs = new Map(
    runIds.map((runId) => [
      runId,
      {
        ...checkHostLog(stack.hostPath(runId, "job.log"), expectedLines, feed.lineBytes),
        startedAt: stampMs(stack.hostPath(runId, "stage-1-main/started.at")),
        endedAt: stampMs(stack.hostPath(runId, "stage-1-main/ended.at")),
      },
    ]),
  );
  const collected = children.map((child) => nextMessage<ReportsMessage>(child, "reports", 180_000));
  for (const child of children)
    child.send({
      type: "collect",
      expectedBytes: Object.fromEntries([...hostLogs].map(([runId, log]) => [runId, log.bytes])),
      timeoutMs: 120_000,
    } satisfies CollectMessage);
  const answers = await Promise.all(collected);
  const cpuAfter = cpu();

  const reports = answers.flatMap((answer) => answer.reports);
  const incomplete = reports.filter((report) => {
    const log = hostLogs.get(report.runId)!;
    return (
      report.bytes !== log.bytes ||
      report.sha256 !== log.sha256 ||
      report.numberedLines !== expectedLines ||
      report.seqFaults.length > 0
    );
  });
  // The time to the last line means "live" only for clients that had joined before their job ended.
  const joinedEarly = reports.filter(
    (report) => report.joinedAtMs < hostLogs.get(report.runId)!.endedAt && !incomplete.includes(report),
  );
  const lagsS = joinedEarly
    .map((report) => (report.lastAtMs - hostLogs.get(report.runId)!.endedAt) / 1000)
    .sort((a, b) => a - b);
  // Of that time: the worker's part (the job's last line → its chunk stored) and the server's (stored → delivered).
  const storedS = joinedEarly
    .map((report) => (report.lastStoredAtMs - hostLogs.get(report.runId)!.endedAt) / 1000)
    .sort((a, b) => a - b);
  const serverS = joinedEarly
    .map((report) => (report.lastAtMs - report.lastStoredAtMs) / 1000)
    .sort((a, b) => a - b);
  const joinS = reports
    .map((report) => (report.joinedAtMs - report.joinAskedAtMs) / 1000)
    .sort((a, b) => a - b);
  const firstStart = Math.min(...[...hostLogs.values()].map((log) => log.startedAt));
  const lastDelivery = Math.max(...reports.map((report) => report.lastAtMs));
  const deliveredLines = reports.reduce((sum, report) => sum + report.numberedLines, 0);
  const lastEnd = Math.max(...[...hostLogs.values()].map((log) => log.endedAt));
  const chunksPerRun = reports.reduce((sum, report) => sum + report.chunks, 0) / reports.length;
  const pauses = reports.reduce((sum, report) => sum + report.pauses, 0);
  const disconnects = answers.reduce((sum, answer) => sum + answer.disconnects, 0);
  const clientErrors = answers.flatMap((answer) => answer.errors);
  const refusals = reports.flatMap((report) => report.joinRefusals);
  const refusedClients = reports.filter((report) => report.joinRefusals.length > 0).length;
  console.log(
    `fanout: ${reports.length} clients, ${reports.length - incomplete.length} got every line of their run once and in order (sha256 equal to the host's log)` +
      (incomplete.length
        ? `; INCOMPLETE ${incomplete.length}, e.g. ${JSON.stringify(
            incomplete.slice(0, 3).map((r) => ({
              runId: r.runId,
              bytes: r.bytes,
              expected: hostLogs.get(r.runId)!.bytes,
              lines: r.numberedLines,
              seqFaults: r.seqFaults.slice(0, 3),
            })),
          )}`
        : "") +
      `; ${chunksPerRun.toFixed(0)} chunks per run on average; paused ${pauses} time(s), ${disconnects} unexpected disconnect(s)${clientErrors.length ? `; client errors ${JSON.stringify(clientErrors.slice(0, 5))}` : ""}` +
      `; ${refusedClients} client(s) had joins refused (${refusals.length} refusals${refusals.length ? `, e.g. ${JSON.stringify(refusals[0])}` : ""}; each asked again after 1 s)`,
  );
  console.log(
    `delivered ${deliveredLines} lines to the clients = ${(deliveredLines / ((lastDelivery - firstStart) / 1000)).toFixed(0)} lines/s ` +
      `(first job start → last delivery ${((lastDelivery - firstStart) / 1000).toFixed(1)} s; the jobs wrote ${runCount * feed.linesPerSecond} lines/s × ${clientsPerRun} clients while all ran; ` +
      `last job end → last delivery ${((lastDelivery - lastEnd) / 1000).toFixed(2)} s); ` +
      `job's last line → delivered, per complete client that joined before its job ended (${joinedEarly.length}): p50 ${quantile(lagsS, 0.5).toFixed(2)} s, p95 ${quantile(lagsS, 0.95).toFixed(2)} s, max ${(lagsS.at(-1) ?? Number.NaN).toFixed(2)} s`,
  );
  console.log(
    `  of which last line → stored (worker) p50 ${quantile(storedS, 0.5).toFixed(2)} s, p95 ${quantile(storedS, 0.95).toFixed(2)} s; ` +
      `stored → delivered (server, clients) p50 ${quantile(serverS, 0.5).toFixed(2)} s, p95 ${quantile(serverS, 0.95).toFixed(2)} s, max ${(serverS.at(-1) ?? Number.NaN).toFixed(2)} s`,
  );
  console.log(
    `joins: asked → acknowledged p50 ${quantile(joinS, 0.5).toFixed(2)} s, p95 ${quantile(joinS, 0.95).toFixed(2)} s, max ${joinS.at(-1)!.toFixed(2)} s ` +
      `(${CONNECT_NOTE})`,
  );
  console.log(`CPU: ${cpuReport(cpuBefore, cpuAfter)}`);
  const serverPeak = memory.peakMiB("server");
  console.log(`memory: ${memory.report()}`);
  console.log(
    `server peak ${serverPeak.toFixed(0)} MiB (goal < ${SERVER_PEAK_GOAL_MIB} MiB: ${serverPeak < SERVER_PEAK_GOAL_MIB ? "met" : "missed"})`,
  );
  if (incomplete.length > 0) process.exitCode = 1;
} finally {
  await Promise.all(children.map((child) => stopChild(child, 2000)));
  await stack.stop();
}
