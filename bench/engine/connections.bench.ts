/**
 * SSH connections used by many runs in flight on one host: N runs (default 200) of a code that sleeps,
 * submitted together to the development host; the worker's established TCP connections to the host are
 * counted from /proc every 100 ms from the first submission until the last run is done. Goal
 * (Sigmaflow's): 200 runs in flight use at most 2 SSH connections (the pool's default per host and
 * account, SSH_MAX_CONNECTIONS_PER_TARGET).
 *
 *   node --import tsx bench/engine/connections.bench.ts [runs=200] [sleepSeconds=15]
 */
import { connectionsFrom } from "../support/processes";
import { startEngineStack, waitUntilFinished } from "./stack";

const args = process.argv.slice(2).filter((a) => /^\d+$/.test(a));
const runCount = Number(args[0] ?? 200);
const sleepSeconds = Number(args[1] ?? 15);

const stack = await startEngineStack({
  maxConcurrentRuns: runCount,
  code: {
    name: "sleeper",
    version: "1.0",
    executable: "/bin/sleep",
    arguments: ["{{ seconds }}"],
    parameters: {
      type: "object",
      properties: { seconds: { type: "integer", minimum: 0, maximum: 600 } },
      required: ["seconds"],
      additionalProperties: false,
    },
  },
});
try {
  const workerPid = stack.workers[0]!.pid!;
  let mostConnections = 0;
  let mostInFlight = 0;
  let sampling = true;
  const sampler = (async () => {
    while (sampling) {
      mostConnections = Math.max(mostConnections, connectionsFrom(workerPid, stack.fake.port));
      await new Promise((resolve) => setTimeout(resolve, 100));
    }
  })();
  const started = performance.now();
  const ids = await Promise.all(
    Array.from({ length: runCount }, (_, i) => stack.submit(`sleeper-${i}`, { seconds: sleepSeconds })),
  );
  const states = await waitUntilFinished(stack, ids, 10 * 60_000, (s) => {
    mostInFlight = Math.max(mostInFlight, (s.submitted ?? 0) + (s.running ?? 0));
  });
  sampling = false;
  await sampler;
  console.log(
    `connections: ${runCount} runs of ${sleepSeconds} s on one host, at most ${mostInFlight} seen submitted or running ` +
      `at once, finished in ${((performance.now() - started) / 1000).toFixed(1)} s, states ${JSON.stringify(states)}; ` +
      `most SSH connections from the worker to the host at any sample: ${mostConnections} (goal ≤ 2: ${mostConnections <= 2 ? "met" : "missed"})`,
  );
} finally {
  await stack.stop();
}
