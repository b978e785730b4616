/**
 * Engine throughput: N trivial runs (the direct scheduler on the development host, a code that exits
 * at once) submitted together through the API, timed from the first submission until the last run is
 * `done`. Goal (Sigmaflow's): ≥ 50 runs/s on this 2-core machine. Everything shares the two cores:
 * PostgreSQL, the server, the worker(s), the development host with the jobs' processes, and this driver.
 *
 *   node --import tsx bench/engine/throughput.bench.ts [runs=2000] [--workers=1] [--fsync=off] [--statements]
 *     [--worker-env=WORKER_CONCURRENCY=16 …]
 *
 * The host's limit of runs at once is set to N so that the limit does not pace the benchmark; with the
 * default limit (50) the poll interval would (50 runs per 2 s poll).
 */
import { cpuReport, startEngineStack, timeInStates, waitUntilFinished } from "./stack";

const args = process.argv.slice(2);
const runCount = Number(args.find((a) => /^\d+$/.test(a)) ?? 2000);
const workers = Number(args.find((a) => a.startsWith("--workers="))?.split("=")[1] ?? 1);
const durable = !args.includes("--fsync=off");
const statements = args.includes("--statements");
/** --worker-env=NAME=value (repeatable): worker settings to try, e.g. WORKER_CONCURRENCY=16. */
const workerEnv = Object.fromEntries(
  args
    .filter((a) => a.startsWith("--worker-env="))
    .map((a) => a.slice("--worker-env=".length).split(/=(.*)/s).slice(0, 2) as [string, string]),
);
const submitConcurrency = 32;

const stack = await startEngineStack({
  durable,
  workers,
  maxConcurrentRuns: runCount,
  statementStatistics: statements,
  workerEnv,
  code: { name: "noop", version: "1.0", executable: "/bin/true" },
});
try {
  // One warm-up run: connections, prepared pools and JIT are in place before the clock starts.
  const warm = await stack.submit("warm-up");
  await waitUntilFinished(stack, [warm], 60_000);

  if (statements) await stack.resetStatements();
  const cpuBefore = stack.cpuSeconds();
  const started = performance.now();
  const ids: string[] = [];
  let next = 0;
  await Promise.all(
    Array.from({ length: submitConcurrency }, async () => {
      while (next < runCount) {
        const index = next++;
        ids.push(await stack.submit(`noop-${index}`, {}));
      }
    }),
  );
  const submittedSeconds = (performance.now() - started) / 1000;
  const states = await waitUntilFinished(stack, ids, 30 * 60_000, (s) =>
    console.log(`  … ${((performance.now() - started) / 1000).toFixed(0)} s: ${JSON.stringify(s)}`),
  );
  const seconds = (performance.now() - started) / 1000;
  const cpuAfter = stack.cpuSeconds();
  console.log(
    `throughput: ${runCount} trivial runs, ${workers} worker(s), fsync ${durable ? "on" : "off"}${Object.keys(workerEnv).length ? `, ${JSON.stringify(workerEnv)}` : ""}: ` +
      `submitted in ${submittedSeconds.toFixed(1)} s (${(runCount / submittedSeconds).toFixed(0)} runs/s accepted), ` +
      `all finished in ${seconds.toFixed(1)} s = ${(runCount / seconds).toFixed(1)} runs/s (goal ≥ 50); states ${JSON.stringify(states)}`,
  );
  console.log(`CPU: ${cpuReport(cpuBefore, cpuAfter)}`);
  console.log(`time in each state: ${await timeInStates(stack, ids)}`);
  if (statements) {
    console.log(`statements by PostgreSQL time:\n${await stack.topStatements()}`);
    console.log(`statements by calls:\n${await stack.topStatements(40, "calls")}`);
  }
} finally {
  await stack.stop();
}
